import fs from "node:fs";
import path from "node:path";
import { ConfigError, DataError } from "../../../errors.ts";
import { loadAuditDefinition } from "../../../config/loadAudit.ts";
import type { SamplesDatasetConfig } from "../../../config/types.ts";
import { TOOL } from "../../../version.ts";
import { columnWants, samplesPlan } from "../../samples.ts";
import { layoutSettings } from "../layoutSettings.ts";
import { withStatedEnergyUnit } from "../fileEnergyUnit.ts";
import { configurationSpec, reducePart, rolesOfSource, type SamplesReadOptions } from "../../reduce/samplesSource.ts";
import { openSource } from "../index.ts";
import { listParts } from "../parts.ts";
import { isSummaryPath } from "./summarySource.ts";
import { SUMMARY_SUFFIX, writeSummary, type PartSummary } from "./summaryFile.ts";

/** What `summarise` is asked to do. */
export interface SummariseRequest {
  /** The part (a data file of any format the tool reads). */
  part: string;
  /** Where the summary goes; default `<part>.summary`. */
  out?: string;
  /** The audit folder whose audit.yaml gives the grid; default the nearest folder above the part that holds one. */
  audit?: string;
  /** The samples dataset the part belongs to; default the one whose `file:` lists the part, or the audit's only samples dataset. */
  dataset?: string;
}

/** The nearest folder at or above `from` that holds an audit.yaml, or null. */
export function auditFolderAbove(from: string): string | null {
  let dir = path.resolve(from);
  for (;;) {
    if (fs.existsSync(path.join(dir, "audit.yaml"))) return dir;
    const up = path.dirname(dir);
    if (up === dir) return null;
    dir = up;
  }
}

/** The samples dataset a part belongs to, and its index in audit.yaml. */
function chooseDataset(datasets: SamplesDatasetConfig[], indexOf: (d: SamplesDatasetConfig) => number, auditDir: string, part: string, wanted: string | undefined): SamplesDatasetConfig {
  const ids = datasets.map((d) => d.id).join(", ") || "none";
  if (wanted !== undefined) {
    const found = datasets.find((d) => d.id === wanted);
    if (!found) throw new ConfigError(`--dataset: audit.yaml in ${auditDir} has no samples dataset ${JSON.stringify(wanted)}; its samples datasets are ${ids}`);
    return found;
  }
  const relative = path.relative(auditDir, path.resolve(part)).split(path.sep).join("/");
  const listing = datasets.filter((d) => {
    try {
      const parts = listParts(auditDir, d.file, `datasets[${indexOf(d)}]`);
      return parts ? parts.includes(relative) : d.file === relative;
    } catch {
      return false; // a dataset whose parts are elsewhere (another machine) does not list this one
    }
  });
  if (listing.length === 1) return listing[0];
  if (listing.length === 0 && datasets.length === 1) return datasets[0];
  throw new ConfigError(`--dataset: name the samples dataset ${part} belongs to; audit.yaml in ${auditDir} has ${datasets.length > 0 ? `the samples datasets ${ids}` : "no samples dataset"}`);
}

/**
 * Summarise one part of a large `samples` dataset into the file `summarise`
 * writes: the part's cells on the grid the dataset's configuration alone
 * gives (configurationSpec), the same cells reading the raw part in an
 * audit gives, so that summaries and raw parts merge alike.
 */
export async function summarisePart(request: SummariseRequest, options: Pick<SamplesReadOptions, "onBytes" | "threads"> = {}): Promise<{ out: string; summary: PartSummary }> {
  const part = request.part;
  if (isSummaryPath(part)) throw new DataError(`${part}: is already a summary; summarise the raw part it came from`);
  if (!fs.existsSync(part) || !fs.statSync(part).isFile()) throw new DataError(`${part}: no such data file`);
  const out = request.out ?? `${part}${SUMMARY_SUFFIX}`;
  if (!isSummaryPath(out)) throw new ConfigError(`--out: ${JSON.stringify(out)} must end in ${SUMMARY_SUFFIX}, which is how an audit tells a summary from a raw part`);
  const auditDir = request.audit ?? auditFolderAbove(path.dirname(part));
  if (auditDir === null) throw new ConfigError(`${part}: no audit.yaml in its folder or above it; name the audit folder whose configuration gives the grid with --audit <folder>`);
  const definition = loadAuditDefinition(auditDir);
  const samples = definition.datasets.filter((d): d is SamplesDatasetConfig => d.kind === "samples");
  const chosen = chooseDataset(samples, (d) => definition.datasets.indexOf(d), auditDir, part, request.dataset);
  const keyPath = `datasets[${definition.datasets.indexOf(chosen)}]`;
  // The part may lie outside the audit folder (on the machine that produced it): it is confined to its own folder.
  const partDir = path.dirname(fs.realpathSync(part));
  const sourceRequest = { filePath: part, label: part, auditDir: partDir, keyPath, columns: columnWants(chosen), settings: layoutSettings(chosen) };
  const { config } = await withStatedEnergyUnit(chosen, [sourceRequest], keyPath);
  const plan = samplesPlan(config, keyPath);
  if (plan.conductorHeld) {
    throw new ConfigError(
      `audit.yaml ${keyPath}.columns: map the conductor's states or per-lead particle counts (state_start, state_end, dN_A, dN_B), which a summary of cells does not yet keep; give the windows as one histogram file with a count column`,
    );
  }
  const source = await openSource(sourceRequest);
  try {
    const { roles, wantOfRole } = rolesOfSource({ columns: plan.columns } as Parameters<typeof rolesOfSource>[0], source);
    const input = { ...plan.input, label: part, roles };
    const cells = await reducePart(input, source, wantOfRole, configurationSpec(input, wantOfRole), options);
    const summary: PartSummary = {
      tool: TOOL.version,
      dataset: config.id,
      source: { name: path.basename(part), bytes: source.byteSize, sha256: cells.sha256, format: source.format, located: source.located, names: source.names, available: source.available },
      spec: cells.spec,
      rows: cells.rows,
      pieces: cells.pieces,
      tables: cells.tables,
    };
    writeSummary(out, summary);
    return { out, summary };
  } finally {
    await source.close();
  }
}
