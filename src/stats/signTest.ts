/**
 * The exact sign test and its equivalence counterpart, for a law that should
 * be symmetric about zero: of the m non-zero observations, k are positive.
 * Under P(x) = P(−x) each non-zero observation is positive with probability
 * 1/2 independently, so k ~ Binomial(m, 1/2) exactly whatever the law; zeros
 * carry no sign and are left out (Dixon & Mood, J. Am. Stat. Assoc. 41, 557
 * (1946)). Binomial tails from the regularised incomplete beta function:
 * P(K ≥ k) = I_p(k, m − k + 1), P(K ≤ k) = I_{1−p}(m − k, k + 1)
 * (Abramowitz & Stegun, Handbook of Mathematical Functions (1964), 26.5.24).
 *
 * Equivalence: the sign asymmetry A = (k⁺ − k⁻)/m = 2 p − 1 lies inside
 * (−δ, δ) when both exact one-sided tests reject p ≤ (1 − δ)/2 and
 * p ≥ (1 + δ)/2 at level alpha (two one-sided tests, Schuirmann, J.
 * Pharmacokinet. Biopharm. 15, 657 (1987), with exact binomial tails).
 */
import { regularizedIncompleteBeta } from "./beta.ts";

/** P(K ≥ k) for K ~ Binomial(m, p). */
export function binomialUpperTail(k: number, m: number, p: number): number {
  if (k <= 0) return 1;
  if (k > m) return 0;
  return regularizedIncompleteBeta(p, k, m - k + 1, 1 - p);
}

/** P(K ≤ k) for K ~ Binomial(m, p). */
export function binomialLowerTail(k: number, m: number, p: number): number {
  if (k < 0) return 0;
  if (k >= m) return 1;
  return regularizedIncompleteBeta(1 - p, m - k, k + 1, p);
}

export interface SignTest {
  positive: number;
  negative: number;
  /** (positive − negative)/(positive + negative); NaN without non-zero observations. */
  asymmetry: number;
  /** Exact two-sided p of H0: P(x > 0) = P(x < 0) (twice the smaller tail, at most 1). */
  p: number;
  /** Exact two-one-sided-tests p for |asymmetry| ≥ margin (max of the two one-sided p's). */
  equivalenceP: number;
  margin: number;
  equivalent: boolean;
}

/** Sign test of symmetry and exact equivalence within ±margin on the asymmetry, at level `alpha` for the equivalence. */
export function signTest(positive: number, negative: number, margin: number, alpha: number): SignTest {
  const m = positive + negative;
  if (!(m > 0)) return { positive, negative, asymmetry: Number.NaN, p: 1, equivalenceP: 1, margin, equivalent: false };
  const k = positive;
  const p = Math.min(1, 2 * Math.min(binomialUpperTail(k, m, 0.5), binomialLowerTail(k, m, 0.5)));
  const lower = (1 - margin) / 2;
  const upper = (1 + margin) / 2;
  // H0a: p ≤ lower, rejected by many positives; H0b: p ≥ upper, rejected by few.
  const pLower = binomialUpperTail(k, m, lower);
  const pUpper = binomialLowerTail(k, m, upper);
  const equivalenceP = Math.max(pLower, pUpper);
  return { positive, negative, asymmetry: (positive - negative) / m, p, equivalenceP, margin, equivalent: equivalenceP < alpha };
}
