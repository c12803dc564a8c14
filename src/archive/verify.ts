import fs from "node:fs";
import path from "node:path";
import { parseAuditDefinition } from "../config/loadAudit.ts";
import { confinePath } from "../config/confinePath.ts";
import { ArchiveError, InputError } from "../errors.ts";
import { ingestDefinition } from "../ingest/loadAudit.ts";
import { canonicalJson } from "../report/canonicalJson.ts";
import type { ResultDocument } from "../report/resultDocument.ts";
import { resultDocumentOf, runChecks } from "../report/runAudit.ts";
import { TOOL } from "../version.ts";
import { datasetDigest } from "../ingest/fileDigest.ts";
import { diffValues, formatPath, formatValue, type ValueDifference } from "./diffValues.ts";
import { checkArchive, type IntegrityProblem } from "./integrity.ts";
import { DEFINITION_FILE, VERSIONS_DIR, listVersionNumbers } from "./layout.ts";
import { publicationDate } from "./manifest.ts";
import type { FrozenVersion } from "./readVersion.ts";

/** A data file whose bytes are not those the version was published with. */
export interface DataFileProblem {
  dataset: string;
  file: string;
  frozen: string;
  now: string | null; // null: missing
}

/** A difference between the frozen result and the re-run, named by check and value. */
export interface ResultProblem {
  where: string; // "check second-law on pulse-40ns" or "document"
  path: string; // "values.mean_sigma"
  frozen: string;
  now: string;
  /** For folded differences (the numbers of a plot): what differs, in words. */
  summary?: string;
}

export interface VerifyReport {
  audit: string;
  version: number;
  /** The newest version: the hash chain is checked from version 1 to it, whichever version is verified. */
  newest: number;
  published: string;
  tool: { frozen: { name: string; version: string }; now: { name: string; version: string } };
  reproduced: boolean;
  chain: IntegrityProblem[];
  data: DataFileProblem[];
  /** Why the audit could not be re-run (a data file missing or unreadable), if it could not. */
  rerunError?: string;
  result: ResultProblem[];
  /** Result differences beyond those listed. */
  resultMore: number;
  notes: string[];
}

export interface VerifyOptions {
  version?: number;
  /** At most this many result differences are listed (the count of the rest is given). */
  maxDifferences?: number;
}

function pickVersion(auditDir: string, wanted: number | undefined): number {
  const numbers = listVersionNumbers(auditDir);
  if (numbers.length === 0) {
    throw new ArchiveError(`${path.join(auditDir, VERSIONS_DIR)}: no published version to verify; publish one first with: transport-audit publish ${auditDir}`);
  }
  if (wanted === undefined) return numbers[numbers.length - 1];
  if (!numbers.includes(wanted)) {
    throw new ArchiveError(`--version ${wanted}: ${auditDir} has no such version; published versions: ${numbers.join(", ")}`);
  }
  return wanted;
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
function describeResultDifferences(frozen: ResultDocument, diffs: ValueDifference[], skipDigestsOf: Set<number>): ResultProblem[] {
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

/** Compare each data file the version names with its frozen digest. */
function checkDataFiles(auditDir: string, v: FrozenVersion): DataFileProblem[] {
  const out: DataFileProblem[] = [];
  for (const input of v.manifest.inputs) {
    // A dataset's file may be a folder or a glob of parts: its digest is then the one over the parts' list.
    let now: string | null;
    try {
      now = datasetDigest(auditDir, input.file, "file");
    } catch (err) {
      const gone = (err as NodeJS.ErrnoException).code === "ENOENT";
      if (!(err instanceof InputError) && !gone) throw err;
      now = null; // gone, outside the audit, or no longer readable
    }
    if (now !== input.sha256) out.push({ dataset: input.id, file: input.file, frozen: input.sha256, now });
  }
  return out;
}

/**
 * Re-run a published version from the data and compare: the whole hash chain
 * (to the newest version), every data file's digest, and the result document to the last
 * digit (canonical JSON). The frozen audit.yaml of the version is what runs,
 * so later edits to the audit definition do not disturb older versions; the
 * data are read from the audit folder.
 */
export async function verifyVersion(auditDir: string, options: VerifyOptions = {}): Promise<VerifyReport> {
  const number = pickVersion(auditDir, options.version);
  const max = options.maxDifferences ?? 40;
  // The whole chain to the newest version: a later version's link is what proves an earlier record unaltered.
  const state = checkArchive(auditDir);
  const v = state.versions.find((x) => x.number === number);
  const report: VerifyReport = {
    audit: v?.manifest.audit ?? path.basename(path.resolve(auditDir)),
    version: number,
    newest: state.newest,
    published: v ? publicationDate(v.manifest) : "unknown",
    tool: { frozen: v ? v.manifest.tool : { name: "unknown", version: "unknown" }, now: { name: TOOL.name, version: TOOL.version } },
    reproduced: false,
    chain: state.problems,
    data: [],
    result: [],
    resultMore: 0,
    notes: [],
  };
  if (!v) return report; // unreadable: the chain problems say why
  if (v.manifest.tool.version !== TOOL.version || v.manifest.tool.name !== TOOL.name) {
    report.notes.push(
      `version ${number} was published with ${v.manifest.tool.name} ${v.manifest.tool.version}; this is ${TOOL.name} ${TOOL.version}. ` +
        `The fingerprint includes the tool version, so only that version can reproduce it exactly.`,
    );
  }
  const current = path.join(auditDir, DEFINITION_FILE);
  if (fs.existsSync(current) && fs.readFileSync(current, "utf8") !== v.definitionText) {
    report.notes.push(`audit.yaml has changed since version ${number}; the version's own frozen copy (${VERSIONS_DIR}/${number}/${DEFINITION_FILE}) is what was re-run.`);
  }
  report.data = checkDataFiles(auditDir, v);
  let rerun: ResultDocument | null = null;
  try {
    const audit = await ingestDefinition(auditDir, parseAuditDefinition(v.definitionText, `${VERSIONS_DIR}/${number}/${DEFINITION_FILE}`));
    rerun = resultDocumentOf(audit, runChecks(audit));
  } catch (err) {
    if (!(err instanceof InputError)) throw err;
    report.rerunError = err.message;
  }
  if (rerun) {
    const identical = canonicalJson(rerun) === v.resultText;
    if (!identical) {
      const skip = new Set(v.result.datasets.map((d, i) => [d, i] as const).filter(([d]) => report.data.some((p) => p.file === d.file)).map(([, i]) => i));
      const all = describeResultDifferences(v.result, diffValues(v.result, JSON.parse(canonicalJson(rerun))), skip);
      if (all.length === 0 && report.data.length === 0) {
        // Same values, different bytes: the stored text is not in canonical form (edited by hand).
        all.push({ where: "document", path: "(bytes)", frozen: "stored text", now: "not the canonical JSON of the same values" });
      }
      report.result = all.slice(0, max);
      report.resultMore = Math.max(0, all.length - max);
    }
  }
  report.reproduced = report.chain.length === 0 && report.data.length === 0 && !report.rerunError && report.result.length === 0;
  return report;
}

/** The report as lines a person reads. */
export function formatVerifyReport(r: VerifyReport, auditDir: string): string {
  const lines: string[] = [];
  lines.push(`verifying ${r.audit} version ${r.version} (published ${r.published} with ${r.tool.frozen.name} ${r.tool.frozen.version}) in ${auditDir}`);
  for (const n of r.notes) lines.push(`note: ${n}`);
  lines.push(r.chain.length === 0 ? `hash chain: versions 1 to ${r.newest} intact` : `hash chain (versions 1 to ${r.newest}): ${r.chain.length} problem(s)`);
  for (const p of r.chain) lines.push(`  ${p.file}: ${p.message}`);
  if (r.data.length === 0) lines.push("data files: every digest matches");
  else {
    lines.push(`data files: ${r.data.length} changed`);
    for (const d of r.data) {
      lines.push(d.now === null ? `  ${d.file} (dataset ${d.dataset}): missing; published with sha256 ${d.frozen}` : `  ${d.file} (dataset ${d.dataset}): changed; published sha256 ${d.frozen}, now ${d.now}`);
    }
  }
  if (r.rerunError) lines.push(`re-run: could not run the audit:\n${r.rerunError.replace(/^/gm, "  ")}`);
  else if (r.result.length === 0) lines.push("result: identical to the frozen result document (canonical JSON, every digit)");
  else {
    lines.push(`result: ${r.result.length + r.resultMore} difference(s) from the frozen result document`);
    for (const d of r.result) lines.push(d.summary ? `  ${d.where}: ${d.path}: ${d.summary}` : `  ${d.where}: ${d.path}: published ${d.frozen}, re-run ${d.now}`);
    if (r.resultMore > 0) lines.push(`  … and ${r.resultMore} more`);
  }
  lines.push(r.reproduced ? `REPRODUCED: version ${r.version} of ${r.audit}` : `NOT REPRODUCED: version ${r.version} of ${r.audit}`);
  return lines.join("\n");
}
