import type { Rng } from "./rng.ts";
import { logGamma } from "./gamma.ts";
import { exp, log } from "../math/index.ts";

/**
 * An exact Poisson deviate with the given mean.
 * Small means (< 10): sequential inversion of the cdf (L. Devroye,
 * Non-Uniform Random Variate Generation (1986), §X.3.3).
 * Larger means: Hörmann's transformed rejection with squeeze, "PTRS"
 * (W. Hörmann, Insurance: Math. Econ. 12, 39 (1993)), constant expected time.
 */
export function poissonDeviate(rng: Rng, mean: number): number {
  if (!(mean >= 0) || !Number.isFinite(mean)) throw new RangeError(`poissonDeviate needs a finite mean >= 0, got ${mean}`);
  if (mean === 0) return 0;
  if (mean < 10) {
    let k = 0;
    let p = exp(-mean);
    let cdf = p;
    const u = rng.uniform();
    while (u > cdf && k < INVERSION_LIMIT) {
      k++;
      p *= mean / k;
      cdf += p;
    }
    return k;
  }
  return ptrsDeviate(rng, ptrsConstants(mean));
}

/** The inversion loop stops here, whatever the draw (a draw beyond it has probability below 1e-300 for means < 10). */
const INVERSION_LIMIT = 1000;

/** Constants of Hörmann's PTRS for one mean (≥ 10). */
export interface PtrsConstants {
  mean: number;
  loglam: number;
  a: number;
  b: number;
  invAlpha: number;
  vr: number;
}

export function ptrsConstants(mean: number): PtrsConstants {
  const slam = Math.sqrt(mean);
  const b = 0.931 + 2.53 * slam;
  return { mean, loglam: log(mean), a: -0.059 + 0.02483 * b, b, invAlpha: 1.1239 + 1.1328 / (b - 3.4), vr: 0.9277 - 3.6224 / (b - 2) };
}

/** One PTRS deviate (Hörmann 1993, algorithm PTRS). */
export function ptrsDeviate(rng: Rng, c: PtrsConstants): number {
  const { mean, loglam, a, b, invAlpha, vr } = c;
  for (;;) {
    const U = rng.uniform() - 0.5;
    const V = rng.uniform();
    const us = 0.5 - Math.abs(U);
    const k = Math.floor(((2 * a) / us + b) * U + mean + 0.43);
    if (us >= 0.07 && V <= vr) return k;
    if (k < 0 || (us < 0.013 && V > us)) continue;
    if (log(V) + log(invAlpha) - log(a / (us * us) + b) <= -mean + k * loglam - logGamma(k + 1)) return k;
  }
}

/**
 * The cumulative probabilities that poissonDeviate's inversion forms for a mean
 * below 10, k = 0, 1, … by the same recurrence and so the same doubles, up to
 * where adding the next probability no longer changes the sum (or the loop's
 * limit). A draw u gives the first k with u ≤ cdf[k], or INVERSION_LIMIT past
 * the end: exactly poissonDeviate's answer for the same uniform, without its
 * exponential and products on every draw.
 */
export function poissonInversionTable(mean: number): Float64Array {
  const cdf: number[] = [];
  let p = exp(-mean);
  let sum = p;
  cdf.push(sum);
  for (let k = 1; k <= INVERSION_LIMIT; k++) {
    p *= mean / k;
    const next = sum + p;
    if (next === sum && k > mean) break; // past the mode p only falls, so the sum stays put from here on
    sum = next;
    cdf.push(sum);
  }
  return Float64Array.from(cdf);
}

/** poissonDeviate for a mean below 10 through its table (see poissonInversionTable): the same k for the same uniform. */
export function poissonFromTable(u: number, cdf: Float64Array): number {
  let k = 0;
  while (k < cdf.length && u > cdf[k]) k++;
  return k < cdf.length ? k : INVERSION_LIMIT;
}
