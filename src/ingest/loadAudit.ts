import path from "node:path";
import { loadAuditDefinition } from "../config/loadAudit.ts";
import { confinePath } from "../config/confinePath.ts";
import type { AuditDefinition, DatasetConfig } from "../config/types.ts";
import { loadSamples } from "./samples.ts";
import { loadCoefficients } from "./coefficients.ts";
import { loadCumulants } from "./cumulants.ts";
import { loadTrace } from "./trace/loadTrace.ts";
import type { TableReader } from "./readCsv.ts";
import { layoutSettings } from "./sources/layoutSettings.ts";
import { readSourceTable } from "./sources/readSourceTable.ts";
import { writtenCellTexts } from "./cellTexts.ts";
import type { Dataset, IngestedAudit } from "./types.ts";

export interface IngestOptions {
  /** Bytes (rows for Parquet) of a data file processed so far, and its total: for progress displays. */
  onProgress?: (file: string, done: number, total: number) => void;
}

/** Whole columns of a dataset's file through the source of its format; the format is kept for the record. */
function sourceReader(dir: string, config: DatasetConfig, filePath: string, keyPath: string, format: { value: string | null }): TableReader {
  return async (requests) => {
    const request = { filePath, label: config.file, auditDir: dir, keyPath, columns: requests, settings: layoutSettings(config as Parameters<typeof layoutSettings>[0]) };
    const table = await readSourceTable(request);
    format.value = table.format;
    return table.located === "line" ? { ...table, cellTexts: (problems) => writtenCellTexts(request, problems) } : table;
  };
}

/** Read every dataset an audit definition names, in order. */
export async function ingestDefinition(dir: string, definition: AuditDefinition, options: IngestOptions = {}): Promise<IngestedAudit> {
  const datasets: Dataset[] = [];
  for (const [i, config] of definition.datasets.entries()) {
    const keyPath = `datasets[${i}]`;
    const filePath = confinePath(dir, config.file, `${keyPath}.file`);
    const format = { value: null as string | null };
    switch (config.kind) {
      case "samples":
        datasets.push(
          await loadSamples(config, filePath, keyPath, { auditDir: dir, onBytes: options.onProgress && ((done, total) => options.onProgress!(config.file, done, total)) }),
        );
        break;
      case "coefficients":
        datasets.push({ ...(await loadCoefficients(config, filePath, keyPath, sourceReader(dir, config, filePath, keyPath, format))), format: format.value! });
        break;
      case "cumulants":
        datasets.push(await loadCumulants(config, filePath, keyPath, sourceReader(dir, config, filePath, keyPath, format)).then((d) => ({ format: format.value!, ...d })));
        break;
      case "trace":
        datasets.push(...(await loadTrace(config, filePath, keyPath, dir)));
        break;
    }
  }
  return { dir: path.resolve(dir), definition, datasets };
}

/** audit folder → validated definition → typed datasets with digests. */
export async function ingestAudit(dir: string, options: IngestOptions = {}): Promise<IngestedAudit> {
  return ingestDefinition(dir, loadAuditDefinition(dir), options);
}
