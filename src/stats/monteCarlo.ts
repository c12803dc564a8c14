/**
 * Monte Carlo propagation of standard uncertainties through a function, as in
 * JCGM 101:2008 ("Evaluation of measurement data — Supplement 1 to the GUM:
 * propagation of distributions using a Monte Carlo method"): each input is
 * drawn from a normal law with its value as mean and its standard uncertainty
 * as standard deviation (inputs independent), the function is evaluated on
 * every draw, and the outputs are summarised by mean, standard deviation
 * (Welford's update, Technometrics 4, 419 (1962)) and empirical quantiles.
 * The generator is a parameter: the caller seeds it from the data digest.
 */
import type { Rng } from "./rng.ts";

export interface MonteCarloOutput {
  /** f at the input values (the estimate reported). */
  estimate: number;
  /** Mean over the valid draws. */
  mean: number;
  /** Standard deviation over the valid draws: the propagated standard uncertainty. */
  sd: number;
  /** Number of draws where this output was finite. */
  valid: number;
  /** The finite draws, sorted ascending (for quantiles). */
  sorted: Float64Array;
}

export interface MonteCarloResult {
  draws: number;
  outputs: MonteCarloOutput[];
}

/**
 * Propagate independent normal uncertainties u through f. Outputs that are not
 * finite on a draw (e.g. a ratio whose denominator crossed zero) are left out
 * of that output's summary and counted in `valid`.
 */
export function propagateUncertainty(
  f: (x: readonly number[]) => readonly number[],
  values: readonly number[],
  u: readonly number[],
  rng: Rng,
  draws: number,
): MonteCarloResult {
  if (values.length !== u.length) throw new RangeError(`propagateUncertainty: ${values.length} values but ${u.length} uncertainties`);
  if (!(Number.isInteger(draws) && draws >= 2)) throw new RangeError(`propagateUncertainty needs at least 2 draws, got ${draws}`);
  u.forEach((s, i) => {
    if (!(s >= 0 && Number.isFinite(s))) throw new RangeError(`propagateUncertainty: uncertainty ${i} must be finite and >= 0, got ${s}`);
  });
  const estimate = f(values);
  const k = estimate.length;
  const count = new Array<number>(k).fill(0);
  const mean = new Array<number>(k).fill(0);
  const m2 = new Array<number>(k).fill(0);
  const samples = Array.from({ length: k }, () => new Float64Array(draws));
  const x = new Array<number>(values.length);
  for (let d = 0; d < draws; d++) {
    for (let i = 0; i < values.length; i++) x[i] = values[i] + u[i] * rng.normal();
    const y = f(x);
    for (let j = 0; j < k; j++) {
      const v = y[j];
      if (!Number.isFinite(v)) continue;
      samples[j][count[j]] = v;
      count[j]++;
      const delta = v - mean[j];
      mean[j] += delta / count[j];
      m2[j] += delta * (v - mean[j]);
    }
  }
  return {
    draws,
    outputs: estimate.map((e, j) => ({
      estimate: e,
      mean: count[j] > 0 ? mean[j] : Number.NaN,
      sd: count[j] > 1 ? Math.sqrt(m2[j] / (count[j] - 1)) : Number.NaN,
      valid: count[j],
      sorted: samples[j].slice(0, count[j]).sort(),
    })),
  };
}

/**
 * Empirical quantile of sorted data by linear interpolation between order
 * statistics (Hyndman & Fan, Am. Stat. 50, 361 (1996), definition 7).
 */
export function empiricalQuantile(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  if (!(p >= 0 && p <= 1)) throw new RangeError(`empiricalQuantile needs p in [0, 1], got ${p}`);
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}
