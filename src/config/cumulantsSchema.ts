import { z } from "zod";
import { columnRef, dataFileKeys } from "./dataFileSchema.ts";
import { energyUnitErrorMap } from "./energyUnitMessage.ts";
import { datasetId, positive, relativeFile, text } from "./common.ts";
import { ENERGY_UNITS } from "./samplesSchema.ts";

/** Roles of a cumulants table: contact time, mean transfers and their standard uncertainties. */
export const CUMULANT_ROLES = ["tau", "Q", "dN", "u_Q", "u_dN"] as const;
export type CumulantRole = (typeof CUMULANT_ROLES)[number];

export const TIME_UNITS = ["s", "ms", "us", "µs", "ns", "ps", "fs", "hbar/J"] as const;

const roleMap = z
  .record(z.string(), columnRef)
  .superRefine((m, ctx) => {
    for (const key of Object.keys(m)) {
      if (!(CUMULANT_ROLES as readonly string[]).includes(key)) {
        ctx.addIssue({ code: "custom", path: [key], message: `is not a role; roles are ${CUMULANT_ROLES.join(", ")}` });
      }
    }
  });

/**
 * Mean transfer against contact time, for the linear-growth check: one row per
 * contact time with the mean energy carried A → B (Q), the mean particles gained
 * by B (dN) and, optionally, their standard uncertainties. Headers default to
 * the role names; `columns` maps roles to other headers, or to 1-based
 * positions in a file without a header (`header: false`).
 */
export const cumulantsDatasetSchema = z
  .object({
    id: datasetId,
    kind: z.literal("cumulants"),
    file: relativeFile,
    ...dataFileKeys,
    description: z.string().optional(),
    columns: roleMap.optional(),
    /** Default J (set in auditSchema.ts, so that the definition, and the fingerprint, say so); for HDF5 files left out, and the `units` attribute of the Q column gives it when there is one (src/ingest/cumulants.ts). */
    energy_unit: z.enum(ENERGY_UNITS, { errorMap: energyUnitErrorMap(ENERGY_UNITS) }).optional(),
    reference_temperature: positive("kelvin").optional(),
    time_unit: z.enum(TIME_UNITS, { errorMap: () => ({ message: `must be one of ${TIME_UNITS.join(", ")}` }) }).default("s"),
    /** The hopping energy J (in energy_unit) that sets the time unit ħ/J of a lattice simulation. */
    hopping: positive("energy units").optional(),
    series: text().optional(),
  })
  .strict(); // hopping is required with time_unit hbar/J; checked by the loader (a discriminated union member must stay a plain object).

export type CumulantsDatasetConfig = z.output<typeof cumulantsDatasetSchema>;
