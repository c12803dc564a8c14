import fs from "node:fs";
import path from "node:path";
import { ConfigError, DataError, newProblemLog, type ProblemLog } from "../errors.ts";
import type { SamplesDatasetConfig } from "../config/types.ts";
import { joulesPerEnergyUnit, type EnergyUnit } from "../physics/energyUnits.ts";
import { affinities, reservoirFromBeta, reservoirFromTemperature, type Affinities, type ReservoirState } from "../physics/affinities.ts";
import { conductorStates, stateLabels } from "./conductorStates.ts";
import { entropyProduction } from "../physics/entropyProduction.ts";
import { REDUCE_ABOVE_BYTES, type ReducedFields, type ReduceInput } from "./reduce/reduceSamples.ts";
import { readSamplesSource, type SamplesReadOptions, type SamplesRows } from "./reduce/samplesSource.ts";
import { listParts } from "./sources/parts.ts";
import type { SourceRequest } from "./sources/types.ts";
import { writtenCellTexts } from "./cellTexts.ts";
import { confinePath } from "../config/confinePath.ts";
import { layoutSettings } from "./sources/layoutSettings.ts";
import { formatRowProblems, logSigmaOutOfRange, RowProblemsError, sampleRowsOf, type SampleRole, type SampleRoles } from "./samplesRows.ts";
import type { ConductorStates, SamplesDataset } from "./types.ts";

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
  checkStateRoles(roles, config, where);
  const { base, A, B, joules, affinity } = samplesHead(config, where);

  // Columns in the order audit.yaml maps them (messages list problems in that order).
  const columns = Object.entries(config.columns as Record<string, string | number>).map(([role, column]) => ({ role, column }));
  const auditDir = options.auditDir ?? path.dirname(filePath);
  const settings = layoutSettings(config);
  const parts = listParts(auditDir, config.file, keyPath);
  const request = (file: string, label: string) => ({ filePath: file, label, auditDir, keyPath, columns, settings });
  const requests = parts ? parts.map((p) => request(confinePath(auditDir, p, `${keyPath}.file`), p)) : [request(filePath, config.file)];
  const partBytes = parts ? requests.map((r) => fs.statSync(r.filePath).size) : undefined;
  const input = { label: config.file, dataset: config.id, joules, affinity, workZero: config.work === "zero" };
  const conductor: ConductorInput = { roles, A, B, declared: config.state_distribution, file: config.file, where };
  if (conductorHeld(roles)) {
    const bytes = partBytes ? partBytes.reduce((a, b) => a + b, 0) : fileSize(filePath);
    const limit = options.reduceAboveBytes ?? REDUCE_ABOVE_BYTES;
    // Summarising into cells would pool realisations with different end states; several parts would be
    // concatenated without their states. Neither is supported yet.
    if (bytes > limit || parts) {
      throw new ConfigError(
        `${where}.columns: ${config.file} is ${parts ? "a multi-part dataset" : `larger than ${Math.round(limit / 2 ** 20)} MB and would be summarised while read`}, which does not yet keep the conductor's states or per-lead particle counts (state_start, state_end, dN_A, dN_B); give the windows as one histogram file with a count column`,
      );
    }
  }
  const exact = (part: ReduceInput, rows: RawSamples) => exactFields(part, rows, rows.located, conductorHeld(roles) ? conductor : undefined);
  const { fields, format } = await readSamplesSource(requests, input, exact, { ...options, partBytes }).catch(async (err: unknown) => {
    throw await withCellsAsWritten(err, requests);
  });
  const stated = parts ? `${parts.length} part(s) of ${format}` : format;
  return { kind: "samples" as const, id: config.id, file: config.file, format: stated, ...base, ...fields };
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

/** What the conductor-state roles need besides the rows. */
interface ConductorInput {
  roles: SampleRoles;
  A: ReservoirState;
  B: ReservoirState;
  declared: Record<string, number> | undefined;
  file: string;
  where: string;
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

/**
 * Per-lead particle counts and the conductor's states: the particle current becomes the symmetric split
 * (dN_B − dN_A)/2 (as Q is for energy), the particles the conductor keeps, −(dN_A + dN_B), add
 * −(β_Aμ_A + β_Bμ_B)/2 · (dN_A + dN_B) to Σ_res = Σ_X β_X (ΔE_X − μ_X ΔN_X) (physics.md §4b), and with
 * states Σ becomes Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) (Seifert, PRL 95, 040602 (2005)).
 */
function conductorFields(
  c: ConductorInput,
  raw: Partial<Record<SampleRole, Float64Array>>,
  table: RawSamples,
  affinity: Affinities,
  W: Float64Array,
  Q: Float64Array,
  weight: Float64Array | null,
  problems: ProblemLog,
): { dN: Float64Array | null; sigma: Float64Array | null; states: ConductorStates | null; leadParticles: { A: Float64Array; B: Float64Array } | null } {
  const n = table.rows;
  let dN: Float64Array | null = null;
  let held: Float64Array | null = null;
  if (raw.dN_A && raw.dN_B) {
    dN = new Float64Array(n);
    held = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      dN[i] = (raw.dN_B[i] - raw.dN_A[i]) / 2;
      held[i] = raw.dN_A[i] + raw.dN_B[i];
    }
  }
  if (raw.state_start && raw.state_end) {
    stateLabels(raw.state_start, n, table.lines, c.roles.state_start!, problems);
    stateLabels(raw.state_end, n, table.lines, c.roles.state_end!, problems);
  }
  const leadParticles = raw.dN_A && raw.dN_B ? { A: Float64Array.from(raw.dN_A.subarray(0, n)), B: Float64Array.from(raw.dN_B.subarray(0, n)) } : null;
  if (!held && !raw.state_start) return { dN: null, sigma: null, states: null, leadParticles };
  const sigmaRes = entropyProduction(affinity, W, Q, dN ?? Float64Array.from(raw.dN ?? new Float64Array(n)));
  if (held) {
    const meanBetaMu = (c.A.beta * c.A.mu + c.B.beta * c.B.mu) / 2;
    for (let i = 0; i < n; i++) sigmaRes[i] -= meanBetaMu * held[i];
  }
  if (!raw.state_start || problems.count > 0) return { dN, sigma: sigmaRes, states: null, leadParticles };
  const states = conductorStates({
    start: raw.state_start,
    end: raw.state_end!,
    weight,
    sigmaReservoirs: sigmaRes,
    declared: c.declared,
    file: c.file,
    where: c.where,
    startColumn: c.roles.state_start!,
  });
  const sigma = new Float64Array(n);
  for (let i = 0; i < n; i++) sigma[i] = sigmaRes[i] + states.boundary[i];
  return { dN, sigma, states, leadParticles };
}

/** Every row kept as read: the dataset's arrays straight from the rows. */
function exactFields(input: ReduceInput, table: RawSamples, located: RawSamples["located"], conductor?: ConductorInput): ReducedFields & Pick<SamplesDataset, "states" | "leadParticles"> {
  const problems = newProblemLog();
  const rows = sampleRowsOf(table.raw, input.roles, input.joules, table.rows, table.lines, problems);
  if (problems.count > 0) throw new RowProblemsError(input.label, problems, located);
  const W_data = rows.W_data;
  const W = input.workZero ? new Float64Array(table.rows) : W_data!;
  const realisations = rows.weight ? rows.weight.reduce((a, c) => a + c, 0) : table.rows;
  if (rows.weight && realisations === 0) throw new DataError(`${input.label}: every count in column "${input.roles.count}" is zero; there are no realisations`);
  const held = conductor ? conductorFields(conductor, table.raw, table, input.affinity, W, rows.Q, rows.weight, problems) : { dN: null, sigma: null, states: null, leadParticles: null };
  if (problems.count > 0) throw new RowProblemsError(input.label, problems, located);
  const dN = held.dN ?? rows.dN ?? new Float64Array(table.rows);
  const sigma = held.sigma ?? entropyProduction(input.affinity, W, rows.Q, dN);
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
    states: held.states,
    leadParticles: held.leadParticles,
  };
}



/** Units, reservoirs and affinities of a samples dataset: what it needs before its rows. */
function samplesHead(config: SamplesDatasetConfig, where: string) {
  const joules = joulesPerEnergyUnit(config.energy_unit as EnergyUnit, config.reference_temperature, `${where}.energy_unit`);
  const A = reservoirState(config.reservoirs.A, joules);
  const B = reservoirState(config.reservoirs.B, joules);
  const affinity = affinities(A, B);
  const roles = config.columns as SampleRoles;
  const base = {
    config,
    reservoirs: { A, B },
    affinity,
    energyUnit: { name: config.energy_unit, joules },
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
  const input: ReduceInput = { label: config.file, dataset: config.id, roles, joules, affinity, workZero: config.work === "zero" } as ReduceInput;
  const conductor: ConductorInput = { roles, A, B, declared: config.state_distribution, file: config.file, where };
  const fields = exactFields(input, { raw, rows, lines, sha256, located: "row" } as RawSamples, "row", conductor);
  return { kind: "samples" as const, id: config.id, file: config.file, format: "trace windows", ...base, ...fields };
}

function fileSize(filePath: string): number {
  try {
    return fs.statSync(filePath).size;
  } catch {
    return 0; // the reader words the problem
  }
}
