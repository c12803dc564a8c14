import { z } from "zod";
import { columnRef, dataFileKeys } from "./dataFileSchema.ts";
import { energyUnitErrorMap } from "./energyUnitMessage.ts";
import { datasetId, finite, positive, relativeFile, text } from "./common.ts";

export const SAMPLE_ROLES = ["dE_A", "dE_B", "Q", "dN", "W", "count", "dN_A", "dN_B", "state_start", "state_end"] as const;
export type SampleRole = (typeof SAMPLE_ROLES)[number];

export const ENERGY_UNITS = ["J", "eV", "meV", "ueV", "µeV", "kT"] as const;

/** A reservoir is given by its temperature (K) or its inverse temperature (1/energy_unit). */
export const reservoirSchema = z
  .object({
    T: positive("kelvin").optional(),
    beta: positive("inverse energy units").optional(),
    mu: finite("energy units").default(0),
  })
  .strict()
  .refine((r) => (r.T === undefined) !== (r.beta === undefined), {
    message: "must give exactly one of T (kelvin) or beta (per energy unit)",
  });

/**
 * The conductor's stationary distribution over its state labels, declared instead of estimated from the
 * start states: `{0: 0.3, 1: 0.7}`. Every probability positive, the total 1 (to 1e-9, rounding of printed decimals).
 */
export const stateDistributionSchema = z
  .record(z.string().regex(/^-?\d+$/, "must be an integer state label"), z.number({ invalid_type_error: "must be a probability in (0, 1]" }).gt(0, "must be a probability in (0, 1]").max(1, "must be a probability in (0, 1]"))
  .refine((m) => Object.keys(m).length > 0, "must give the probability of at least one state")
  .refine((m) => Math.abs(Object.values(m).reduce((a, b) => a + b, 0) - 1) <= 1e-9, {
    message: "must sum to 1 (the stationary probabilities of every state the data show)",
  });

const roleMap = z
  .record(z.string(), columnRef)
  .superRefine((m, ctx) => {
    for (const key of Object.keys(m)) {
      if (!(SAMPLE_ROLES as readonly string[]).includes(key)) {
        ctx.addIssue({ code: "custom", path: [key], message: `is not a role; roles are ${SAMPLE_ROLES.join(", ")}` });
      }
    }
  });

export const samplesDatasetSchema = z
  .object({
    id: datasetId,
    kind: z.literal("samples"),
    file: relativeFile,
    ...dataFileKeys,
    description: z.string().optional(),
    columns: roleMap,
    /** Optional only for HDF5 files, whose `units` attributes may state it (auditSchema.ts requires it otherwise). */
    energy_unit: z.enum(ENERGY_UNITS, { errorMap: energyUnitErrorMap(ENERGY_UNITS) }).optional(),
    reference_temperature: positive("kelvin").optional(),
    reservoirs: z.object({ A: reservoirSchema, B: reservoirSchema }).strict(),
    tau: positive("seconds").optional(),
    work: z.enum(["measured", "zero"], { errorMap: () => ({ message: "must be measured or zero" }) }),
    field: finite("tesla").optional(),
    sweep: text().optional(),
    series: text().optional(),
    expected: z.record(z.string(), z.unknown()).optional(),
    state_distribution: stateDistributionSchema.optional(),
  })
  .strict();

export type SamplesDatasetConfig = z.output<typeof samplesDatasetSchema>;
