import fs from "node:fs";
import path from "node:path";
import { ConfigError, DataError, newProblemLog } from "../errors.ts";
import type { SamplesDatasetConfig } from "../config/types.ts";
import { joulesPerEnergyUnit, type EnergyUnit } from "../physics/energyUnits.ts";
import { affinities, reservoirFromBeta, reservoirFromTemperature, type ReservoirState } from "../physics/affinities.ts";
import { entropyProduction } from "../physics/entropyProduction.ts";
import type { ReducedFields, ReduceInput } from "./reduce/reduceSamples.ts";
import { readSamplesSource, type SamplesReadOptions, type SamplesRows } from "./reduce/samplesSource.ts";
import { listParts } from "./sources/parts.ts";
import { confinePath } from "../config/confinePath.ts";
import { layoutSettings } from "./sources/layoutSettings.ts";
import { formatRowProblems } from "./samplesRows.ts";
import { logSigmaOverflow, sampleRowsOf, type SampleRole, type SampleRoles } from "./samplesRows.ts";
import type { SamplesDataset } from "./types.ts";

function reservoirState(r: SamplesDatasetConfig["reservoirs"]["A"], joules: number): ReservoirState {
  const mu = r.mu * joules;
  // beta is given per declared energy unit; convert to 1/J.
  return r.T !== undefined ? reservoirFromTemperature(r.T, mu) : reservoirFromBeta(r.beta! / joules, mu);
}

export type { SamplesReadOptions } from "./reduce/samplesSource.ts";

/**
 * Ingest a `samples` dataset: map roles to columns, convert energies to J,
 * derive W and Q from dE_A, dE_B where given, and compute the entropy
 * production of every realisation.
 */
export async function loadSamples(
  config: SamplesDatasetConfig,
  filePath: string,
  keyPath: string,
  options: SamplesReadOptions & { auditDir?: string } = {},
): Promise<SamplesDataset> {
  const where = `audit.yaml ${keyPath}`;
  const roles = config.columns as SampleRoles & Partial<Record<string, string>>;
  const hasQ = roles.Q !== undefined;
  const hasBothE = roles.dE_A !== undefined && roles.dE_B !== undefined;
  if (!hasQ && !hasBothE) {
    throw new ConfigError(`${where}.columns: must map Q, or both dE_A and dE_B, to columns of ${config.file}`);
  }
  if ((roles.dE_A === undefined) !== (roles.dE_B === undefined)) {
    throw new ConfigError(`${where}.columns: dE_A and dE_B go together; found only ${roles.dE_A ? "dE_A" : "dE_B"}`);
  }
  if (config.work === "measured" && roles.W === undefined && !hasBothE) {
    throw new ConfigError(
      `${where}.work: is measured, but columns map neither W nor both dE_A and dE_B; map the work column, or declare work: zero if the protocol does none`,
    );
  }
  const joules = joulesPerEnergyUnit(config.energy_unit as EnergyUnit, config.reference_temperature, `${where}.energy_unit`);

  const A = reservoirState(config.reservoirs.A, joules);
  const B = reservoirState(config.reservoirs.B, joules);
  const affinity = affinities(A, B);
  const base = { config, reservoirs: { A, B }, affinity, energyUnit: { name: config.energy_unit, joules }, hasParticleColumn: roles.dN !== undefined, tau: config.tau ?? null };

  // Columns in the order audit.yaml maps them (messages list problems in that order).
  const columns = Object.entries(config.columns as Record<string, string | number>).map(([role, column]) => ({ role, column }));
  const auditDir = options.auditDir ?? path.dirname(filePath);
  const settings = layoutSettings(config);
  const parts = listParts(auditDir, config.file, keyPath);
  const request = (file: string, label: string) => ({ filePath: file, label, auditDir, keyPath, columns, settings });
  const requests = parts ? parts.map((p) => request(confinePath(auditDir, p, `${keyPath}.file`), p)) : [request(filePath, config.file)];
  const partBytes = parts ? requests.map((r) => fs.statSync(r.filePath).size) : undefined;
  const input = { label: config.file, joules, affinity, workZero: config.work === "zero" };
  const exact = (part: ReduceInput, rows: RawSamples) => exactFields(part, rows, rows.located);
  const { fields, format } = await readSamplesSource(requests, input, exact, { ...options, partBytes });
  const stated = parts ? `${parts.length} part(s) of ${format}` : format;
  return { kind: "samples" as const, id: config.id, file: config.file, format: stated, ...base, ...fields };
}

/** Raw columns of a whole file (declared units), with each row's line (text) or 1-based row number (binary). */
type RawSamples = SamplesRows;

/** Every row kept as read: the dataset's arrays straight from the rows. */
function exactFields(input: ReduceInput, table: RawSamples, located: "line" | "row"): ReducedFields {
  const problems = newProblemLog();
  const rows = sampleRowsOf(table.raw, input.roles, input.joules, table.rows, table.lines, problems);
  if (problems.count > 0) throw new DataError(formatRowProblems(input.label, problems, located));
  const W_data = rows.W_data;
  const W = input.workZero ? new Float64Array(table.rows) : W_data!;
  const dN = rows.dN ?? new Float64Array(table.rows);
  const realisations = rows.weight ? rows.weight.reduce((a, c) => a + c, 0) : table.rows;
  if (rows.weight && realisations === 0) throw new DataError(`${input.label}: every count in column "${input.roles.count}" is zero; there are no realisations`);
  const sigma = entropyProduction(input.affinity, W, rows.Q, dN);
  logSigmaOverflow(sigma, table.lines, input.roles.Q ?? input.roles.dE_B!, problems);
  if (problems.count > 0) throw new DataError(formatRowProblems(input.label, problems, located));
  return {
    sha256: table.sha256,
    rows: table.rows,
    W,
    W_data,
    Q: rows.Q,
    dN,
    dE_A: rows.dE_A,
    dE_B: rows.dE_B,
    weight: rows.weight,
    realisations,
    sigma,
    reduction: null,
  };
}

