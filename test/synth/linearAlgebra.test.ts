import { describe, expect, it } from "vitest";
import { symmetricEigen } from "../../src/synth/symmetricEigen.ts";
import { hermitianEigen } from "../../src/synth/hermitianEigen.ts";
import { complexAdjoint, complexIdentity, complexMaxDifference, complexMultiply, complexZeros, type ComplexMatrix } from "../../src/synth/complexMatrix.ts";
import { complexDeterminant } from "../../src/synth/complexDeterminant.ts";
import { buildLattice } from "../../src/synth/lattice.ts";
import { contactHamiltonian } from "../../src/synth/fermionModel.ts";
import { propagatorIn } from "../../src/synth/timeEvolution.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

function randomSymmetric(n: number, seed: string): Float64Array {
  const rng = rngFromText(seed);
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) a[i * n + j] = a[j * n + i] = rng.normal();
  return a;
}

function randomHermitian(n: number, seed: string): ComplexMatrix {
  const rng = rngFromText(seed);
  const h = complexZeros(n, n);
  for (let i = 0; i < n; i++) {
    h.re[i * n + i] = rng.normal();
    for (let j = 0; j < i; j++) {
      const r = rng.normal();
      const m = rng.normal();
      h.re[i * n + j] = r;
      h.im[i * n + j] = m;
      h.re[j * n + i] = r;
      h.im[j * n + i] = -m;
    }
  }
  return h;
}

describe("symmetricEigen", () => {
  it("symmetricEigen reproduces the ring spectrum −2J cos(2πk/N), doubly degenerate (exact, Ashcroft & Mermin ch. 10 tight binding)", () => {
    const lattice = buildLattice({ kind: "ring", length: 10, width: 1, hopping: 1.3, onsite: -0.2 });
    const { values } = symmetricEigen(lattice.hamiltonian, 10);
    const exact = Array.from({ length: 10 }, (_, k) => -0.2 - 2 * 1.3 * Math.cos((2 * Math.PI * k) / 10)).sort((x, y) => x - y);
    for (let k = 0; k < 10; k++) expectClose(values[k], exact[k], { atol: 1e-13, source: "ring: E_k = ε − 2J cos(2πk/N), exact" });
  });

  it("symmetricEigen returns orthonormal vectors with A v = λ v (exact identity)", () => {
    const n = 30;
    const a = randomSymmetric(n, "sym-30");
    const { values, vectors } = symmetricEigen(a, n);
    let worst = 0;
    for (let k = 0; k < n; k++) {
      for (let i = 0; i < n; i++) {
        let av = 0;
        for (let j = 0; j < n; j++) av += a[i * n + j] * vectors[j * n + k];
        worst = Math.max(worst, Math.abs(av - values[k] * vectors[i * n + k]));
      }
      for (let l = 0; l < n; l++) {
        let dot = 0;
        for (let i = 0; i < n; i++) dot += vectors[i * n + k] * vectors[i * n + l];
        worst = Math.max(worst, Math.abs(dot - (k === l ? 1 : 0)));
      }
    }
    // 1e-12: rounding of an n = 30 orthogonal reduction (~n ε ‖A‖).
    expect(worst).toBeLessThan(1e-12);
  });

  it("symmetricEigen reproduces the open-chain spectrum −2J cos(πk/(N+1)) (exact, Ashcroft & Mermin ch. 10 tight binding)", () => {
    const lattice = buildLattice({ kind: "chain", length: 12, width: 1, hopping: 0.7, onsite: 0.1 });
    const { values } = symmetricEigen(lattice.hamiltonian, 12);
    const exact = Array.from({ length: 12 }, (_, k) => 0.1 - 2 * 0.7 * Math.cos((Math.PI * (k + 1)) / 13)).sort((x, y) => x - y);
    for (let k = 0; k < 12; k++) expectClose(values[k], exact[k], { atol: 1e-13, source: "open chain: E_k = ε − 2J cos(πk/(N+1)), exact" });
  });
});

describe("hermitianEigen", () => {
  it("hermitianEigen reconstructs a random complex Hermitian matrix as W diag(λ) W† with W unitary", () => {
    const n = 25;
    const h = randomHermitian(n, "herm-25");
    const { values, vectors } = hermitianEigen(h);
    const scaled = complexZeros(n, n);
    for (let i = 0; i < n; i++) {
      for (let k = 0; k < n; k++) {
        scaled.re[i * n + k] = vectors.re[i * n + k] * values[k];
        scaled.im[i * n + k] = vectors.im[i * n + k] * values[k];
      }
    }
    // 1e-11: rounding of a 2n = 50 real eigenproblem with ‖H‖ ~ 10.
    expect(complexMaxDifference(complexMultiply(scaled, complexAdjoint(vectors)), h)).toBeLessThan(1e-11);
    expect(complexMaxDifference(complexMultiply(vectors, vectors, true), complexIdentity(n))).toBeLessThan(1e-12);
  });

  it("hermitianEigen handles the doubly degenerate levels of a ring threaded by contact flux", () => {
    // Two 6-site rings joined by three bonds with a Peierls phase: complex, with degeneracies in each ring.
    const a = buildLattice({ kind: "ring", length: 6, width: 1, hopping: 1, onsite: 0 });
    const b = buildLattice({ kind: "ring", length: 6, width: 1, hopping: 1, onsite: 0 });
    for (const strength of [0, 0.4]) {
      const h = contactHamiltonian(a, b, { strength, bonds: 3, flux: 0.9 });
      const { values, vectors } = hermitianEigen(h);
      expect(complexMaxDifference(complexMultiply(vectors, vectors, true), complexIdentity(12))).toBeLessThan(1e-12);
      const scaled = complexZeros(12, 12);
      for (let i = 0; i < 12; i++) {
        for (let k = 0; k < 12; k++) {
          scaled.re[i * 12 + k] = vectors.re[i * 12 + k] * values[k];
          scaled.im[i * 12 + k] = vectors.im[i * 12 + k] * values[k];
        }
      }
      expect(complexMaxDifference(complexMultiply(scaled, complexAdjoint(vectors)), h)).toBeLessThan(1e-12);
    }
  });

  it("propagatorIn gives a unitary exp(−iHt) that composes: U(s) U(t) = U(s + t)", () => {
    const h = randomHermitian(10, "herm-10");
    const p = propagatorIn(hermitianEigen(h), complexIdentity(10));
    const u1 = p.at(0.7);
    const u2 = p.at(1.9);
    expect(complexMaxDifference(complexMultiply(u1, u1, true), complexIdentity(10))).toBeLessThan(1e-12);
    expect(complexMaxDifference(complexMultiply(u1, u2), p.at(2.6))).toBeLessThan(1e-11);
    // Small t: U ≈ 1 − iHt = (1 + t Im H) − i t Re H; the remainder is ≤ (‖H‖t)²/2 ~ 1e-10.
    const t = 1e-6;
    const u = p.at(t);
    let worst = 0;
    for (let i = 0; i < 100; i++) {
      const delta = i % 11 === 0 ? 1 : 0;
      worst = Math.max(worst, Math.abs(u.re[i] - delta - t * h.im[i]), Math.abs(u.im[i] + t * h.re[i]));
    }
    expect(worst).toBeLessThan(1e-10);
  });
});

describe("complexDeterminant", () => {
  it("complexDeterminant of a 2 × 2 matrix is ad − bc (exact algebra)", () => {
    // [[1+2i, 3−i], [−2+0.5i, 4i]]: ad − bc = (1+2i)(4i) − (3−i)(−2+0.5i) = (−8+4i) − (−5.5+3.5i) = −2.5+0.5i.
    const d = complexDeterminant(2, Float64Array.of(1, 3, -2, 0), Float64Array.of(2, -1, 0.5, 4));
    expectClose(d.re, -2.5, { atol: 1e-14, source: "ad − bc by hand" });
    expectClose(d.im, 0.5, { atol: 1e-14, source: "ad − bc by hand" });
  });

  it("complexDeterminant of a unitary matrix has modulus 1", () => {
    const u = propagatorIn(hermitianEigen(randomHermitian(8, "herm-8")), complexIdentity(8)).at(1.3);
    const d = complexDeterminant(8, u.re, u.im);
    expectClose(Math.hypot(d.re, d.im), 1, { atol: 1e-12, source: "|det U| = 1 for unitary U" });
  });
});
