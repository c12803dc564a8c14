import { DataError, formatCellProblems, formatRowNumberedProblems, MAX_REPORTED_PROBLEMS, recordProblem, type ProblemLog } from "../errors.ts";
import { isExactWholeNumber, logNonWholeParticleNumbers } from "./wholeNumber.ts";
import { stateLabels } from "./conductorStates.ts";

/**
 * Row rules of a `samples` dataset, shared by the whole-table reader and the
 * streaming reduction: energies converted to J, W and Q derived from dE_A and
 * dE_B where those are mapped, redundant columns held to agree, and counts held
 * to be whole numbers. Problems are logged with the row's line, not thrown, so
 * a caller can gather them over a whole file (or over a worker's share of it).
 */

/** Role → column name, as mapped in audit.yaml. */
export interface SampleRoles {
  Q?: string;
  W?: string;
  dN?: string;
  dE_A?: string;
  dE_B?: string;
  count?: string;
  /** Particles gained by each lead, when the conductor can hold some (physics.md §4b). */
  dN_A?: string;
  dN_B?: string;
  /** The conductor's state (an integer label) at the start and the end of the realisation. */
  state_start?: string;
  state_end?: string;
}

export const SAMPLE_ROLES = ["dE_A", "dE_B", "Q", "dN", "W", "count", "dN_A", "dN_B", "state_start", "state_end"] as const;
export type SampleRole = (typeof SAMPLE_ROLES)[number];

/**
 * Problems as one message: `file:line, column "c": …` for text files (lines as
 * a person counts them), `file, row N, column "c": …` for Parquet (rows from 1).
 */
export function formatRowProblems(label: string, problems: ProblemLog, located: "line" | "row"): string {
  return located === "line"
    ? formatCellProblems(label, problems.problems, MAX_REPORTED_PROBLEMS, problems.count)
    : formatRowNumberedProblems(label, problems.problems, problems.count);
}

/**
 * A file's row problems, thrown as one DataError; the log is kept so that the loader can
 * look up the cells of a text file as written (cellTexts.ts) and word the message again.
 */
export class RowProblemsError extends DataError {
  constructor(
    readonly label: string,
    readonly log: ProblemLog,
    readonly located: "line" | "row",
  ) {
    super(formatRowProblems(label, log, located));
  }
}

/** One chunk of rows in SI (J) with their multiplicities. Arrays are `rows` long. */
export interface SampleRows {
  rows: number;
  Q: Float64Array;
  /** Work found in the data (W column, or dE_A + dE_B), null when the data carry none. */
  W_data: Float64Array | null;
  dN: Float64Array | null;
  dE_A: Float64Array | null;
  dE_B: Float64Array | null;
  /** The `count` column, null when every row is one realisation. */
  weight: Float64Array | null;
}

/**
 * Rows from the raw columns of a file (declared energy unit), `joules` per
 * unit. `lines[i]` is row i's line; problems name it and the column.
 */
export function sampleRowsOf(
  raw: Partial<Record<SampleRole, Float64Array>>,
  roles: SampleRoles,
  joules: number,
  rows: number,
  lines: ArrayLike<number>,
  problems: ProblemLog,
): SampleRows {
  const scaled = (values: Float64Array | undefined) => {
    if (!values) return null;
    const out = new Float64Array(rows);
    for (let i = 0; i < rows; i++) out[i] = values[i] * joules;
    return out;
  };
  const dE_A = scaled(raw.dE_A);
  const dE_B = scaled(raw.dE_B);
  const givenQ = scaled(raw.Q);
  const givenW = scaled(raw.W);
  let Q = givenQ;
  let W = givenW;
  if (dE_A && dE_B) {
    // physics §1: W = dE_A + dE_B (switching work), Q = (dE_B − dE_A)/2 (symmetric split).
    const derivedQ = new Float64Array(rows);
    const derivedW = new Float64Array(rows);
    for (let i = 0; i < rows; i++) {
      derivedQ[i] = (dE_B[i] - dE_A[i]) / 2;
      derivedW[i] = dE_A[i] + dE_B[i];
      // Redundant columns must tell the same story, to the rounding of a printed number
      // (1e-6 of the largest energy in the row).
      const scale = Math.max(Math.abs(dE_A[i]), Math.abs(dE_B[i]));
      if (givenQ && Math.abs(givenQ[i] - derivedQ[i]) > 1e-6 * Math.max(scale, Math.abs(givenQ[i]))) {
        recordProblem(problems, lines[i], roles.Q!, "disagrees with (dE_B − dE_A)/2 from the dE_A and dE_B columns of the same row; map either the column or the energy changes, or correct the row");
      }
      if (givenW && Math.abs(givenW[i] - derivedW[i]) > 1e-6 * Math.max(scale, Math.abs(givenW[i]))) {
        recordProblem(problems, lines[i], roles.W!, "disagrees with dE_A + dE_B from the dE_A and dE_B columns of the same row; map either the column or the energy changes, or correct the row");
      }
    }
    Q = givenQ ?? derivedQ;
    W = givenW ?? derivedW;
  }
  if (raw.dN) logNonWholeParticleNumbers(raw.dN, rows, lines, roles.dN!, problems);
  let weight: Float64Array | null = null;
  if (raw.count) {
    weight = Float64Array.from(raw.count.subarray(0, rows));
    for (let i = 0; i < rows; i++) {
      const c = weight[i];
      // Above 2^53 consecutive whole numbers are no longer all representable (IEEE 754 binary64).
      if (c < 0 || !isExactWholeNumber(c)) {
        recordProblem(problems, lines[i], roles.count!, `expected a count (a whole number from 0 to ${Number.MAX_SAFE_INTEGER})`, c);
      }
    }
  }
  return {
    rows,
    Q: Q!,
    W_data: W,
    dN: raw.dN ? Float64Array.from(raw.dN.subarray(0, rows)) : null,
    dE_A,
    dE_B,
    weight,
  };
}

/**
 * The largest |Σ| (k_B) of one realisation that is accepted: 10^6 k_B. A realisation of a small
 * conductor produces about (particles moved) × (affinity per particle) + (heat)/(k_B T); 10^6 k_B
 * is a million electrons each at an affinity of 1 k_B in one realisation, far beyond what counting
 * experiments and transport simulations of dots, wires and junctions record, so a larger value
 * comes from a wrong energy unit or temperature, or a damaged cell (a corrupted Parquet page gave
 * Σ of order 10^183). Values between about 700 and 10^6 k_B are real data: e^−Σ leaves double
 * precision there (IEEE 754 binary64: e^709.78 is the largest double), and the checks that
 * exponentiate Σ work in log space (integral-fluctuation's ln⟨e^−Σ⟩, the ratios' logarithms).
 */
export const SIGMA_LIMIT = 1e6;

/** Whether a realisation's Σ (k_B) is accepted: finite and within ±SIGMA_LIMIT (false for NaN). */
export function sigmaInRange(sigma: number): boolean {
  return sigma >= -SIGMA_LIMIT && sigma <= SIGMA_LIMIT;
}

/** The message for a row whose entropy production is out of range, naming the dataset. */
export function describeSigmaOutOfRange(sigma: number, dataset: string): string {
  const fix = "check energy_unit, the reservoirs' temperatures (or β) and chemical potentials, and the row's cells";
  if (!Number.isFinite(sigma)) {
    return `dataset "${dataset}": the entropy production of this row is beyond double precision (|Σ| above 1.8e308 k_B); ${fix}`;
  }
  return `dataset "${dataset}": the entropy production of this row, Σ = ${sigma.toPrecision(3).replace("e+", "e")} k_B, is beyond ±1e6 k_B, more than any realisation of a small conductor produces (a million electrons at an affinity of 1 k_B each); ${fix}`;
}

/** Log every row whose Σ is out of range (not finite, or |Σ| above SIGMA_LIMIT). */
export function logSigmaOutOfRange(sigma: ArrayLike<number>, lines: ArrayLike<number>, column: string, problems: ProblemLog, dataset: string): void {
  for (let i = 0; i < sigma.length; i++) if (!sigmaInRange(sigma[i])) recordProblem(problems, lines[i], column, describeSigmaOutOfRange(sigma[i], dataset));
}

/**
 * The columns of a conductor that holds particles (physics.md §4b), for a chunk of rows: each lead's
 * particles (roles dN_A, dN_B, whole numbers), their symmetric split dN = (dN_B − dN_A)/2 (as Q is for
 * energy) and their sum held = dN_A + dN_B (minus the particles the conductor kept), and the conductor's
 * state at both ends (roles state_start, state_end, integer labels). Shared by the whole-table reader and
 * the streaming reduction, so both form the same numbers. Null when no such role is mapped.
 */
export interface ConductorRows {
  dN: Float64Array | null;
  held: Float64Array | null;
  dN_A: Float64Array | null;
  dN_B: Float64Array | null;
  start: Float64Array | null;
  end: Float64Array | null;
}

export function conductorRowsOf(
  raw: Partial<Record<SampleRole, Float64Array>>,
  roles: SampleRoles,
  rows: number,
  lines: ArrayLike<number>,
  problems: ProblemLog,
): ConductorRows | null {
  if (!raw.dN_A && !raw.state_start) return null;
  const copy = (v: Float64Array | undefined) => (v ? Float64Array.from(v.subarray(0, rows)) : null);
  const out: ConductorRows = { dN: null, held: null, dN_A: copy(raw.dN_A), dN_B: copy(raw.dN_B), start: copy(raw.state_start), end: copy(raw.state_end) };
  if (out.dN_A && out.dN_B) {
    logNonWholeParticleNumbers(out.dN_A, rows, lines, roles.dN_A!, problems);
    logNonWholeParticleNumbers(out.dN_B, rows, lines, roles.dN_B!, problems);
    out.dN = new Float64Array(rows);
    out.held = new Float64Array(rows);
    for (let i = 0; i < rows; i++) {
      out.dN[i] = (out.dN_B[i] - out.dN_A[i]) / 2;
      out.held[i] = out.dN_A[i] + out.dN_B[i];
    }
  }
  if (out.start && out.end) {
    stateLabels(out.start, rows, lines, roles.state_start!, problems);
    stateLabels(out.end, rows, lines, roles.state_end!, problems);
  }
  return out;
}

/**
 * The reservoirs' entropy production Σ_res = Σ_X β_X (ΔE_X − μ_X ΔN_X) of each row from Σ = β̄W + a_Q Q + a_N dN
 * (`sigma`, changed in place) and the particles the leads gained together: with dN the symmetric split,
 * Σ_res = Σ − (β_Aμ_A + β_Bμ_B)/2 · (dN_A + dN_B) (physics.md §4b). `meanBetaMu` is (β_Aμ_A + β_Bμ_B)/2.
 */
export function subtractHeldParticles(sigma: Float64Array, held: Float64Array | null, meanBetaMu: number): Float64Array {
  if (held) for (let i = 0; i < sigma.length; i++) sigma[i] -= meanBetaMu * held[i];
  return sigma;
}
