import { describe, expect, it } from "vitest";
import { exactMoments } from "../../src/synth/exactMoments.ts";
import { particleCountingDistribution } from "../../src/synth/particleCounting.ts";
import { FermionSampler } from "../../src/synth/fermionSampler.ts";
import { ProjectionDppSampler } from "../../src/synth/projectionDpp.ts";
import { meanTransferSeries } from "../../src/synth/meanTransfer.ts";
import { hermitianEigen } from "../../src/synth/hermitianEigen.ts";
import { propagatorIn } from "../../src/synth/timeEvolution.ts";
import { complexDeterminant } from "../../src/synth/complexDeterminant.ts";
import { complexIdentity, complexZeros } from "../../src/synth/complexMatrix.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { chiSquareSf } from "../../src/stats/chiSquare.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { bruteForceOutcomes, chain, ring, system } from "./fermionFixtures.ts";

// A tiny complex case: a 2-site chain and a 3-site ring joined by two bonds with a Peierls phase,
// so the evolution is complex and time reversal is broken; B has an on-site offset and its own hopping.
const tiny = () => system(chain(2, 1, 0.2), ring(3, 0.8, -0.1), { strength: 0.6, bonds: 2, flux: 0.9 }, { betaA: 1.2, muA: 0.3, betaB: 0.7, muB: -0.2 });

describe("exact moments and counting distribution against brute-force enumeration", () => {
  it("exactMoments equals the enumerated two-point measurement moments (exact algebra)", () => {
    const sys = tiny();
    for (const t of [0.4, 2.3, 7]) {
      const u = sys.propagator.at(t);
      const outcomes = bruteForceOutcomes(sys, u);
      const total = outcomes.reduce((s, o) => s + o.p, 0);
      expectClose(total, 1, { atol: 1e-12, source: "probabilities sum to 1 (unitarity)" });
      const keys = ["dE_A", "dE_B", "dN"] as const;
      const mean = keys.map((k) => outcomes.reduce((s, o) => s + o.p * o[k], 0));
      const m = exactMoments(sys, u);
      for (let a = 0; a < 3; a++) {
        expectClose(m.mean[a], mean[a], { atol: 1e-12, source: "enumeration of all initial and final Fock states" });
        for (let b = 0; b < 3; b++) {
          const cov = outcomes.reduce((s, o) => s + o.p * (o[keys[a]] - mean[a]) * (o[keys[b]] - mean[b]), 0);
          expectClose(m.covariance[a][b], cov, { atol: 1e-12, source: "enumeration of all initial and final Fock states" });
        }
      }
      const series = meanTransferSeries(sys, sys.propagator)(t);
      expectClose(series.dN, mean[2], { atol: 1e-12, source: "enumeration" });
      expectClose(series.dE_A, mean[0], { atol: 1e-12, source: "enumeration" });
      expectClose(series.dE_B, mean[1], { atol: 1e-12, source: "enumeration" });
    }
  });

  it("Klich's determinant formula gives the enumerated distribution of dN (exact inversion)", () => {
    const sys = tiny();
    const u = sys.propagator.at(3.1);
    const outcomes = bruteForceOutcomes(sys, u);
    const dist = particleCountingDistribution(sys, u);
    expect(dist.qMin).toBe(-3);
    for (let q = -3; q <= 2; q++) {
      const p = outcomes.filter((o) => o.dN === q).reduce((s, o) => s + o.p, 0);
      expectClose(dist.probability[q - dist.qMin], p, { atol: 1e-12, source: "enumeration; Klich (2003) determinant formula" });
    }
  });
});

describe("exact samplers", () => {
  it("ProjectionDppSampler draws each set Y with probability |det V_Y|² (chi-square goodness of fit)", () => {
    // V: three orthonormal columns of a random 6 × 6 unitary (exp(−iH) of a random Hermitian H).
    const rng0 = rngFromText("dpp-unitary");
    const h = complexZeros(6, 6);
    for (let i = 0; i < 6; i++) {
      h.re[i * 6 + i] = rng0.normal();
      for (let j = 0; j < i; j++) {
        h.re[i * 6 + j] = h.re[j * 6 + i] = rng0.normal();
        h.im[i * 6 + j] = rng0.normal();
        h.im[j * 6 + i] = -h.im[i * 6 + j];
      }
    }
    const u = propagatorIn(hermitianEigen(h), complexIdentity(6)).at(1);
    const k = 3;
    const v = new Float64Array(2 * 6 * k);
    for (let i = 0; i < 6; i++) for (let c = 0; c < k; c++) {
      v[2 * (i * k + c)] = u.re[i * 6 + c];
      v[2 * (i * k + c) + 1] = u.im[i * 6 + c];
    }
    const expected = new Map<number, number>();
    for (let y = 0; y < 64; y++) {
      const Y = [0, 1, 2, 3, 4, 5].filter((i) => y & (1 << i));
      if (Y.length !== k) continue;
      const re = new Float64Array(9);
      const im = new Float64Array(9);
      Y.forEach((row, a) => [0, 1, 2].forEach((c) => {
        re[a * 3 + c] = u.re[row * 6 + c];
        im[a * 3 + c] = u.im[row * 6 + c];
      }));
      const d = complexDeterminant(3, re, im);
      expected.set(y, d.re * d.re + d.im * d.im);
    }
    const sampler = new ProjectionDppSampler(6, k);
    const rng = rngFromText("dpp-draws");
    const N = 40000;
    const counts = new Map<number, number>();
    const out = new Uint8Array(6);
    for (let r = 0; r < N; r++) {
      sampler.sample(v, k, rng, out);
      let y = 0;
      for (let i = 0; i < 6; i++) if (out[i]) y |= 1 << i;
      counts.set(y, (counts.get(y) ?? 0) + 1);
    }
    expect([...counts.keys()].every((y) => expected.has(y))).toBe(true);
    let chi2 = 0;
    let cells = 0;
    for (const [y, p] of expected) {
      if (p * N < 5) continue; // Cochran's rule: expected counts of at least 5
      chi2 += ((counts.get(y) ?? 0) - p * N) ** 2 / (p * N);
      cells++;
    }
    // Pearson (1900) statistic with cells − 1 degrees of freedom; reject below p = 0.001 (fixed seed).
    expect(chiSquareSf(chi2, cells - 1)).toBeGreaterThan(0.001);
  });

  it("FermionSampler reproduces the enumerated joint law of (dE_A, dE_B, dN) (chi-square goodness of fit)", () => {
    const sys = tiny();
    const u = sys.propagator.at(2.3);
    const key = (a: number, b: number, n: number) => `${a.toFixed(8)}|${b.toFixed(8)}|${n}`;
    const expected = new Map<string, number>();
    for (const o of bruteForceOutcomes(sys, u)) {
      const k = key(o.dE_A, o.dE_B, o.dN);
      expected.set(k, (expected.get(k) ?? 0) + o.p);
    }
    const N = 60000;
    const out = { dE_A: new Float64Array(N), dE_B: new Float64Array(N), dN: new Float64Array(N) };
    new FermionSampler(sys, u.re, u.im).sampleInto(rngFromText("tiny-joint"), N, out);
    const counts = new Map<string, number>();
    for (let i = 0; i < N; i++) {
      const k = key(out.dE_A[i], out.dE_B[i], out.dN[i]);
      counts.set(k, (counts.get(k) ?? 0) + 1);
    }
    expect([...counts.keys()].every((k) => expected.has(k))).toBe(true);
    let chi2 = 0;
    let cells = 0;
    let restObserved = 0;
    let restExpected = 0;
    for (const [k, p] of expected) {
      if (p * N < 5) {
        restObserved += counts.get(k) ?? 0;
        restExpected += p * N;
        continue;
      }
      chi2 += ((counts.get(k) ?? 0) - p * N) ** 2 / (p * N);
      cells++;
    }
    if (restExpected >= 5) {
      chi2 += (restObserved - restExpected) ** 2 / restExpected;
      cells++;
    }
    expect(cells).toBeGreaterThan(20);
    // Pearson (1900) with cells − 1 degrees of freedom; reject below p = 0.001 (fixed seed).
    expect(chiSquareSf(chi2, cells - 1)).toBeGreaterThan(0.001);
  });
});
