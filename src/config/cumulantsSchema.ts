import { z } from "zod";
import { datasetId, relativeFile, text } from "./common.ts";
import { ENERGY_UNITS } from "./samplesSchema.ts";

/** Mean transfer against contact time, for the linear-growth check. */
export const cumulantsDatasetSchema = z
  .object({
    id: datasetId,
    kind: z.literal("cumulants"),
    file: relativeFile,
    description: z.string().optional(),
    columns: z.record(z.string(), text("a CSV column name")).optional(),
    energy_unit: z.enum(ENERGY_UNITS, { errorMap: () => ({ message: `must be one of ${ENERGY_UNITS.join(", ")}` }) }).default("J"),
    reference_temperature: z.number().positive().optional(),
    time_unit: z.enum(["s", "ms", "us", "µs", "ns", "ps", "fs", "hbar/J"]).default("s"),
    series: text().optional(),
  })
  .strict();

export type CumulantsDatasetConfig = z.output<typeof cumulantsDatasetSchema>;
