/**
 * Two one-sided tests for equivalence, D. J. Schuirmann, J. Pharmacokinet.
 * Biopharm. 15, 657–680 (1987).
 *
 * H0: mu ≤ lower or mu ≥ upper, against H1: lower < mu < upper. With
 * t_L = (estimate − lower)/se and t_U = (upper − estimate)/se, each referred
 * to Student's t with df degrees of freedom (df = Infinity: the normal law for
 * a known standard uncertainty), p_L = P(T ≥ t_L), p_U = P(T ≥ t_U) and
 * p = max(p_L, p_U). Equivalence is declared when p < alpha, which is the same
 * as the 100(1 − 2 alpha) % two-sided interval lying inside the open margin.
 */
import { studentTQuantile, studentTSf } from "./studentT.ts";

export interface TostInput {
  estimate: number;
  /** Standard error of the estimate (> 0, or 0 for an exactly known value). */
  se: number;
  lower: number;
  upper: number;
  alpha: number;
  /** Degrees of freedom of se; Infinity (the default) for a known standard uncertainty. */
  df?: number;
}

export interface TostResult {
  estimate: number;
  se: number;
  margin: [number, number];
  alpha: number;
  df: number;
  tLower: number;
  tUpper: number;
  pLower: number;
  pUpper: number;
  /** max(pLower, pUpper). */
  p: number;
  /** The 100(1 − 2 alpha) % interval whose inclusion in the margin is the decision. */
  interval: [number, number];
  equivalent: boolean;
}

export function tost(input: TostInput): TostResult {
  const { estimate, se, lower, upper, alpha } = input;
  const df = input.df ?? Infinity;
  if (!(upper > lower)) throw new RangeError(`tost needs lower < upper, got [${lower}, ${upper}]`);
  if (!(alpha > 0 && alpha < 0.5)) throw new RangeError(`tost needs alpha in (0, 0.5), got ${alpha}`);
  if (!(se >= 0) || !Number.isFinite(estimate)) throw new RangeError(`tost needs a finite estimate and se >= 0, got ${estimate} ± ${se}`);
  let tLower: number;
  let tUpper: number;
  if (se === 0) {
    // An exact value: inside the open margin or not.
    tLower = estimate > lower ? Infinity : estimate < lower ? -Infinity : 0;
    tUpper = estimate < upper ? Infinity : estimate > upper ? -Infinity : 0;
  } else {
    tLower = (estimate - lower) / se;
    tUpper = (upper - estimate) / se;
  }
  const pLower = studentTSf(tLower, df);
  const pUpper = studentTSf(tUpper, df);
  const q = studentTQuantile(1 - alpha, df);
  const p = Math.max(pLower, pUpper);
  return {
    estimate,
    se,
    margin: [lower, upper],
    alpha,
    df,
    tLower,
    tUpper,
    pLower,
    pUpper,
    p,
    interval: [estimate - q * se, estimate + q * se],
    equivalent: p < alpha,
  };
}
