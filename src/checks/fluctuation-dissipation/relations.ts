import { holm } from "../../stats/holm.ts";
import { normalQuantile, normalTwoSidedP } from "../../stats/normal.ts";
import { tost } from "../../stats/tost.ts";
import { fmt } from "../helpers.ts";
import type { Status } from "../types.ts";

/**
 * The relations the sweep is audited against, each a set of scalar
 * comparisons "estimate = 0" with a standard error and a unit-free scale for
 * the equivalence margin (physics §6): a violation is a significant deviation
 * after Holm's correction over every comparison of the sweep (Holm, Scand. J.
 * Stat. 6, 65 (1979)); a relation holds when every comparison is equivalent
 * to zero within margin × scale by two one-sided tests (Schuirmann,
 * J. Pharmacokinet. Biopharm. 15, 657 (1987)).
 */
export type RelationId = "fluctuation-response" | "reciprocity" | "no-spontaneous-flux";

export interface Comparison {
  relation: RelationId;
  /** Which entry, e.g. "L[Q,dN] − L_fluct[Q,dN]". */
  label: string;
  estimate: number;
  se: number;
  /** Size against which the margin is set (same unit as the estimate). */
  scale: number;
  /** SI unit of the estimate, its standard error and its scale, as the report writes it ("J²/s", "W"). */
  unit: string;
}

export interface ComparisonOutcome extends Comparison {
  z: number;
  p: number;
  pHolm: number;
  violated: boolean;
  equivalent: boolean;
  /** The 100(1 − 2·(1 − confidence)) % interval of the TOST decision. */
  interval: [number, number];
}

export interface RelationOutcome {
  relation: RelationId;
  statement: string;
  verdict: "holds" | "violated" | "not resolved";
  comparisons: ComparisonOutcome[];
}

export interface SweepDecision {
  status: Status;
  relations: RelationOutcome[];
  /** More realisations per dataset needed to resolve the margin (factor), when that is what is missing. */
  moreData: number | null;
}

export function judgeComparisons(
  comparisons: Comparison[],
  statements: Record<RelationId, string>,
  alpha: number,
  confidence: number,
  margin: number,
): SweepDecision {
  const p = comparisons.map((c) => (c.se > 0 ? normalTwoSidedP(c.estimate / c.se) : c.estimate === 0 ? 1 : 0));
  const h = holm(p, alpha);
  const outcomes: ComparisonOutcome[] = comparisons.map((c, i) => {
    const t = tost({ estimate: c.estimate, se: c.se, lower: -margin * c.scale, upper: margin * c.scale, alpha: 1 - confidence });
    return { ...c, z: c.se > 0 ? c.estimate / c.se : Number.NaN, p: p[i], pHolm: h.adjusted[i], violated: h.rejected[i], equivalent: t.equivalent, interval: t.interval };
  });
  const ids = [...new Set(comparisons.map((c) => c.relation))];
  const relations: RelationOutcome[] = ids.map((relation) => {
    const cs = outcomes.filter((o) => o.relation === relation);
    const verdict = cs.some((o) => o.violated) ? "violated" : cs.every((o) => o.equivalent) ? "holds" : "not resolved";
    return { relation, statement: statements[relation], verdict, comparisons: cs };
  });
  const status: Status = relations.some((r) => r.verdict === "violated") ? "fail" : relations.every((r) => r.verdict === "holds") ? "pass" : "inconclusive";
  // Standard errors shrink as 1/sqrt(n): the factor that brings every unresolved interval inside its margin.
  const z = normalQuantile(confidence);
  let moreData: number | null = null;
  for (const o of outcomes) {
    if (o.equivalent || o.violated) continue;
    const room = margin * o.scale - Math.abs(o.estimate);
    const factor = room > 0 ? ((z * o.se) / room) ** 2 : Infinity;
    moreData = Math.max(moreData ?? 0, factor);
  }
  return { status, relations, moreData };
}

/** The scale each relation's margin is a fraction of, in words (physics §6). */
const SCALE_WORDS: Record<RelationId, string> = {
  "fluctuation-response": "√(Lf_ii Lf_jj) of the fluctuation matrix for each entry",
  reciprocity: "√(Lf_11 Lf_22) of the fluctuation matrix",
  "no-spontaneous-flux": "√(Lf_ii · aᵀ Lf a), the largest flux the fluctuations allow at the sweep's affinities (Cauchy–Schwarz)",
};

/** "5 % of √(Lf_11 Lf_22) of the fluctuation matrix": the margin with its scale named (entries mix units, so no single value). */
function marginWords(r: RelationOutcome, margin: number): string {
  return `${fmt(margin * 100, 3)} % of ${SCALE_WORDS[r.relation]}`;
}

/** One clause a referee can quote for a relation. */
export function relationSentence(r: RelationOutcome, margin: number, confidence: number): string {
  switch (r.verdict) {
    case "holds":
      return `${r.statement} within ${marginWords(r, margin)} at ${fmt(confidence * 100, 3)} % confidence`;
    case "violated": {
      const worst = r.comparisons.reduce((a, b) => (b.pHolm < a.pHolm ? b : a));
      return `${r.statement} is violated: ${worst.label} = ${fmt(worst.estimate)} ± ${fmt(worst.se, 2)} (Holm-adjusted p = ${fmt(worst.pHolm, 3)})`;
    }
    case "not resolved": {
      const open = r.comparisons.filter((c) => !c.equivalent).map((c) => c.label);
      return `${r.statement} is neither violated nor resolved to ${marginWords(r, margin)} (${open.join(", ")} not yet inside the margin)`;
    }
  }
}
