import { z } from "zod";
import { datasetId, finite, positive, relativeFile, text } from "./common.ts";
import { ENERGY_UNITS, reservoirSchema, stateDistributionSchema } from "./samplesSchema.ts";

/**
 * A `trace` dataset: the conductor's state against time, from which windows of
 * several lengths are cut. Either the detected transitions (`signal:
 * transitions`, columns time and state: the state after each jump, the first
 * row the state at the start) or a sampled detector signal (`signal: level`,
 * columns time and level) turned into transitions by two thresholds with
 * hysteresis. `transitions` maps each jump (from → to) to what each lead gains.
 */
export const TIME_UNITS = ["s", "ms", "us", "µs", "ns", "ps"] as const;


const stateLabel = z.number({ required_error: "is required", invalid_type_error: "must be an integer state label" }).int("must be an integer state label");

/**
 * What one jump moves into each lead (absent amounts are zero), or `lead: unresolved`: the jump moves a
 * particle between the conductor and a lead, but the detector cannot tell which lead (a charge sensor beside
 * a single dot sees the occupation change, not the side it came from). No amounts may be given then: the
 * tool does not guess them.
 */
const transitionSchema = z
  .object({
    from: stateLabel,
    to: stateLabel,
    lead: z.literal("unresolved", { errorMap: () => ({ message: "must be unresolved (the detector cannot tell which lead the particle used), or left out" }) }).optional(),
    dN_A: finite("particles").optional(),
    dN_B: finite("particles").optional(),
    dE_A: finite("energy units").optional(),
    dE_B: finite("energy units").optional(),
  })
  .strict()
  .superRefine((t, ctx) => {
    if (t.lead !== "unresolved") return;
    for (const key of ["dN_A", "dN_B", "dE_A", "dE_B"] as const) {
      if (t[key] !== undefined) {
        ctx.addIssue({ code: "custom", path: [key], message: "must not be given with lead: unresolved (which lead gains it is what the trace does not show); remove it, or remove lead: unresolved" });
      }
    }
  })
  // A jump whose lead is declared moves nothing it does not list (the normalised definition, and so the
  // fingerprint, reads as before lead: unresolved existed); one whose lead is unresolved carries no amounts.
  .transform((t) => (t.lead === "unresolved" ? t : { ...t, dN_A: t.dN_A ?? 0, dN_B: t.dN_B ?? 0, dE_A: t.dE_A ?? 0, dE_B: t.dE_B ?? 0 }));

const thresholdsSchema = z
  .object({
    low: finite("signal units"),
    high: finite("signal units"),
    /** The state below `low` and the state above `high`. */
    states: z.tuple([stateLabel, stateLabel], { errorMap: () => ({ message: "must list two state labels: the state below low, then the state above high" }) }),
  })
  .strict()
  .refine((t) => t.high > t.low, { message: "high must be above low (the band between them is the hysteresis)" });

export const traceDatasetSchema = z
  .object({
    id: datasetId,
    kind: z.literal("trace"),
    file: relativeFile,
    description: z.string().optional(),
    signal: z.enum(["transitions", "level"], { errorMap: () => ({ message: "must be transitions (time, state after each jump) or level (a sampled detector signal)" }) }),
    columns: z.object({ time: text("a column name"), state: text("a column name").optional(), level: text("a column name").optional() }).strict(),
    time_unit: z.enum(TIME_UNITS, { errorMap: () => ({ message: `must be one of ${TIME_UNITS.join(", ")}` }) }),
    /** Window lengths in time_unit; required unless a transition's lead is unresolved (then nothing per window is known). */
    windows: z.array(positive("time units")).min(1, "must list at least one window length").optional(),
    thresholds: thresholdsSchema.optional(),
    /** Detector bandwidth in Hz: dwell times shorter than 1/bandwidth are at risk of being missed. */
    bandwidth: positive("hertz").optional(),
    energy_unit: z.enum(ENERGY_UNITS, { errorMap: () => ({ message: `must be one of ${ENERGY_UNITS.join(", ")}` }) }),
    reference_temperature: positive("kelvin").optional(),
    reservoirs: z.object({ A: reservoirSchema, B: reservoirSchema }).strict(),
    transitions: z.array(transitionSchema).min(1, "must map at least one transition"),
    state_distribution: stateDistributionSchema.optional(),
    series: text().optional(),
  })
  .strict();

export type TraceDatasetConfig = z.output<typeof traceDatasetSchema>;
