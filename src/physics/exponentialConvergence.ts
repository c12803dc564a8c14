import { hillTailShape } from "../stats/tailShape.ts";
import { exp, log } from "../math/index.ts";

/**
 * Whether a sample can resolve the exponential average ⟨e^{−Σ}⟩.
 *
 * The average is dominated by rare realisations typical of the reverse
 * process; a sample of N resolves it only while ⟨Σ⟩ stays below about ln N
 * (C. Jarzynski, Phys. Rev. E 73, 046105 (2006)).
 *
 * A sharper count from the relation itself: since e^{−Σ} P(Σ) = P(−Σ), the
 * realisations with Σ ≤ −⟨Σ⟩ carry ∫_{Σ ≤ −⟨Σ⟩} P(−Σ) dΣ = P(Σ ≥ ⟨Σ⟩) of the
 * average, typically about half of it (derived here from the detailed
 * relation). With only a handful of them observed, half the estimate rests on
 * a few numbers and the bootstrap cannot see what was never sampled.
 *
 * The tail shape ξ of e^{−Σ} (Hill's estimator, see stats/tailShape.ts): above
 * 0.7 the average is dominated by a few draws from a tail too heavy for any
 * interval from this sample to be trusted (Vehtari, Simpson, Gelman, Yao &
 * Gabry, J. Mach. Learn. Res. 25, 1 (2024)).
 *
 * Kish's effective sample size (Σ w e)²/Σ w e² (L. Kish, Survey Sampling
 * (1965)) measures the same concentration directly on the data.
 *
 * Windows cut from one trace are not independent realisations: neighbours
 * share the conductor's state. Every count above is then divided by the
 * statistical inefficiency g = 1 + 2 Σ_k ρ_k (windows per independent
 * realisation; the variance of a mean of N correlated windows is g σ²/N:
 * Sokal, NATO ASI Ser. B 361, 131 (1997), whose τ_int is g/2; from memory),
 * so that a trace of N windows counts as N/g realisations, not N.
 */
export const MIN_MIRROR_REALISATIONS = 10;
export const MIN_EFFECTIVE_SAMPLE = 30;
/** Largest tail shape of e^{−Σ} for which the average is trusted (Vehtari et al. 2024 use 0.7). */
export const MAX_TAIL_SHAPE = 0.7;

export interface ExponentialConvergence {
  meanSigma: number;
  /** ln of the number of independent realisations, N/g. */
  logN: number;
  /** Windows per independent realisation g (1 for independent realisations). */
  inefficiency: number;
  /** Realisations (total weight) with Σ ≤ −⟨Σ⟩. */
  mirrorCount: number;
  effectiveSampleSize: number;
  tailShape: number;
  resolved: boolean;
  /** Why not, for a person; undefined when resolved. */
  reason?: string;
}

export function exponentialConvergence(sigma: ArrayLike<number>, weight: ArrayLike<number> | null, inefficiency = 1): ExponentialConvergence {
  // Below 1 (anticorrelated neighbours) the windows are not counted as more than they are.
  const g = Number.isFinite(inefficiency) && inefficiency > 1 ? inefficiency : 1;
  let n = 0;
  let sum = 0;
  for (let i = 0; i < sigma.length; i++) {
    const w = weight ? weight[i] : 1;
    n += w;
    sum += w * sigma[i];
  }
  const meanSigma = sum / n;
  // Shift exponents by the largest −Σ so that the sums cannot overflow; ESS is scale-free.
  let shift = -Infinity;
  for (let i = 0; i < sigma.length; i++) if ((weight ? weight[i] : 1) > 0 && -sigma[i] > shift) shift = -sigma[i];
  let s1 = 0;
  let s2 = 0;
  let mirror = 0;
  for (let i = 0; i < sigma.length; i++) {
    const w = weight ? weight[i] : 1;
    if (w === 0) continue;
    const e = exp(-sigma[i] - shift);
    s1 += w * e;
    s2 += w * e * e;
    if (sigma[i] <= -meanSigma) mirror += w;
  }
  const effectiveSampleSize = (s1 * s1) / s2 / g;
  const independentMirror = mirror / g;
  const expMinus = new Float64Array(sigma.length);
  for (let i = 0; i < sigma.length; i++) expMinus[i] = exp(-sigma[i] - shift);
  const tailShape = hillTailShape(expMinus, weight);
  const logN = log(n / g);
  const correlated = g > 1;
  // "ln(N/g) = 5.74 (N = 1000 windows, g = 3.2 windows per independent realisation)"
  const nText = correlated ? `ln(N/g) = ${logN.toPrecision(3)} (N = ${n} windows, g = ${g.toPrecision(2)} windows per independent realisation)` : `ln N = ${logN.toPrecision(3)}`;
  const reasons: string[] = [];
  if (meanSigma >= logN) {
    reasons.push(
      `⟨Σ⟩ = ${meanSigma.toPrecision(3)} k_B is not below ${nText}: about e^⟨Σ⟩ ≈ ${exp(meanSigma).toPrecision(2)} independent realisations are needed to resolve ⟨e^−Σ⟩ (Jarzynski 2006)`,
    );
  }
  if (meanSigma > 0 && independentMirror < MIN_MIRROR_REALISATIONS) {
    reasons.push(
      correlated
        ? `only ${mirror} windows, about ${independentMirror.toPrecision(2)} independent realisations (g = ${g.toPrecision(2)}), have Σ ≤ −⟨Σ⟩, the region that carries about half of ⟨e^−Σ⟩; at least ${MIN_MIRROR_REALISATIONS} are needed`
        : `only ${mirror} realisation(s) have Σ ≤ −⟨Σ⟩, the region that carries about half of ⟨e^−Σ⟩; at least ${MIN_MIRROR_REALISATIONS} are needed`,
    );
  }
  if (effectiveSampleSize < MIN_EFFECTIVE_SAMPLE) {
    reasons.push(`the average rests on an effective ${effectiveSampleSize.toPrecision(3)} realisations (Kish${correlated ? `, divided by g = ${g.toPrecision(2)}` : ""}), fewer than ${MIN_EFFECTIVE_SAMPLE}`);
  }
  if (tailShape > MAX_TAIL_SHAPE) {
    reasons.push(`the right tail of e^−Σ has shape ξ = ${tailShape.toPrecision(2)} > ${MAX_TAIL_SHAPE} (Hill estimator), too heavy for the average to be pinned by this sample`);
  }
  return {
    meanSigma,
    logN,
    inefficiency: g,
    mirrorCount: mirror,
    effectiveSampleSize,
    tailShape,
    resolved: reasons.length === 0,
    ...(reasons.length ? { reason: reasons.join("; ") } : {}),
  };
}
