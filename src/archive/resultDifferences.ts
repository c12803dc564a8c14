import type { ResultDocument } from "../report/resultDocument.ts";
import { diffValues, formatPath, formatValue, type ValueDifference } from "./diffValues.ts";

/*
 * The comparison of a frozen result document with a re-run, in the words
 * `verify` prints: one function, used by `verify` (src/archive/verify.ts) and
 * by the browser's re-run panel (src/browser/engine/engine.ts), so that both
 * call the same difference REPRODUCED or NOT REPRODUCED.
 */

/** A difference between the frozen result and the re-run, named by check and value. */
export interface ResultProblem {
  where: string; // "check second-law on pulse-40ns" or "document"
  path: string; // "values.mean_sigma"
  frozen: string;
  now: string;
  /** For folded differences (the numbers of a plot): what differs, in words. */
  summary?: string;
}


function checkLabel(doc: ResultDocument, i: number): string {
  const c = doc.checks?.[i];
  return c ? `check ${c.check} on ${c.dataset}` : `check #${i + 1}`;
}

/** Members of a check result in the order a reader wants their differences: verdict first, plot data last. */
const MEMBER_ORDER = ["status", "summary", "reason", "values", "criteria", "tables", "assumptions", "references", "equations", "plots"];
const TOP_ORDER = ["audit", "stamp", "fingerprint", "tool", "datasets", "settings", "checks"];

function rank(order: string[], key: string | number | undefined): number {
  const i = order.indexOf(String(key));
  return i < 0 ? order.length : i;
}

/**
 * Word leaf differences for a person: by check ("check second-law on pulse"),
 * verdict and values before tables and plots, and the many numbers of one
 * plot folded into a single line.
 */
function describeResultDifferences(frozen: ResultDocument, diffs: ValueDifference[], skipDigestsOf: ReadonlySet<number>): ResultProblem[] {
  const kept = diffs.filter((d) => !(d.path[0] === "datasets" && typeof d.path[1] === "number" && d.path[2] === "sha256" && skipDigestsOf.has(d.path[1])));
  const sortKey = (d: ValueDifference): number[] =>
    d.path[0] === "checks" && typeof d.path[1] === "number" ? [rank(TOP_ORDER, "checks"), d.path[1], rank(MEMBER_ORDER, d.path[2])] : [rank(TOP_ORDER, d.path[0]), 0, 0];
  const ordered = kept
    .map((d, i) => ({ d, i, k: sortKey(d) }))
    .sort((x, y) => x.k[0] - y.k[0] || x.k[1] - y.k[1] || x.k[2] - y.k[2] || x.i - y.i)
    .map((x) => x.d);
  const out: ResultProblem[] = [];
  const plotCounts = new Map<string, { problem: ResultProblem; count: number }>();
  for (const d of ordered) {
    const [head, index, ...rest] = d.path;
    if (head === "checks" && typeof index === "number") {
      const where = checkLabel(frozen, index);
      if (rest[0] === "plots" && typeof rest[1] === "number") {
        const key = `${index}/${rest[1]}`;
        const entry = plotCounts.get(key);
        if (entry) entry.count++;
        else {
          const problem: ResultProblem = { where, path: formatPath(rest.slice(0, 2)), frozen: "", now: "" };
          plotCounts.set(key, { problem, count: 1 });
          out.push(problem);
        }
        continue;
      }
      out.push({ where, path: formatPath(rest), frozen: formatValue(d.frozen), now: formatValue(d.now) });
    } else {
      out.push({ where: "document", path: formatPath(d.path), frozen: formatValue(d.frozen), now: formatValue(d.now) });
    }
  }
  for (const { problem, count } of plotCounts.values()) problem.summary = `plot data differ in ${count} place(s)`;
  return out;
}

export interface ResultComparison {
  /** True when the two texts are byte-identical (canonical JSON, every digit). */
  reproduced: boolean;
  /** The differences, verdict and values first, at most `maxDifferences` of them. */
  differences: ResultProblem[];
  /** Differences beyond those listed. */
  more: number;
}

export interface CompareOptions {
  /** At most this many differences are listed (default 40); the rest are counted. */
  maxDifferences?: number;
  /** Indices of `datasets` whose digest differences are left out (the caller reports those files itself). */
  skipDigestsOf?: ReadonlySet<number>;
  /** Data files were found changed: equal values with different bytes then need no note of their own. */
  dataChanged?: boolean;
}

/** The text as JSON, or the reason it is none. */
function parsed(text: string): { value: unknown } | { error: string } {
  try {
    return { value: JSON.parse(text) };
  } catch (err) {
    return { error: (err as Error).message };
  }
}

/**
 * Compare a frozen result document's text with a re-run's canonical JSON.
 * Equal bytes reproduce; otherwise every leaf that differs is named by check
 * and value (numbers exactly), and a text that is not the canonical form of
 * equal values (edited by hand) or not JSON at all is named as such.
 */
export function compareResultTexts(frozenText: string, freshText: string, options: CompareOptions = {}): ResultComparison {
  if (frozenText === freshText) return { reproduced: true, differences: [], more: 0 };
  const max = options.maxDifferences ?? 40;
  const frozen = parsed(frozenText);
  const fresh = parsed(freshText);
  let all: ResultProblem[];
  if ("error" in frozen || "error" in fresh) {
    const bad = (p: typeof frozen) => ("error" in p ? `not JSON (${p.error})` : "JSON");
    all = [{ where: "document", path: "(bytes)", frozen: bad(frozen), now: bad(fresh) }];
  } else {
    const doc = frozen.value as ResultDocument;
    all = describeResultDifferences(doc, diffValues(frozen.value, fresh.value), new Set(options.skipDigestsOf ?? []));
    if (all.length === 0 && !options.dataChanged) {
      // Same values, different bytes: the stored text is not in canonical form (edited by hand).
      all.push({ where: "document", path: "(bytes)", frozen: "stored text", now: "not the canonical JSON of the same values" });
    }
  }
  return { reproduced: false, differences: all.slice(0, max), more: Math.max(0, all.length - max) };
}
