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

const MAX_REPORTED = 20;

/**
 * Rows where a given column disagrees with the value derived from dE_A and dE_B
 * by more than the rounding of a printed number (1e-6 of the largest energy in
 * the row): redundant columns must tell the same story.
 */
function disagreements(
  given: Float64Array,
  derived: Float64Array,
  dE_A: Float64Array,
  dE_B: Float64Array,
  file: string,
  column: string,
  formula: string,
  lineOfRow: Uint32Array,
): string[] {
  const out: string[] = [];
  let total = 0;
  for (let i = 0; i < given.length; i++) {
    const scale = Math.max(Math.abs(dE_A[i]), Math.abs(dE_B[i]), Math.abs(given[i]));
    if (Math.abs(given[i] - derived[i]) > 1e-6 * scale) {
      total++;
      if (out.length < MAX_REPORTED) {
        out.push(`${file}:${lineOfRow[i]}, column "${column}": disagrees with ${formula} from the dE_A and dE_B columns of the same row; map either the column or the energy changes, or correct the row`);
      }
    }
  }
  if (total > MAX_REPORTED) out.push(`… and ${total - MAX_REPORTED} more row(s) in ${file}`);
  return out;
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
  let derivedQ: Float64Array | null = null;
  let derivedW: Float64Array | null = null;
  if (dE_A && dE_B) {
    // physics: W = dE_A + dE_B (switching work), Q = (dE_B − dE_A)/2 (symmetric split).
    derivedQ = new Float64Array(rows);
    derivedW = new Float64Array(rows);
    for (let i = 0; i < rows; i++) {
      derivedQ[i] = (dE_B[i] - dE_A[i]) / 2;
      derivedW[i] = dE_A[i] + dE_B[i];
    }
  }
  const givenQ = scaled(col("Q"), joules);
  const givenW = scaled(col("W"), joules);
  const problems: string[] = [];
  if (givenQ && derivedQ) problems.push(...disagreements(givenQ, derivedQ, dE_A!, dE_B!, config.file, roles.Q!, "(dE_B − dE_A)/2", table.lineOfRow));
  if (givenW && derivedW) problems.push(...disagreements(givenW, derivedW, dE_A!, dE_B!, config.file, roles.W!, "dE_A + dE_B", table.lineOfRow));
  if (problems.length) throw new DataError(problems.join("\n"));
  const Q = givenQ ?? derivedQ!;
  const W_data = givenW ?? derivedW;
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
        if (bad.length < MAX_REPORTED) bad.push(`${config.file}:${table.lineOfRow[i]}, column "${roles.count}": expected a count (a whole number ≥ 0), found ${c}`);
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
