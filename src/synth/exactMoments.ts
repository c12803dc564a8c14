import type { ComplexMatrix } from "./complexMatrix.ts";
import type { FermionModes } from "./fermionModel.ts";

/**
 * Exact means and covariances of the two-point measurement outcomes
 * x = (dE_A, dE_B, dN) for non-interacting fermions, from single-particle
 * matrices alone (no sampling).
 *
 * Each measured quantity is a quadratic form O = Σ_m ω_m a†_m a_m, diagonal
 * in the isolated reservoirs' modes; after the evolution its single-particle
 * matrix is Ũ† Ω Ũ (Ũ = exp(−i h τ) in the mode basis). The initial state is
 * Gaussian and diagonal, ⟨a†_i a_j⟩ = δ_ij f_i, and commutes with every
 * initially measured quantity, so the two-point statistics have
 *   ⟨ΔO⟩ = Tr[F D_O],   Cov(ΔO, ΔP) = Re Tr[F D_O (1 − F) D_P],
 * with D_O = Ũ† Ω_O Ũ − Ω_O and F = diag(f): Wick's theorem for the
 * four-operator averages (e.g. Schönhammer, PRB 75, 205329 (2007), who
 * derives the same moments from Klich's determinant formula; Klich, in
 * Quantum Noise in Mesoscopic Physics, Kluwer (2003)).
 */
export interface ExactMoments {
  /** Means of (dE_A, dE_B, dN), energy units and particles. */
  mean: [number, number, number];
  /** Covariance matrix of (dE_A, dE_B, dN). */
  covariance: number[][];
}

/** ω vectors of the three measured quantities: energy of A, energy of B, particles in B. */
function weights(modes: FermionModes): Float64Array[] {
  const eA = new Float64Array(modes.n);
  const eB = new Float64Array(modes.n);
  const nB = new Float64Array(modes.n);
  for (let m = 0; m < modes.n; m++) {
    if (modes.region[m] === 0) eA[m] = modes.energy[m];
    else {
      eB[m] = modes.energy[m];
      nB[m] = 1;
    }
  }
  return [eA, eB, nB];
}

/** D = Ũ† diag(ω) Ũ − diag(ω). */
function changeMatrix(u: ComplexMatrix, omega: Float64Array): { re: Float64Array; im: Float64Array } {
  const n = u.rows;
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  for (let m = 0; m < n; m++) {
    const w = omega[m];
    if (w === 0) continue;
    const row = m * n;
    for (let i = 0; i < n; i++) {
      // conj(Ũ_mi) ω_m Ũ_mj accumulated into D_ij.
      const ar = w * u.re[row + i];
      const ai = -w * u.im[row + i];
      const di = i * n;
      for (let j = 0; j < n; j++) {
        const br = u.re[row + j];
        const bi = u.im[row + j];
        re[di + j] += ar * br - ai * bi;
        im[di + j] += ar * bi + ai * br;
      }
    }
  }
  for (let i = 0; i < n; i++) re[i * n + i] -= omega[i];
  return { re, im };
}

export function exactMoments(modes: FermionModes, u: ComplexMatrix): ExactMoments {
  const n = modes.n;
  const f = modes.occupation;
  const D = weights(modes).map((w) => changeMatrix(u, w));
  const mean = D.map((d) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += f[i] * d.re[i * n + i];
    return s;
  }) as [number, number, number];
  const covariance = [0, 1, 2].map(() => [0, 0, 0]);
  for (let a = 0; a < 3; a++) {
    for (let b = a; b < 3; b++) {
      // Re Σ_ij f_i D^a_ij (1 − f_j) D^b_ji
      let s = 0;
      for (let i = 0; i < n; i++) {
        const fi = f[i];
        if (fi === 0) continue;
        let row = 0;
        for (let j = 0; j < n; j++) {
          const g = 1 - f[j];
          row += g * (D[a].re[i * n + j] * D[b].re[j * n + i] - D[a].im[i * n + j] * D[b].im[j * n + i]);
        }
        s += fi * row;
      }
      covariance[a][b] = s;
      covariance[b][a] = s;
    }
  }
  return { mean, covariance };
}

/** Mean and covariance of a linear map y = M x of (dE_A, dE_B, dN), e.g. to (W, Q, dN). */
export function transformMoments(m: ExactMoments, map: number[][]): { mean: number[]; covariance: number[][] } {
  const mean = map.map((row) => row.reduce((s, c, k) => s + c * m.mean[k], 0));
  const covariance = map.map((ri) => map.map((rj) => ri.reduce((s, ci, k) => s + ci * rj.reduce((t, cj, l) => t + cj * m.covariance[k][l], 0), 0)));
  return { mean, covariance };
}

/** (dE_A, dE_B, dN) → (W, Q, dN) with W = dE_A + dE_B and Q = (dE_B − dE_A)/2 (the audit's conventions). */
export const WORK_HEAT_PARTICLES = [
  [1, 1, 0],
  [-0.5, 0.5, 0],
  [0, 0, 1],
];
