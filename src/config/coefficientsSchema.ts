import { z } from "zod";
import { columnRef, dataFileKeys } from "./dataFileSchema.ts";
import { datasetId, positive, relativeFile, text } from "./common.ts";

const temperatureSchema = z.union([z.object({ column: columnRef }).strict(), z.object({ value: positive("kelvin") }).strict()], {
  errorMap: () => ({ message: "must be { column: <name> } or { value: <kelvin> }" }),
});

export const coefficientsDatasetSchema = z
  .object({
    id: datasetId,
    kind: z.literal("coefficients"),
    file: relativeFile,
    ...dataFileKeys,
    description: z.string().optional(),
    form: z.enum(["onsager", "thermoelectric"], { errorMap: () => ({ message: "must be onsager or thermoelectric" }) }),
    temperature: temperatureSchema,
    field: z.object({ column: columnRef }).strict().optional(),
    point: z.array(columnRef).default([]),
    /** role → column when the file's headers differ from the role names; 1-based positions for a file without a header. */
    columns: z.record(z.string(), columnRef).optional(),
    /**
     * `SI`, or per-column units, e.g. { G: uS, S: uV/K, Pi: uV, K: pW/K }. The
     * thermoelectric form must declare them (auditSchema.ts): its columns are
     * printed in µS and µV/K as often as in SI, so silence is not taken as SI.
     */
    units: z
      .union([z.literal("SI"), z.record(z.string(), text("a unit"))], {
        errorMap: () => ({ message: "must be SI, or a map from each column to its unit such as { G: uS, S: uV/K, Pi: uV, K: pW/K }" }),
      })
      .optional(),
    /** time-reversal parity of each flux, +1 or -1 (default +1: charge and heat). */
    parity: z.array(z.union([z.literal(1), z.literal(-1)])).optional(),
    /** column plotted on the abscissa of sweep plots (default: the first `point` column). */
    sweep_variable: columnRef.optional(),
    /** unit of the field column, for labels only (pairing uses the sign); default T. */
    field_unit: text().optional(),
  })
  .strict();

export type CoefficientsDatasetConfig = z.output<typeof coefficientsDatasetSchema>;

/**
 * The columns whose unit the thermoelectric form must state. Pi is optional
 * (Π can come from the Kelvin relation), so its unit can only be required
 * once the file shows a Pi column: that check belongs to the reader
 * (src/ingest/coefficients.ts, parseUnits, which also holds a units map of the
 * onsager form to all four entries of the 2×2 matrix).
 */
export const THERMOELECTRIC_UNIT_COLUMNS = ["G", "S", "K"] as const;

/** Why a coefficients dataset's `units:` does not declare every unit it needs, or null. */
export function undeclaredUnits(d: CoefficientsDatasetConfig): string | null {
  if (d.form !== "thermoelectric" || d.units === "SI") return null;
  const example = "e.g. units: { G: uS, S: uV/K, Pi: uV, K: pW/K }";
  if (d.units === undefined) {
    return `is missing; the thermoelectric form needs its units declared: write units: SI when every column is in SI units (S, V/K, V, W/K), or give each column's unit, ${example}`;
  }
  const missing = THERMOELECTRIC_UNIT_COLUMNS.filter((c) => !(c in (d.units as Record<string, string>)));
  return missing.length === 0
    ? null
    : `must give the unit of each of G, S and K (and Pi when the table has it; missing: ${missing.join(", ")}); write SI units as S, V/K, V and W/K, or units: SI for all, ${example}`;
}
