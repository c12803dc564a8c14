import { z } from "zod";
import { dataFileKeys } from "./dataFileSchema.ts";
import { datasetId, positive, relativeFile, text } from "./common.ts";

const temperatureSchema = z.union([z.object({ column: text("a CSV column name") }).strict(), z.object({ value: positive("kelvin") }).strict()], {
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
    field: z.object({ column: text("a CSV column name") }).strict().optional(),
    point: z.array(text("a CSV column name")).default([]),
    /** role → CSV column when the file's headers differ from the role names. */
    columns: z.record(z.string(), text("a CSV column name")).optional(),
    /** per-column units (thermoelectric form), e.g. { G: uS, S: uV/K }. */
    units: z.record(z.string(), text("a unit")).optional(),
    /** time-reversal parity of each flux, +1 or -1 (default +1: charge and heat). */
    parity: z.array(z.union([z.literal(1), z.literal(-1)])).optional(),
    /** column plotted on the abscissa of sweep plots (default: the first `point` column). */
    sweep_variable: text("a CSV column name").optional(),
    /** unit of the field column, for labels only (pairing uses the sign); default T. */
    field_unit: text().optional(),
  })
  .strict();

export type CoefficientsDatasetConfig = z.output<typeof coefficientsDatasetSchema>;
