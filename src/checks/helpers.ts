import type { Dataset, IngestedAudit, SamplesDataset, CoefficientsDataset, CumulantsDataset } from "../ingest/types.ts";
import type { CheckContext, CheckId, CheckResult } from "./types.ts";

type KindMap = { samples: SamplesDataset; coefficients: CoefficientsDataset; cumulants: CumulantsDataset };

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
