/**
 * Per-check options of audit.yaml (`- reciprocity: { margin: 0.1, datasets: [sweep-a] }`). Each check
 * declares the options it reads as a small map of schemas (`options` on its CheckDefinition); the audit
 * schema validates every entry against it, so a wrong value or an unknown key is refused with its line
 * before any data are read. `datasets` is common to all checks and handled by the runner.
 */
import { z } from "zod";

/** The schemas of a check's own options, keyed by option name. */
export type OptionSchemas = Record<string, z.ZodTypeAny>;

/** An equivalence margin relative to the check's scale. */
export const marginOption = z.number({ invalid_type_error: "must be a positive number (a fraction of the scale, e.g. 0.05)" }).positive("must be a positive number (a fraction of the scale, e.g. 0.05)");

/** A margin that must stay below the whole scale. */
export const fractionMarginOption = z
  .number({ invalid_type_error: "must be a number in (0, 1) (a fraction of the scale, e.g. 0.05)" })
  .gt(0, "must be a number in (0, 1) (a fraction of the scale, e.g. 0.05)")
  .lt(1, "must be a number in (0, 1) (a fraction of the scale, e.g. 0.05)");

/** A whole number at least `min`. */
export function countOption(min: number): z.ZodTypeAny {
  const message = `must be a whole number of at least ${min}`;
  return z.number({ invalid_type_error: message }).int(message).min(min, message);
}

/** A positive number (degrees of freedom, tolerances). */
export const positiveOption = z.number({ invalid_type_error: "must be a positive number" }).positive("must be a positive number");

/** A number in (0, 1). */
export const openUnitOption = z.number({ invalid_type_error: "must be a number in (0, 1)" }).gt(0, "must be a number in (0, 1)").lt(1, "must be a number in (0, 1)");

/** `datasets:` names dataset ids or group names (sweep, series); checked against the audit by the audit schema. */
export const datasetsOption = z.array(z.string({ invalid_type_error: "must be a dataset id or a sweep or series name" }), { invalid_type_error: "must be a list of dataset ids or sweep or series names" }).min(1, "must name at least one dataset, sweep or series");

/** Options a check declares nothing for: the equivalence margin only. */
export const DEFAULT_OPTIONS: OptionSchemas = { margin: marginOption };

/** Every option key a check accepts, `datasets` included. */
export function optionSchemasOf(declared: OptionSchemas | undefined): OptionSchemas {
  return { datasets: datasetsOption, ...(declared ?? DEFAULT_OPTIONS) };
}
