import fs from "node:fs";
import path from "node:path";
import { loadAuditDefinition } from "../../src/config/loadAudit.ts";
import { loadSamples, type SamplesReadOptions } from "../../src/ingest/samples.ts";
import type { SamplesDatasetConfig } from "../../src/config/types.ts";
import type { SamplesDataset } from "../../src/ingest/types.ts";
import { tempAudit } from "./tempAudit.ts";

/**
 * Load one `samples` dataset "runs" from data/<file>, written by `write`, with the dataset keys
 * `keys` (columns, units, reservoirs, work: one YAML line each, indented by the caller's text),
 * through loadSamples with `options` (reduceAboveBytes, threads), as the audit's ingestion does.
 */
export async function loadSamplesFile(
  file: string,
  write: (target: string) => Promise<void> | void,
  keys: string[],
  options: SamplesReadOptions = {},
): Promise<SamplesDataset> {
  const dir = tempAudit(
    ["id: samples-file", "title: One samples file", "authors: [{ name: \"Test Author\" }]", "datasets:", "  - id: runs", "    kind: samples", `    file: data/${file}`, ...keys.map((k) => `    ${k}`), ""].join("\n"),
  );
  fs.mkdirSync(path.join(dir, "data"));
  const target = path.join(dir, "data", file);
  await write(target);
  const config = loadAuditDefinition(dir).datasets[0] as SamplesDatasetConfig;
  return loadSamples(config, target, "datasets[0]", { auditDir: dir, ...options });
}
