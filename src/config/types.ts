import type { z } from "zod";
import type { auditSchema, authorSchema, settingsSchema } from "./auditSchema.ts";
import type { SamplesDatasetConfig } from "./samplesSchema.ts";
import type { CoefficientsDatasetConfig } from "./coefficientsSchema.ts";
import type { CumulantsDatasetConfig } from "./cumulantsSchema.ts";
import type { TraceDatasetConfig } from "./traceSchema.ts";

export type AuditDefinition = z.output<typeof auditSchema>;
export type Author = z.output<typeof authorSchema>;
export type Settings = z.output<typeof settingsSchema>;
export type DatasetConfig = SamplesDatasetConfig | CoefficientsDatasetConfig | CumulantsDatasetConfig | TraceDatasetConfig;
export type { SamplesDatasetConfig, CoefficientsDatasetConfig, CumulantsDatasetConfig, TraceDatasetConfig };
