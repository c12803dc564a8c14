import { z } from "zod";
import { energyUnitErrorMap } from "./energyUnitMessage.ts";
import { datasetId, finite, positive, relativeFile, text } from "./common.ts";

export const SAMPLE_ROLES = ["dE_A", "dE_B", "Q", "dN", "W", "count"] as const;
export type SampleRole = (typeof SAMPLE_ROLES)[number];

export const ENERGY_UNITS = ["J", "eV", "meV", "ueV", "µeV", "kT"] as const;

/** A reservoir is given by its temperature (K) or its inverse temperature (1/energy_unit). */
const reservoirSchema = z
  .object({
    T: positive("kelvin").optional(),
    beta: positive("inverse energy units").optional(),
    mu: finite("energy units").default(0),
  })
  .strict()
  .refine((r) => (r.T === undefined) !== (r.beta === undefined), {
    message: "must give exactly one of T (kelvin) or beta (per energy unit)",
  });

const roleMap = z
  .record(z.string(), text("a CSV column name"))
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
    description: z.string().optional(),
    columns: roleMap,
    energy_unit: z.enum(ENERGY_UNITS, { errorMap: energyUnitErrorMap(ENERGY_UNITS) }),
    reference_temperature: positive("kelvin").optional(),
    reservoirs: z.object({ A: reservoirSchema, B: reservoirSchema }).strict(),
    tau: positive("seconds").optional(),
    work: z.enum(["measured", "zero"], { errorMap: () => ({ message: "must be measured or zero" }) }),
    field: finite("tesla").optional(),
    sweep: text().optional(),
    series: text().optional(),
    expected: z.record(z.string(), z.unknown()).optional(),
  })
  .strict();

export type SamplesDatasetConfig = z.output<typeof samplesDatasetSchema>;
