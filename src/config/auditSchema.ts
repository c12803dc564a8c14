import { z } from "zod";
import { CHECK_IDS } from "../checks/types.ts";
import { CHECKS } from "../checks/index.ts";
import { optionSchemasOf } from "../checks/options.ts";
import { nearest } from "./nearest.ts";
import { calendarDate, datasetId, slug, text } from "./common.ts";
import { doiSchema } from "./identifiers.ts";
import { ENERGY_UNITS, samplesDatasetSchema } from "./samplesSchema.ts";
import { mayStateUnits } from "./dataFileSchema.ts";
import { coefficientsDatasetSchema, undeclaredUnits } from "./coefficientsSchema.ts";
import { cumulantsDatasetSchema } from "./cumulantsSchema.ts";
import { traceDatasetSchema } from "./traceSchema.ts";
import { displaySchema } from "./displaySchema.ts";

const orcid = z
  .string({ invalid_type_error: "must be text" })
  .regex(/^\d{4}-\d{4}-\d{4}-\d{3}[\dX]$/, "must be an ORCID iD such as 0000-0002-1825-0097");

export const authorSchema = z
  .object({ name: text("a person's name"), orcid: orcid.optional(), affiliation: text().optional() })
  .strict();

/** Bootstrap resamples: fewer than 200 leave a 95 % interval's ends to a handful of draws; more than 10^5 add nothing but time. */
export const MIN_RESAMPLES = 200;
export const MAX_RESAMPLES = 100_000;
/** Datasets in one audit: every one is read, and group checks compare them pairwise. */
export const MAX_DATASETS = 1000;

const SEED_EXPECTED = `must be auto (seeded from the data digest) or a whole number from 0 to ${Number.MAX_SAFE_INTEGER}`;

export const settingsSchema = z
  .object({
    alpha: z.number({ invalid_type_error: "must be a number in (0, 0.5)" }).gt(0, "must be in (0, 0.5)").lt(0.5, "must be in (0, 0.5)").default(0.01),
    margin: z.number({ invalid_type_error: "must be a number in (0, 1)" }).gt(0, "must be in (0, 1)").lt(1, "must be in (0, 1)").default(0.05),
    confidence: z.number({ invalid_type_error: "must be a number in (0.5, 1)" }).gt(0.5, "must be in (0.5, 1)").lt(1, "must be in (0.5, 1)").default(0.95),
    seed: z
      // Above 2^53 − 1 neighbouring integers share a double, so two seeds would give one stream.
      .union([z.literal("auto"), z.number().int(SEED_EXPECTED).nonnegative(SEED_EXPECTED).max(Number.MAX_SAFE_INTEGER, SEED_EXPECTED)], {
        errorMap: () => ({ message: SEED_EXPECTED }),
      })
      .default("auto"),
    resamples: z
      .number({ invalid_type_error: `must be a whole number from ${MIN_RESAMPLES} to ${MAX_RESAMPLES}` })
      .int(`must be a whole number from ${MIN_RESAMPLES} to ${MAX_RESAMPLES}`)
      .min(MIN_RESAMPLES, `must be a whole number from ${MIN_RESAMPLES} to ${MAX_RESAMPLES}`)
      .max(MAX_RESAMPLES, `must be a whole number from ${MIN_RESAMPLES} to ${MAX_RESAMPLES} (each resample re-weighs every row or cell)`)
      .default(2000),
  })
  .strict()
  .default({});

export const datasetSchema = z.discriminatedUnion("kind", [samplesDatasetSchema, coefficientsDatasetSchema, cumulantsDatasetSchema, traceDatasetSchema], {
  errorMap: (issue, ctx) =>
    issue.code === "invalid_union_discriminator"
      ? { message: "kind must be one of samples, coefficients, cumulants, trace" }
      : { message: ctx.defaultError },
});

/** One entry of `checks:` — `reciprocity` or `reciprocity: { margin: 0.1 }`. */
const checkEntry = z.union(
  [z.string(), z.record(z.string(), z.record(z.string(), z.unknown()).nullable()).refine((r) => Object.keys(r).length === 1, "must name exactly one check")],
  { errorMap: () => ({ message: "must be a check id, or a map from one check id to its options" }) },
);

export const auditSchema = z
  .object({
    id: slug,
    title: text(),
    authors: z.array(authorSchema).min(1, "must list at least one author"),
    license: text("an SPDX licence identifier such as CC-BY-4.0").optional(),
    description: z.string({ invalid_type_error: "must be Markdown text" }).optional(),
    device: text().optional(),
    date: calendarDate.optional(),
    doi: doiSchema.optional(),
    keywords: z.array(text()).optional(),
    settings: settingsSchema,
    display: displaySchema.optional(),
    datasets: z
      .array(datasetSchema)
      .min(1, "must list at least one dataset")
      .max(MAX_DATASETS, `must list at most ${MAX_DATASETS} datasets; split a larger study into several audits`),
    checks: z.union([z.literal("all"), z.array(checkEntry)], {
      errorMap: () => ({ message: "must be all, or a list of check ids" }),
    }).default("all"),
  })
  .strict()
  .superRefine((audit, ctx) => {
    const seen = new Map<string, number>();
    audit.datasets.forEach((d, i) => {
      const unitsProblem = d.kind === "coefficients" ? undeclaredUnits(d) : null;
      if (unitsProblem) ctx.addIssue({ code: "custom", path: ["datasets", i, "units"], message: unitsProblem, params: { quoteFound: false } });
      if (d.kind === "samples" && d.energy_unit === undefined && !mayStateUnits(d)) {
        ctx.addIssue({ code: "custom", path: ["datasets", i, "energy_unit"], message: `is missing; must be one of ${ENERGY_UNITS.join(", ")}`, params: { quoteFound: false } });
      }
      const first = seen.get(d.id);
      if (first !== undefined) {
        ctx.addIssue({ code: "custom", path: ["datasets", i, "id"], message: `duplicates the id of datasets[${first}]` });
      } else seen.set(d.id, i);
    });
    // Unknown check ids are refused here, with their line, rather than after the data were read.
    if (audit.checks === "all") return;
    audit.checks.forEach((entry, i) => {
      const id = typeof entry === "string" ? entry : Object.keys(entry)[0];
      if (!(CHECK_IDS as readonly string[]).includes(id)) {
        const hint = nearest(id, CHECK_IDS) ?? "";
        const known = `${hint ? ` (did you mean ${hint}?)` : ""}: one of ${CHECK_IDS.join(", ")}`;
        if (typeof entry === "string") ctx.addIssue({ code: "custom", path: ["checks", i], message: `must be a check id${known}` });
        // A map's key is the id; its value (the options) is not what is wrong, so it is not quoted.
        else ctx.addIssue({ code: "custom", path: ["checks", i, id], message: `is not a check id${known}`, params: { quoteFound: false } });
        return;
      }
      if (typeof entry !== "string") checkOptionsIssues(audit, id, entry[id] ?? {}, ["checks", i, id], ctx);
    });
  })
  // A cumulants table's energy_unit defaults to J, as before, except for HDF5 files, whose units attribute may give it.
  .transform((audit) => ({
    ...audit,
    datasets: audit.datasets.map((d) => (d.kind === "cumulants" && d.energy_unit === undefined && !mayStateUnits(d) ? { ...d, energy_unit: "J" as const } : d)),
  }));

/** Names `datasets:` of a check may use: dataset ids and the sweep and series groups they form. */
function datasetNames(audit: { datasets: { id: string; sweep?: string; series?: string }[] }): string[] {
  const names = new Set<string>();
  for (const d of audit.datasets) {
    names.add(d.id);
    if (d.sweep) names.add(d.sweep);
    if (d.series) names.add(d.series);
  }
  return [...names];
}

/**
 * A check's options against the schemas its module declares (src/checks/options.ts): unknown keys are
 * refused with the valid ones, wrong values with what is expected, and `datasets` must name datasets,
 * sweeps or series of this audit.
 */
function checkOptionsIssues(
  audit: { datasets: { id: string; sweep?: string; series?: string }[] },
  id: string,
  options: Record<string, unknown>,
  path: (string | number)[],
  ctx: z.RefinementCtx,
): void {
  const schemas = optionSchemasOf(CHECKS.find((c) => c.id === id)?.options);
  const valid = Object.keys(schemas);
  for (const [key, value] of Object.entries(options)) {
    const schema = schemas[key];
    if (!schema) {
      const hint = nearest(key, valid);
      ctx.addIssue({ code: "custom", path: [...path, key], message: `is not an option of ${id}${hint ? ` (did you mean ${hint}?)` : ""}; valid keys: ${valid.join(", ")}`, params: { quoteFound: false } });
      continue;
    }
    const parsed = schema.safeParse(value);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) ctx.addIssue({ code: "custom", path: [...path, key, ...issue.path], message: issue.message });
      continue;
    }
    if (key !== "datasets") continue;
    const names = datasetNames(audit);
    (value as string[]).forEach((name, k) => {
      if (names.includes(name)) return;
      const hint = nearest(name, names);
      ctx.addIssue({ code: "custom", path: [...path, key, k], message: `is not a dataset id, sweep or series of this audit${hint ? ` (did you mean ${hint}?)` : ""}: one of ${names.join(", ")}` });
    });
  }
}

export { datasetId };
export type AuditDefinitionInput = z.input<typeof auditSchema>;
