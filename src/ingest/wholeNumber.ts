import { recordProblem, type ProblemLog } from "../errors.ts";

/**
 * Particle numbers are whole: dN counts the particles (electrons, photons,
 * atoms) a reservoir gained in one realisation. No unit makes a count
 * fractional; a column that is not whole holds something else (a charge not
 * divided by e, or an average over realisations).
 */
export const PARTICLE_NUMBER_EXPECTED =
  "expected a whole number of particles (dN counts the particles one realisation moved, and has no unit that makes it fractional: " +
  "divide a charge by e, and give averages over realisations as a cumulants dataset)";

/**
 * Whether `value` is a whole number a double holds exactly: above 2^53 − 1 neighbouring whole
 * numbers share a double (IEEE 754 binary64), so the count read is not necessarily the one written.
 */
export function isExactWholeNumber(value: number): boolean {
  return Number.isInteger(value) && Math.abs(value) <= Number.MAX_SAFE_INTEGER;
}

/**
 * Log every row whose particle number is not whole, naming its line and column; the message
 * quotes the cell as written once the reader supplies it (errors.ts, CellProblem).
 */
export function logNonWholeParticleNumbers(values: ArrayLike<number>, rows: number, lines: ArrayLike<number>, column: string, problems: ProblemLog): void {
  for (let i = 0; i < rows; i++) if (!isExactWholeNumber(values[i])) recordProblem(problems, lines[i], column, PARTICLE_NUMBER_EXPECTED, values[i]);
}
