import type { Dataset, IngestedAudit, SamplesDataset, CoefficientsDataset, CumulantsDataset, TraceDataset } from "../ingest/types.ts";
import type { CheckContext, CheckId, CheckResult } from "./types.ts";
import { weightedMoments, type Moments } from "../stats/weightedMoments.ts";

type KindMap = { samples: SamplesDataset; coefficients: CoefficientsDataset; cumulants: CumulantsDataset; trace: TraceDataset };

/** The audit's datasets of one kind, in definition order. */
export function datasetsOfKind<K extends keyof KindMap>(audit: IngestedAudit, kind: K): KindMap[K][] {
  return audit.datasets.filter((d: Dataset): d is KindMap[K] => d.kind === kind);
}

/** Run a per-dataset check over every dataset of one kind. */
export function perDataset<K extends keyof KindMap>(
  kind: K,
  run: (dataset: KindMap[K], ctx: CheckContext, audit: IngestedAudit) => CheckResult,
): (audit: IngestedAudit, ctx: CheckContext) => CheckResult[] {
  return (audit, ctx) => datasetsOfKind(audit, kind).map((d) => run(d, ctx, audit));
}

/** A number for a sentence: 4 significant digits, no trailing noise. */
export function fmt(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return "0";
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e5) return String(Number(x.toPrecision(digits)));
  return x.toExponential(digits - 1).replace(/\.?0+e/, "e");
}

/** `[lo, hi]` for a sentence. */
export function fmtInterval(lo: number, hi: number, digits = 4): string {
  return `[${fmt(lo, digits)}, ${fmt(hi, digits)}]`;
}

/** A numeric option from audit.yaml with a default, validated as finite and in range. */
export function numberOption(ctx: CheckContext, key: string, fallback: number, check: (v: number) => boolean = Number.isFinite): number {
  const v = ctx.options[key];
  return typeof v === "number" && check(v) ? v : fallback;
}

/** What a not-applicable result says besides its status. */
export interface NotApplicableFields {
  check: CheckId;
  dataset: string;
  /** Why the check cannot run on these data, and what would make it applicable. */
  reason: string;
  /** Defaults to "Not applicable: <reason>". */
  summary?: string;
  values?: Record<string, unknown>;
  assumptions?: string[];
  references?: string[];
  equations?: string[];
}

/** A `not-applicable` result: missing inputs, never a verdict. */
export function notApplicableResult(f: NotApplicableFields): CheckResult {
  return {
    check: f.check,
    dataset: f.dataset,
    status: "not-applicable",
    summary: f.summary ?? `Not applicable: ${f.reason}`,
    reason: f.reason,
    values: f.values ?? {},
    criteria: {},
    assumptions: f.assumptions ?? [],
    references: f.references ?? [],
    equations: f.equations ?? [],
    tables: [],
    plots: [],
  };
}

/**
 * For a dataset summarised into cells (src/ingest/reduce), the within-cell
 * scatter Σ_i w_i (x_i − x̄_C)(y_i − ȳ_C) of two currents ("Q", "W", "dN"),
 * which sums over the cells' means miss; 0 for datasets kept row by row. Add
 * it to a sum of squares about the mean (law of total variance).
 */
export function withinCellScatter(d: SamplesDataset, a: "Q" | "W" | "dN", b: "Q" | "W" | "dN"): number {
  const scatter = d.reduction?.scatter;
  if (!scatter) return 0;
  return scatter[`${a},${b}`] ?? scatter[`${b},${a}`] ?? 0;
}

/** Weighted moments of a current of a samples dataset, with the within-cell scatter of summarised files added. */
export function currentMoments(d: SamplesDataset, x: Float64Array, name: "Q" | "W" | "dN"): Moments {
  const m = weightedMoments(x, d.weight);
  const extra = withinCellScatter(d, name, name);
  if (extra === 0 || !(m.n > 1)) return m;
  const variance = m.variance + extra / (m.n - 1);
  return { ...m, variance, standardError: Math.sqrt(variance / m.n) };
}

// ── Traces whose lead is unresolved (src/ingest/types.ts TraceDataset) ─────────────────────────────────
// Such a trace never reaches a check as samples: no window's per-lead transfers are known. Every check
// that needs them reports the trace as not applicable, naming what is missing (called by runChecks).

/** Checks that need what each lead gained in a realisation (Σ, Q, ΔN or W, or the count into one lead). */
const NEEDS_LEAD_TRANSFERS: ReadonlySet<CheckId> = new Set<CheckId>([
  "exchange-fluctuation",
  "integral-fluctuation",
  "second-law",
  "work",
  "weighted-identity",
  "uncertainty-relation",
  "linear-growth",
  "steady-state-counting",
]);

/** Why a check of exchanged quantities cannot run on a trace whose lead is unresolved. */
export function unresolvedLeadReason(d: TraceDataset): string {
  return `the detector does not show which lead each electron used (audit.yaml declares lead: unresolved for ${d.unresolved.join(", ")}), so the particles and energy each lead gained, and with them the entropy production, are not in the data; a detector that resolves the direction of each transfer would supply them, for example a charge sensor on a serial double dot, whose states show from which side each electron entered. What the trace does determine (occupations, tunnelling rates, dwell times, missed events) is what the check tunnelling-rates reports.`;
}

/** Not-applicable results of one check for every trace whose lead is unresolved (none for checks that do not need per-lead transfers). */
export function unresolvedLeadResults(audit: IngestedAudit, check: CheckId): CheckResult[] {
  if (!NEEDS_LEAD_TRANSFERS.has(check)) return [];
  return audit.datasets
    .filter((d): d is TraceDataset => d.kind === "trace")
    .map((d) => notApplicableResult({ check, dataset: d.id, reason: unresolvedLeadReason(d), values: { lead_resolved: false, unresolved_jumps: d.unresolved } }));
}
