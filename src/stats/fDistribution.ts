import { regularizedIncompleteBeta } from "./beta.ts";

/**
 * Upper tail of Snedecor's F distribution with (d1, d2) degrees of freedom:
 * P(F > x) = I_{d2/(d2 + d1 x)}(d2/2, d1/2) (Abramowitz & Stegun, Handbook of
 * Mathematical Functions (1964), 26.6.2 with 26.5.2), with 1 − w passed as
 * d1 x/(d2 + d1 x) so that small tails keep their digits.
 */
export function fSf(x: number, d1: number, d2: number): number {
  if (!(d1 > 0 && d2 > 0)) throw new RangeError(`F distribution needs positive degrees of freedom, got ${d1} and ${d2}`);
  if (Number.isNaN(x)) return Number.NaN;
  if (x <= 0) return 1;
  if (x === Number.POSITIVE_INFINITY) return 0;
  const denominator = d2 + d1 * x;
  return regularizedIncompleteBeta(d2 / denominator, d2 / 2, d1 / 2, (d1 * x) / denominator);
}
