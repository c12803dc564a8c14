import type { ComplexMatrix } from "./complexMatrix.ts";
import { complexMultiply } from "./complexMatrix.ts";
import { complexDeterminant } from "./complexDeterminant.ts";
import type { FermionModes } from "./fermionModel.ts";

/**
 * Exact distribution of the number of particles gained by B, from Klich's
 * determinant formula for the generating function of non-interacting
 * fermions (Klich, "Full counting statistics: an elementary derivation of
 * Levitov's formula", in Quantum Noise in Mesoscopic Physics, ed. Nazarov,
 * Kluwer (2003); finite-size form used by Schönhammer, PRB 75, 205329 (2007)):
 *
 *   χ(λ) = Σ_q P(q) e^{iλq} = det[1 − n + n Ũ† e^{iλP} Ũ e^{−iλP}],
 *
 * with P the projector on B's modes, Ũ the evolution in the mode basis and
 * n = Cᵀ the transposed correlation matrix C_ij = ⟨a†_i a_j⟩. The transpose
 * matters when C is complex; here C = diag(f) is real and diagonal in the
 * mode basis, so n = diag(f). Since q lies in [−N_B, N_A] (N the numbers of
 * modes), M = N_A + N_B + 1 equally spaced λ_k = 2πk/M invert the series
 * exactly: P(q) = (1/M) Σ_k χ(λ_k) e^{−iλ_k q}.
 */
export interface CountingDistribution {
  /** Smallest q represented (−N_B). */
  qMin: number;
  /** P(q) for q = qMin, qMin + 1, …; rounding can leave entries of order 1e-15 below zero. */
  probability: Float64Array;
}

export function generatingFunction(modes: FermionModes, u: ComplexMatrix, lambda: number): { re: number; im: number } {
  const n = modes.n;
  // Y = e^{iλP} Ũ (rows of B's modes get the phase).
  const y = { rows: n, cols: n, re: Float64Array.from(u.re), im: Float64Array.from(u.im) };
  const c = Math.cos(lambda);
  const s = Math.sin(lambda);
  for (let m = 0; m < n; m++) {
    if (modes.region[m] !== 1) continue;
    for (let j = 0; j < n; j++) {
      const r = y.re[m * n + j];
      const i = y.im[m * n + j];
      y.re[m * n + j] = r * c - i * s;
      y.im[m * n + j] = r * s + i * c;
    }
  }
  const x = complexMultiply(u, y, true);
  // M = 1 − F + F X e^{−iλP}
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const f = modes.occupation[i];
    for (let j = 0; j < n; j++) {
      let xr = x.re[i * n + j];
      let xi = x.im[i * n + j];
      if (modes.region[j] === 1) {
        const r = xr * c + xi * s;
        xi = xi * c - xr * s;
        xr = r;
      }
      re[i * n + j] = f * xr;
      im[i * n + j] = f * xi;
    }
    re[i * n + i] += 1 - f;
  }
  return complexDeterminant(n, re, im);
}

export function particleCountingDistribution(modes: FermionModes, u: ComplexMatrix): CountingDistribution {
  const nB = modes.n - modes.nA;
  const M = modes.n + 1;
  const chiRe = new Float64Array(M);
  const chiIm = new Float64Array(M);
  // P(q) is real, so χ(−λ) = conj χ(λ): compute half of the points.
  for (let k = 0; k <= Math.floor(M / 2); k++) {
    const v = generatingFunction(modes, u, (2 * Math.PI * k) / M);
    chiRe[k] = v.re;
    chiIm[k] = v.im;
    if (k > 0) {
      chiRe[M - k] = v.re;
      chiIm[M - k] = -v.im;
    }
  }
  const probability = new Float64Array(M);
  for (let idx = 0; idx < M; idx++) {
    const q = idx - nB;
    let s = 0;
    for (let k = 0; k < M; k++) {
      const a = (2 * Math.PI * k * q) / M;
      s += chiRe[k] * Math.cos(a) + chiIm[k] * Math.sin(a);
    }
    probability[idx] = s / M;
  }
  return { qMin: -nB, probability };
}

/**
 * ⟨e^{−s Σ}⟩ for the entropy production Σ = Σ_m x_m Δn_m, x_m = β_X(ε_m − μ_X)
 * of the mode's reservoir X, from the same determinant formula continued to
 * real counting fields: det[1 − F + F Ũ† e^{−sX} Ũ e^{sX}], X = diag(x_m).
 * The exchange fluctuation relation is equivalent to ⟨e^{−sΣ}⟩ = ⟨e^{−(1−s)Σ}⟩
 * (time-reversal symmetric protocol; Andrieux, Gaspard, Monnai & Tasaki,
 * New J. Phys. 11, 043014 (2009)), and s = 1 gives the integral relation.
 */
export function entropyGeneratingFunction(modes: FermionModes, u: ComplexMatrix, x: Float64Array, s: number): number {
  const n = modes.n;
  // Y = e^{−sX} Ũ (rows scaled), then X' = Ũ† Y, then columns scaled by e^{sX}.
  const y = { rows: n, cols: n, re: Float64Array.from(u.re), im: Float64Array.from(u.im) };
  for (let m = 0; m < n; m++) {
    const w = Math.exp(-s * x[m]);
    for (let j = 0; j < n; j++) {
      y.re[m * n + j] *= w;
      y.im[m * n + j] *= w;
    }
  }
  const xm = complexMultiply(u, y, true);
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const f = modes.occupation[i];
    for (let j = 0; j < n; j++) {
      const w = Math.exp(s * x[j]);
      re[i * n + j] = f * xm.re[i * n + j] * w;
      im[i * n + j] = f * xm.im[i * n + j] * w;
    }
    re[i * n + i] += 1 - f;
  }
  return complexDeterminant(n, re, im).re;
}
