import { z } from "zod";
import { CHECK_IDS } from "../checks/types.ts";
import { nearest } from "./nearest.ts";
import { datasetId, slug, text } from "./common.ts";
import { samplesDatasetSchema } from "./samplesSchema.ts";
import { coefficientsDatasetSchema } from "./coefficientsSchema.ts";
import { cumulantsDatasetSchema } from "./cumulantsSchema.ts";
import { traceDatasetSchema } from "./traceSchema.ts";

const orcid = z
  .string({ invalid_type_error: "must be text" })
  .regex(/^\d{4}-\d{4}-\d{4}-\d{3}[\dX]$/, "must be an ORCID iD such as 0000-0002-1825-0097");

export const authorSchema = z
  .object({ name: text("a person's name"), orcid: orcid.optional(), affiliation: text().optional() })
  .strict();

export const settingsSchema = z
  .object({
    alpha: z.number({ invalid_type_error: "must be a number in (0, 0.5)" }).gt(0, "must be in (0, 0.5)").lt(0.5, "must be in (0, 0.5)").default(0.01),
    margin: z.number({ invalid_type_error: "must be a positive number" }).positive("must be a positive number").default(0.05),
    confidence: z.number({ invalid_type_error: "must be a number in (0.5, 1)" }).gt(0.5, "must be in (0.5, 1)").lt(1, "must be in (0.5, 1)").default(0.95),
    seed: z
      .union([z.literal("auto"), z.number().int().nonnegative()], {
        errorMap: () => ({ message: "must be auto (seeded from the data digest) or a non-negative integer" }),
      })
      .default("auto"),
    resamples: z.number({ invalid_type_error: "must be an integer" }).int("must be an integer").min(200, "must be at least 200").default(2000),
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
    date: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "must be a date written YYYY-MM-DD").optional(),
    doi: z.string().regex(/^10\.\d{4,9}\/\S+$/, "must be a DOI such as 10.5281/zenodo.1234567").optional(),
    keywords: z.array(text()).optional(),
    settings: settingsSchema,
    datasets: z.array(datasetSchema).min(1, "must list at least one dataset"),
    checks: z.union([z.literal("all"), z.array(checkEntry)], {
      errorMap: () => ({ message: "must be all, or a list of check ids" }),
    }).default("all"),
  })
  .strict()
  .superRefine((audit, ctx) => {
    const seen = new Map<string, number>();
    audit.datasets.forEach((d, i) => {
      const first = seen.get(d.id);
      if (first !== undefined) {
        ctx.addIssue({ code: "custom", path: ["datasets", i, "id"], message: `duplicates the id of datasets[${first}]` });
      } else seen.set(d.id, i);
    });
    // Unknown check ids are refused here, with their line, rather than after the data were read.
    if (audit.checks === "all") return;
    audit.checks.forEach((entry, i) => {
      const id = typeof entry === "string" ? entry : Object.keys(entry)[0];
      if ((CHECK_IDS as readonly string[]).includes(id)) return;
      const hint = nearest(id, CHECK_IDS) ?? "";
      const known = `${hint ? ` (did you mean ${hint}?)` : ""}: one of ${CHECK_IDS.join(", ")}`;
      if (typeof entry === "string") ctx.addIssue({ code: "custom", path: ["checks", i], message: `must be a check id${known}` });
      // A map's key is the id; its value (the options) is not what is wrong, so it is not quoted.
      else ctx.addIssue({ code: "custom", path: ["checks", i, id], message: `is not a check id${known}`, params: { quoteFound: false } });
    });
  });

export { datasetId };
export type AuditDefinitionInput = z.input<typeof auditSchema>;
