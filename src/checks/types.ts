import type { PlotSpec } from "./plotSpec.ts";
import type { IngestedAudit } from "../ingest/types.ts";
import type { Settings } from "../config/types.ts";
import type { Rng } from "../stats/rng.ts";
import type { OptionSchemas } from "./options.ts";
import type { UnitSpec, ValueUnits } from "./valueUnits.ts";

export const CHECK_IDS = [
  "reciprocity",
  "positivity",
  "figures-of-merit",
  "lorenz-ratio",
  "exchange-fluctuation",
  "integral-fluctuation",
  "second-law",
  "work",
  "weighted-identity",
  "uncertainty-relation",
  "fluctuation-dissipation",
  "linear-growth",
  "steady-state-counting",
  "tunnelling-rates",
] as const;
export type CheckId = (typeof CHECK_IDS)[number];

export type Status = "pass" | "fail" | "inconclusive" | "not-applicable" | "info";

/** A table of numbers for the report (per operating point, per channel, …). */
/**
 * A column's unit that says "each row's own": the numbers of such a column are
 * in the unit written in that row's `unit` cell (a table whose rows are
 * different quantities, or one matrix a row). Only columns marked so take the
 * row's unit; counts, z-scores and p-values beside them never do.
 */
export const ROW_UNIT = "unit of the row";

export interface TableSpec {
  id: string;
  title: string;
  /** `unit`: a written unit ("µV", "W/K"), "1" for a dimensionless number, or ROW_UNIT. */
  columns: { key: string; label: string; unit?: string }[];
  rows: Record<string, number | string | boolean | null>[];
}

export interface CheckResult {
  check: CheckId;
  /** The dataset id, or for group checks the group name (a sweep or a series). */
  dataset: string;
  status: Status;
  /** One sentence a referee can quote. */
  summary: string;
  /** Why inconclusive or not applicable; for an inconclusive verdict, what more data would settle it. */
  reason?: string;
  /** Numbers in SI units (dimensionless where stated), uncertainties beside their values. */
  values: Record<string, unknown>;
  /** The SI unit of each value key (see valueUnits.ts); added from the check's registry when the result document is made. */
  units?: Record<string, UnitSpec>;
  criteria: { alpha?: number; margin?: number; confidence?: number };
  /** Conditions under which the law holds; printed beside the verdict. */
  assumptions: string[];
  /** Published sources of the law and of the method, "Authors, Journal vol, page (year)". */
  references: string[];
  /** The law as TeX (rendered with KaTeX in the report). */
  equations: string[];
  tables: TableSpec[];
  plots: PlotSpec[];
}

/** Per-check options from audit.yaml (`- reciprocity: { margin: 0.1 }`). */
export type CheckOptions = Record<string, unknown>;

export interface CheckContext {
  settings: Settings;
  options: CheckOptions;
  /** A generator seeded from content (the digest given) unless settings.seed fixes it. */
  rngFor(contentDigest: string, stream?: string): Rng;
}

export interface CheckDefinition {
  id: CheckId;
  title: string;
  /** false for checks that only report figures (status info). */
  verdictBearing: boolean;
  /** The options this check reads under `checks:` (besides `datasets`); omitted: `margin` only. */
  options?: OptionSchemas;
  /** Pure: ingested data and settings in, results out; [] when nothing in the audit applies. */
  run(audit: IngestedAudit, ctx: CheckContext): CheckResult[];
}

/** A check as the registry lists it: its definition and the units of its values (src/checks/<id>/units.ts). */
export interface RegisteredCheck extends CheckDefinition {
  units: ValueUnits;
}

export type { PlotSpec, UnitSpec, ValueUnits };
