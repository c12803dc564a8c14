import { ConfigError, DataError } from "../errors.ts";
import type { SamplesDatasetConfig } from "../config/types.ts";
import { joulesPerEnergyUnit, type EnergyUnit } from "../physics/energyUnits.ts";
import { affinities, reservoirFromBeta, reservoirFromTemperature, type ReservoirState } from "../physics/affinities.ts";
import { entropyProduction } from "../physics/entropyProduction.ts";
import { readNumericCsv, type ColumnRequest } from "./readCsv.ts";
import type { SamplesDataset } from "./types.ts";

function scaled(values: Float64Array | undefined, factor: number): Float64Array | null {
  if (!values) return null;
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) out[i] = values[i] * factor;
  return out;
}

function reservoirState(r: SamplesDatasetConfig["reservoirs"]["A"], joules: number): ReservoirState {
  const mu = r.mu * joules;
  // beta is given per declared energy unit; convert to 1/J.
  return r.T !== undefined ? reservoirFromTemperature(r.T, mu) : reservoirFromBeta(r.beta! / joules, mu);
}

/**
 * Ingest a `samples` dataset: map roles to columns, convert energies to J,
 * derive W and Q from dE_A, dE_B where given, and compute the entropy
 * production of every realisation.
 */
export async function loadSamples(config: SamplesDatasetConfig, filePath: string, keyPath: string): Promise<SamplesDataset> {
  const where = `audit.yaml ${keyPath}`;
  const roles = config.columns as Partial<Record<string, string>>;
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

  const requests: ColumnRequest[] = Object.entries(roles).map(([role, column]) => ({ role, column: column! }));
  const table = await readNumericCsv(filePath, config.file, requests);
  const col = (role: string) => (roles[role] ? table.columns.get(roles[role]!) : undefined);

  const rows = table.rows;
  const dE_A = scaled(col("dE_A"), joules);
  const dE_B = scaled(col("dE_B"), joules);
  let Q = scaled(col("Q"), joules);
  if (!Q) {
    Q = new Float64Array(rows);
    for (let i = 0; i < rows; i++) Q[i] = (dE_B![i] - dE_A![i]) / 2;
  }
  let W_data = scaled(col("W"), joules);
  if (!W_data && dE_A && dE_B) {
    W_data = new Float64Array(rows);
    for (let i = 0; i < rows; i++) W_data[i] = dE_A[i] + dE_B[i];
  }
  const W = config.work === "zero" ? new Float64Array(rows) : W_data!;
  const dNraw = col("dN");
  const dN = dNraw ? Float64Array.from(dNraw) : new Float64Array(rows);

  let weight: Float64Array | null = null;
  let realisations = rows;
  const counts = col("count");
  if (counts) {
    const bad: string[] = [];
    realisations = 0;
    for (let i = 0; i < rows; i++) {
      const c = counts[i];
      if (c < 0 || !Number.isInteger(c)) {
        if (bad.length < 20) bad.push(`${config.file}:${table.lineOfRow[i]}, column "${roles.count}": expected a count (a whole number ≥ 0), found ${c}`);
      }
      realisations += c;
    }
    if (bad.length) throw new DataError(bad.join("\n"));
    if (realisations === 0) throw new DataError(`${config.file}: every count in column "${roles.count}" is zero; there are no realisations`);
    weight = Float64Array.from(counts);
  }

  const A = reservoirState(config.reservoirs.A, joules);
  const B = reservoirState(config.reservoirs.B, joules);
  const affinity = affinities(A, B);
  const sigma = entropyProduction(affinity, W, Q, dN);

  return {
    kind: "samples",
    id: config.id,
    file: config.file,
    sha256: table.sha256,
    rows,
    config,
    W,
    W_data,
    Q,
    dN,
    dE_A,
    dE_B,
    weight,
    realisations,
    sigma,
    reservoirs: { A, B },
    affinity,
    energyUnit: { name: config.energy_unit, joules },
    hasParticleColumn: dNraw !== undefined,
    tau: config.tau ?? null,
  };
}
