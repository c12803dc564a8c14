import { logGamma, regularizedGammaP, regularizedGammaQ } from "./gamma.ts";
import { normalQuantile } from "./normal.ts";
import { exp, log } from "../math/index.ts";

/**
 * The chi-square distribution with k degrees of freedom:
 * F(x; k) = P(k/2, x/2), the regularised lower incomplete gamma function
 * (Abramowitz & Stegun, Handbook of Mathematical Functions (1964), 26.4.19).
 */
function checkDof(k: number): void {
  if (!(k > 0) || !Number.isFinite(k)) throw new RangeError(`chi-square needs positive degrees of freedom, got ${k}`);
}

export function chiSquareCdf(x: number, k: number): number {
  checkDof(k);
  return x <= 0 ? 0 : regularizedGammaP(k / 2, x / 2);
}

/** Upper tail P(X > x): the p-value of a chi-square statistic, accurate when tiny. */
export function chiSquareSf(x: number, k: number): number {
  checkDof(k);
  return x <= 0 ? 1 : regularizedGammaQ(k / 2, x / 2);
}

/**
 * The quantile x with F(x; k) = p. Start from the Wilson–Hilferty cube-root
 * approximation (Wilson & Hilferty, PNAS 17, 684 (1931)), then refine by
 * bisection-safeguarded Newton steps on the cdf to full double precision.
 */
export function chiSquareQuantile(p: number, k: number): number {
  checkDof(k);
  if (!(p >= 0 && p <= 1)) throw new RangeError(`chiSquareQuantile needs p in [0, 1], got ${p}`);
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  const z = normalQuantile(p);
  const c = 2 / (9 * k);
  const w = 1 - c + z * Math.sqrt(c);
  let x = Math.max(k * w * w * w, 1e-8);
  // Bracket the root, then Newton steps that fall back to bisection outside it.
  let lo = 0;
  let hi = Math.max(2 * x, 1);
  while (chiSquareCdf(hi, k) < p) hi *= 2;
  const logNorm = (k / 2) * log(2) + logGamma(k / 2);
  for (let it = 0; it < 1000; it++) {
    const f = p < 0.5 ? chiSquareCdf(x, k) - p : 1 - p - chiSquareSf(x, k);
    if (f === 0) return x;
    if (f < 0) lo = x;
    else hi = x;
    const density = exp((k / 2 - 1) * log(x) - x / 2 - logNorm);
    let next = x - f / density;
    // Bisect (geometrically while the lower end is still 0, for tiny quantiles at small k).
    if (!(next > lo && next < hi) || !Number.isFinite(next)) next = lo > 0 ? (lo + hi) / 2 : hi / 16;
    if (Math.abs(next - x) <= 4e-16 * next) return next;
    x = next;
  }
  return x;
}
