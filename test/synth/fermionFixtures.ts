import { buildFermionSystem, type FermionSystem } from "../../src/synth/fermionModel.ts";
import type { LatticeSpec } from "../../src/synth/lattice.ts";
import { complexDeterminant } from "../../src/synth/complexDeterminant.ts";
import type { ComplexMatrix } from "../../src/synth/complexMatrix.ts";

export const chain = (length: number, hopping = 1, onsite = 0): LatticeSpec => ({ kind: "chain", length, width: 1, hopping, onsite });
export const ring = (length: number, hopping = 1, onsite = 0): LatticeSpec => ({ kind: "ring", length, width: 1, hopping, onsite });
export const grid = (length: number, width: number, hopping = 1, onsite = 0): LatticeSpec => ({ kind: "grid", length, width, hopping, onsite });

export function system(
  A: LatticeSpec,
  B: LatticeSpec,
  contact: { strength: number; bonds?: number; flux?: number },
  thermo: { betaA: number; muA: number; betaB: number; muB: number },
): FermionSystem {
  return buildFermionSystem({
    A,
    B,
    contact: { strength: contact.strength, bonds: contact.bonds ?? 1, flux: contact.flux ?? 0 },
    thermo: { A: { beta: thermo.betaA, mu: thermo.muA }, B: { beta: thermo.betaB, mu: thermo.muB } },
  });
}

/**
 * Brute-force two-point measurement for a tiny system, by enumeration:
 * P(S, Y) = Π_{l∈S} f_l Π_{l∉S} (1 − f_l) · |det Ũ_{Y,S}|² over all sets of
 * initially occupied modes S and finally occupied modes Y with |Y| = |S|
 * (Slater determinants: the amplitude of finding Y given S is det Ũ_{Y,S}).
 * Returns every outcome with its probability.
 */
export function bruteForceOutcomes(sys: FermionSystem, u: ComplexMatrix): { dE_A: number; dE_B: number; dN: number; p: number }[] {
  const n = sys.n;
  const out: { dE_A: number; dE_B: number; dN: number; p: number }[] = [];
  const members = (mask: number) => Array.from({ length: n }, (_, i) => i).filter((i) => mask & (1 << i));
  for (let s = 0; s < 1 << n; s++) {
    let w = 1;
    for (let l = 0; l < n; l++) w *= s & (1 << l) ? sys.occupation[l] : 1 - sys.occupation[l];
    const S = members(s);
    for (let y = 0; y < 1 << n; y++) {
      const Y = members(y);
      if (Y.length !== S.length) continue;
      let amp2 = 1;
      if (S.length > 0) {
        const k = S.length;
        const re = new Float64Array(k * k);
        const im = new Float64Array(k * k);
        Y.forEach((row, i) => S.forEach((col, j) => {
          re[i * k + j] = u.re[row * n + col];
          im[i * k + j] = u.im[row * n + col];
        }));
        const d = complexDeterminant(k, re, im);
        amp2 = d.re * d.re + d.im * d.im;
      }
      const p = w * amp2;
      if (p === 0) continue;
      let eA = 0;
      let eB = 0;
      let nB = 0;
      for (let m = 0; m < n; m++) {
        const change = ((y >> m) & 1) - ((s >> m) & 1);
        if (sys.region[m] === 0) eA += change * sys.energy[m];
        else {
          eB += change * sys.energy[m];
          nB += change;
        }
      }
      out.push({ dE_A: eA, dE_B: eB, dN: nB, p });
    }
  }
  return out;
}

/** Sample mean, covariance and standard errors of the mean and of each covariance entry. */
export function sampleMoments(cols: Float64Array[]): { mean: number[]; cov: number[][]; seMean: number[]; seCov: number[][] } {
  const N = cols[0].length;
  const d = cols.length;
  const mean = cols.map((c) => c.reduce((s, x) => s + x, 0) / N);
  const cov = Array.from({ length: d }, () => new Array<number>(d).fill(0));
  const seCov = Array.from({ length: d }, () => new Array<number>(d).fill(0));
  for (let a = 0; a < d; a++) {
    for (let b = 0; b < d; b++) {
      let s = 0;
      let s2 = 0;
      for (let i = 0; i < N; i++) {
        const x = (cols[a][i] - mean[a]) * (cols[b][i] - mean[b]);
        s += x;
        s2 += x * x;
      }
      cov[a][b] = s / (N - 1);
      // Standard error of a sample covariance: sd of the centred products over √N (delta method, large N).
      seCov[a][b] = Math.sqrt(Math.max(0, s2 / N - (s / N) ** 2) / N);
    }
  }
  const seMean = cov.map((row, a) => Math.sqrt(row[a] / N));
  return { mean, cov, seMean, seCov };
}
