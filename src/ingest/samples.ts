import fs from "node:fs";
import path from "node:path";
import { ConfigError, DataError, newProblemLog } from "../errors.ts";
import type { SamplesDatasetConfig } from "../config/types.ts";
import { joulesPerEnergyUnit, type EnergyUnit } from "../physics/energyUnits.ts";
import { affinities, reservoirFromBeta, reservoirFromTemperature, type ReservoirState } from "../physics/affinities.ts";
import { conductorStates } from "./conductorStates.ts";
import { entropyProduction } from "../physics/entropyProduction.ts";
import type { ReducedFields, ReduceInput } from "./reduce/reduceSamples.ts";
import { readSamplesSource, type SamplesReadOptions, type SamplesRows } from "./reduce/samplesSource.ts";
import { listParts } from "./sources/parts.ts";
import { isSummaryPath } from "./sources/summary/summarySource.ts";
import { withStatedEnergyUnit } from "./sources/fileEnergyUnit.ts";
import type { SourceRequest } from "./sources/types.ts";
import { writtenCellTexts } from "./cellTexts.ts";
import { confinePath } from "../config/confinePath.ts";
import { layoutSettings } from "./sources/layoutSettings.ts";
import { conductorRowsOf, formatRowProblems, logSigmaOutOfRange, RowProblemsError, sampleRowsOf, subtractHeldParticles, type SampleRole, type SampleRoles } from "./samplesRows.ts";
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
  const auditDir = options.auditDir ?? path.dirname(filePath);
  const parts = listParts(auditDir, config.file, keyPath);
  const request = (file: string, label: string) => ({ filePath: file, label, auditDir, keyPath, columns: columnWants(config), settings: layoutSettings(config) });
  const requests = parts ? parts.map((p) => request(confinePath(auditDir, p, `${keyPath}.file`), p)) : [request(filePath, config.file)];
  // Without energy_unit (HDF5 only), the files' units attributes state it.
  const unit = await withStatedEnergyUnit(config, requests.filter((r) => !isSummaryPath(r.filePath)), keyPath);
  config = unit.config;
  const { where, roles, base, input } = samplesPlan(config, keyPath);
  const partBytes = parts ? requests.map((r) => fs.statSync(r.filePath).size) : undefined;
  // A summary file (`summarise`) holds cells without the conductor's states; parts read from their rows keep them.
  if (conductorHeld(roles) && requests.some((r) => isSummaryPath(r.filePath))) {
    throw new ConfigError(
      `${where}.columns: ${config.file} names summaries of cells (.summary), which do not keep the conductor's states or per-lead particle counts (state_start, state_end, dN_A, dN_B); name the raw parts instead`,
    );
  }
  const exact = (part: ReduceInput, rows: RawSamples) => exactFields(part, rows, rows.located);
  const { fields, format } = await readSamplesSource(requests, input, exact, { ...options, partBytes, configurationGrid: parts !== null }).catch(async (err: unknown) => {
    throw await withCellsAsWritten(err, requests);
  });
  const stated = `${parts ? `${parts.length} part(s) of ${format}` : format}${unit.statement ? `; ${unit.statement}` : ""}`;
  const finished = withConductorStates(fields, { declared: config.state_distribution, file: config.file, where, startColumn: String(roles.state_start) });
  return { kind: "samples" as const, id: config.id, file: config.file, format: stated, ...base, ...finished };
}

/**
 * What reading a samples dataset needs before its rows, from its
 * configuration alone: the roles checked, units, reservoirs and affinities,
 * the columns to request and the layout keys. `summarise` builds a part's
 * grid from it too.
 */
export function samplesPlan(config: SamplesDatasetConfig, keyPath: string) {
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
  checkStateRoles(roles, config, where);
  const { base, A, B, joules, affinity } = samplesHead(config, where);
  const columns = columnWants(config);
  const settings = layoutSettings(config);
  const input = { label: config.file, dataset: config.id, joules, affinity, workZero: config.work === "zero", meanBetaMu: meanBetaMuOf(A, B) };
  return { where, roles, base, A, B, input, columns, settings, conductorHeld: conductorHeld(roles) };
}

/** Columns in the order audit.yaml maps them (messages list problems in that order). */
export function columnWants(config: SamplesDatasetConfig): { role: string; column: string | number }[] {
  return Object.entries(config.columns as Record<string, string | number>).map(([role, column]) => ({ role, column }));
}

/**
 * A text file's row problems worded again with each cell as the file writes it (read again, on
 * this error path only); any other error, or a file that cannot be read again, as it was.
 */
async function withCellsAsWritten(err: unknown, requests: SourceRequest[]): Promise<unknown> {
  if (!(err instanceof RowProblemsError) || err.located !== "line") return err;
  const request = requests.find((r) => r.label === err.label);
  if (!request) return err;
  try {
    await writtenCellTexts(request, err.log.problems);
  } catch {
    return err;
  }
  return new DataError(formatRowProblems(err.label, err.log, "line"));
}

/** Raw columns of a whole file (declared units), with each row's line (text) or 1-based row number (binary). */
type RawSamples = SamplesRows;

/** (β_Aμ_A + β_Bμ_B)/2: what each particle the leads gained together adds to −Σ_res (physics.md §4b). */
function meanBetaMuOf(A: ReservoirState, B: ReservoirState): number {
  return (A.beta * A.mu + B.beta * B.mu) / 2;
}

/** Whether the data describe a conductor that holds particles (state or per-lead particle columns). */
function conductorHeld(roles: SampleRoles): boolean {
  return roles.state_start !== undefined || roles.state_end !== undefined || roles.dN_A !== undefined || roles.dN_B !== undefined;
}

/** The state and per-lead particle roles go in pairs, and replace dN. */
function checkStateRoles(roles: SampleRoles, config: SamplesDatasetConfig, where: string): void {
  if ((roles.state_start === undefined) !== (roles.state_end === undefined)) {
    throw new ConfigError(`${where}.columns: state_start and state_end go together (the conductor's state at both ends of a realisation); found only ${roles.state_start ? "state_start" : "state_end"}`);
  }
  if ((roles.dN_A === undefined) !== (roles.dN_B === undefined)) {
    throw new ConfigError(`${where}.columns: dN_A and dN_B go together (particles gained by each lead); found only ${roles.dN_A ? "dN_A" : "dN_B"}`);
  }
  if (roles.dN_A !== undefined && roles.dN !== undefined) {
    throw new ConfigError(`${where}.columns: map either dN (particles gained by B, lost by A) or dN_A and dN_B (each lead's gain, when the conductor holds some), not both`);
  }
  if (config.state_distribution !== undefined && roles.state_start === undefined) {
    throw new ConfigError(`${where}.state_distribution: is declared, but columns map no state_start and state_end; map the conductor's states, or remove state_distribution`);
  }
}

/** Where the stationary distribution comes from, and the names messages use. */
interface StateSettings {
  declared: Record<string, number> | undefined;
  file: string;
  where: string;
  startColumn: string;
}

/**
 * The conductor's states of the whole dataset (every part, every row or cell): the stationary distribution
 * estimated from all start states (or declared), and Σ = Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) (Seifert,
 * PRL 95, 040602 (2005)). The rows' or cells' Σ_res come in `stateRows`; without states the fields are
 * returned as they are. Done once, after the parts are joined, so that p is that of the whole dataset.
 */
function withConductorStates(fields: ReducedFields, s: StateSettings): Omit<ReducedFields, "stateRows"> & Pick<SamplesDataset, "states"> {
  const { stateRows, ...rest } = fields;
  if (!stateRows) return { ...rest, states: null };
  const states = conductorStates({ ...stateRows, weight: fields.weight, ...s });
  const sigma = new Float64Array(states.boundary.length);
  for (let i = 0; i < sigma.length; i++) sigma[i] = stateRows.sigmaReservoirs[i] + states.boundary[i];
  return { ...rest, sigma, states };
}

/**
 * Every row kept as read: the dataset's arrays straight from the rows. With per-lead particle columns the
 * particle current is their symmetric split and Σ the reservoirs' part Σ_res; with states, the start and end
 * labels wait in `stateRows` for withConductorStates.
 */
function exactFields(input: ReduceInput, table: RawSamples, located: RawSamples["located"]): ReducedFields {
  const problems = newProblemLog();
  const rows = sampleRowsOf(table.raw, input.roles, input.joules, table.rows, table.lines, problems);
  const conductor = conductorRowsOf(table.raw, input.roles, table.rows, table.lines, problems);
  if (problems.count > 0) throw new RowProblemsError(input.label, problems, located);
  const W_data = rows.W_data;
  const W = input.workZero ? new Float64Array(table.rows) : W_data!;
  const realisations = rows.weight ? rows.weight.reduce((a, c) => a + c, 0) : table.rows;
  if (rows.weight && realisations === 0) throw new DataError(`${input.label}: every count in column "${input.roles.count}" is zero; there are no realisations`);
  const dN = conductor?.dN ?? rows.dN ?? new Float64Array(table.rows);
  const sigma = subtractHeldParticles(entropyProduction(input.affinity, W, rows.Q, dN), conductor?.held ?? null, input.meanBetaMu ?? 0);
  logSigmaOutOfRange(sigma, table.lines, input.roles.Q ?? input.roles.dE_B!, problems, input.dataset);
  if (problems.count > 0) throw new RowProblemsError(input.label, problems, located);
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
    leadParticles: conductor?.dN_A ? { A: conductor.dN_A, B: conductor.dN_B! } : null,
    stateRows: conductor?.start ? { start: conductor.start, end: conductor.end!, sigmaReservoirs: sigma } : null,
  };
}

/** Units, reservoirs and affinities of a samples dataset: what it needs before its rows. */
function samplesHead(config: SamplesDatasetConfig, where: string) {
  const unit = config.energy_unit;
  if (unit === undefined) throw new ConfigError(`${where}.energy_unit: is missing; give the unit of the energy columns`);
  const joules = joulesPerEnergyUnit(unit as EnergyUnit, config.reference_temperature, `${where}.energy_unit`);
  const A = reservoirState(config.reservoirs.A, joules);
  const B = reservoirState(config.reservoirs.B, joules);
  const affinity = affinities(A, B);
  const roles = config.columns as SampleRoles;
  const base = {
    config,
    reservoirs: { A, B },
    affinity,
    energyUnit: { name: unit, joules },
    hasParticleColumn: roles.dN !== undefined || roles.dN_A !== undefined,
    tau: config.tau ?? null,
  };
  return { base, A, B, joules, affinity };
}

/**
 * A samples dataset from columns already in hand (declared units), keyed by role: the per-window samples
 * a `trace` dataset builds. `lines` locate each row for messages; `sha256` is the source file's digest.
 */
export function samplesFromColumns(
  config: SamplesDatasetConfig,
  keyPath: string,
  raw: Partial<Record<SampleRole, Float64Array>>,
  rows: number,
  lines: ArrayLike<number>,
  sha256: string,
): SamplesDataset {
  const where = `audit.yaml ${keyPath}`;
  const roles = config.columns as SampleRoles;
  checkStateRoles(roles, config, where);
  const { base, A, B, joules, affinity } = samplesHead(config, where);
  const input: ReduceInput = { label: config.file, dataset: config.id, roles, joules, affinity, workZero: config.work === "zero", meanBetaMu: meanBetaMuOf(A, B) };
  const fields = exactFields(input, { raw, rows, lines, sha256, located: "row" }, "row");
  const finished = withConductorStates(fields, { declared: config.state_distribution, file: config.file, where, startColumn: String(roles.state_start) });
  return { kind: "samples" as const, id: config.id, file: config.file, format: "trace windows", ...base, ...finished };
}
