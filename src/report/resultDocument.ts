import type { Author, Settings } from "../config/types.ts";
import type { DisplayChoices } from "../config/displaySchema.ts";
import type { DatasetRecord } from "../ingest/types.ts";
import type { CheckResult, Status } from "../checks/types.ts";
import { CHECKS } from "../checks/index.ts";
import { valueUnitsOf } from "../checks/valueUnits.ts";

/** The audit's verdict in one word (contract: fail > inconclusive > pass). */
export type Stamp = "pass" | "fail" | "inconclusive";

/** The result document printed by `run --json` and frozen by `publish`. */
export interface ResultDocument {
  audit: string;
  title: string;
  authors: Author[];
  license?: string;
  description?: string;
  device?: string;
  date?: string;
  doi?: string;
  tool: { name: string; version: string };
  fingerprint: string;
  stamp: Stamp;
  settings: Settings;
  /** audit.yaml's `display:` choices (presentation only; every value here stays in SI). */
  display?: DisplayChoices;
  /** Each input file; `energy_unit` is the unit its energies were written in, which the report shows energies in. */
  datasets: (DatasetRecord & { energy_unit?: string })[];
  checks: CheckResult[];
}

const UNITS = new Map(CHECKS.map((c) => [c.id as string, c.units]));

/**
 * A check's result with `units` beside `values`: the SI unit of every value
 * key, from the check's registry (src/checks/<id>/units.ts). The values
 * themselves are not touched.
 */
export function withValueUnits(result: CheckResult): CheckResult {
  const registry = UNITS.get(result.check) ?? {};
  return { ...result, units: valueUnitsOf(result.values, registry) };
}

/**
 * `fail` if any check failed; else `inconclusive` if any verdict-bearing check
 * is inconclusive, or if no check passed at all (an audit that tested nothing
 * earns no pass); else `pass`.
 */
export function stampOf(checks: readonly { status: Status }[]): Stamp {
  // Only verdict-bearing checks can be inconclusive; informational ones report `info`.
  if (checks.some((c) => c.status === "fail")) return "fail";
  if (checks.some((c) => c.status === "inconclusive")) return "inconclusive";
  if (!checks.some((c) => c.status === "pass")) return "inconclusive";
  return "pass";
}

/** Counts of each status, for the archive index. */
export function statusCounts(checks: readonly { status: Status }[]): Record<Status, number> {
  const counts: Record<Status, number> = { pass: 0, fail: 0, inconclusive: 0, "not-applicable": 0, info: 0 };
  for (const c of checks) counts[c.status]++;
  return counts;
}
