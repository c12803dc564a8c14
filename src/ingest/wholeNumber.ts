import { recordProblem, type ProblemLog } from "../errors.ts";
import { describeStoredNumber } from "../messageText.ts";

/**
 * Particle numbers are whole: dN counts the particles (electrons, photons,
 * atoms) a reservoir gained in one realisation. No unit makes a count
 * fractional; a column that is not whole holds something else (a charge not
 * divided by e, or an average over realisations).
 */
export const PARTICLE_NUMBER_EXPECTED =
  "expected a whole number of particles (dN counts the particles one realisation moved, and has no unit that makes it fractional: " +
  "divide a charge by e, and give averages over realisations as a cumulants dataset)";

/** Why `value` is not a whole number a double holds exactly, or null. */
export function wholeNumberProblem(value: number): string | null {
  if (!Number.isInteger(value)) return `found ${describeStoredNumber(value)}`;
  // Above 2^53 − 1 neighbouring whole numbers share a double (IEEE 754 binary64): the count is not the one written.
  if (Math.abs(value) > Number.MAX_SAFE_INTEGER) return `found ${describeStoredNumber(value)}`;
  return null;
}

/** Log every row whose particle number is not whole, naming its line and column. */
export function logNonWholeParticleNumbers(values: ArrayLike<number>, rows: number, lines: ArrayLike<number>, column: string, problems: ProblemLog): void {
  for (let i = 0; i < rows; i++) {
    const problem = wholeNumberProblem(values[i]);
    if (problem) recordProblem(problems, lines[i], column, `${PARTICLE_NUMBER_EXPECTED}, ${problem}`);
  }
}
