import type { Rng } from "./rng.ts";
import { logGamma } from "./gamma.ts";

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
    let p = Math.exp(-mean);
    let cdf = p;
    const u = rng.uniform();
    while (u > cdf && k < 1000) {
      k++;
      p *= mean / k;
      cdf += p;
    }
    return k;
  }
  const slam = Math.sqrt(mean);
  const loglam = Math.log(mean);
  const b = 0.931 + 2.53 * slam;
  const a = -0.059 + 0.02483 * b;
  const invAlpha = 1.1239 + 1.1328 / (b - 3.4);
  const vr = 0.9277 - 3.6224 / (b - 2);
  for (;;) {
    const U = rng.uniform() - 0.5;
    const V = rng.uniform();
    const us = 0.5 - Math.abs(U);
    const k = Math.floor(((2 * a) / us + b) * U + mean + 0.43);
    if (us >= 0.07 && V <= vr) return k;
    if (k < 0 || (us < 0.013 && V > us)) continue;
    if (Math.log(V) + Math.log(invAlpha) - Math.log(a / (us * us) + b) <= -mean + k * loglam - logGamma(k + 1)) return k;
  }
}
