/**
 * Student's t distribution with ν degrees of freedom (ν > 0, Infinity gives
 * the standard normal). The distribution function comes from the regularized
 * incomplete beta function (Abramowitz & Stegun 26.7.1 with 26.5.27):
 * for t < 0, P(T ≤ t) = ½ I_{ν/(ν+t²)}(ν/2, ½).
 */
import { regularizedIncompleteBeta, logBeta } from "./beta.ts";
import { normalCdf, normalQuantile, normalSf } from "./normal.ts";
import { exp, log } from "../math/index.ts";

function checkDf(df: number): void {
  if (!(df > 0)) throw new RangeError(`Student t needs degrees of freedom > 0, got ${df}`);
}

/** P(T ≤ −|t|): the lower tail at a non-positive argument, without cancellation. */
function lowerTail(t: number, df: number): number {
  const t2 = t * t;
  // x = ν/(ν + t²) and its complement t²/(ν + t²), both without subtraction.
  const x = df / (df + t2);
  const y = t2 / (df + t2);
  return 0.5 * regularizedIncompleteBeta(x, df / 2, 0.5, y);
}

/** P(T ≤ t). */
export function studentTCdf(t: number, df: number): number {
  checkDf(df);
  if (Number.isNaN(t)) return Number.NaN;
  if (df === Infinity) return normalCdf(t);
  if (t === -Infinity) return 0;
  if (t === Infinity) return 1;
  return t <= 0 ? lowerTail(t, df) : 1 - lowerTail(-t, df);
}

/** P(T > t), accurate far in the upper tail. */
export function studentTSf(t: number, df: number): number {
  checkDf(df);
  if (df === Infinity) return normalSf(t);
  return studentTCdf(-t, df);
}

/** Probability density of T. */
export function studentTPdf(t: number, df: number): number {
  checkDf(df);
  if (df === Infinity) return exp(-0.5 * t * t) / Math.sqrt(2 * Math.PI);
  // f(t) = (1 + t²/ν)^{−(ν+1)/2} / (√ν B(ν/2, ½))
  return exp(-((df + 1) / 2) * Math.log1p((t * t) / df) - 0.5 * log(df) - logBeta(df / 2, 0.5));
}

/** Two-sided p-value P(|T| ≥ |t|). */
export function studentTTwoSidedP(t: number, df: number): number {
  return Math.min(1, 2 * studentTSf(Math.abs(t), df));
}

/**
 * The p-quantile t with P(T ≤ t) = p. Newton steps on the lower tail from the
 * normal quantile, kept inside a bracket by bisection; the upper half follows
 * by symmetry so each side is solved where its tail probability is small and
 * exact. Converges to a relative change below 1e-14.
 */
export function studentTQuantile(p: number, df: number): number {
  checkDf(df);
  if (!(p >= 0 && p <= 1)) throw new RangeError(`studentTQuantile needs p in [0, 1], got ${p}`);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (df === Infinity) return normalQuantile(p);
  if (p > 0.5) return -studentTQuantile(1 - p, df);
  if (p === 0.5) return 0;
  // Solve lowerTail(t) = p for t < 0. Bracket: [lo, 0] with lowerTail(lo) <= p.
  let hi = 0;
  let lo = Math.min(-1, normalQuantile(p));
  while (lowerTail(lo, df) > p) {
    hi = lo;
    lo *= 2;
    if (!Number.isFinite(lo)) return -Infinity;
  }
  let t = Math.max(lo, Math.min(hi, normalQuantile(p)));
  if (!(t > lo && t < hi)) t = (lo + hi) / 2;
  for (let i = 0; i < 200; i++) {
    const f = lowerTail(t, df) - p;
    if (f === 0) return t;
    if (f > 0) hi = t;
    else lo = t;
    const density = studentTPdf(t, df);
    let next = t - f / density;
    if (!(next > lo && next < hi) || !Number.isFinite(next)) next = (lo + hi) / 2;
    if (Math.abs(next - t) <= 1e-14 * Math.abs(t) || hi - lo <= 1e-15 * Math.abs(t)) return next;
    t = next;
  }
  return t;
}
