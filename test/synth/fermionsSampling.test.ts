import { describe, expect, it } from "vitest";
import { exactMoments } from "../../src/synth/exactMoments.ts";
import { FermionSampler } from "../../src/synth/fermionSampler.ts";
import { meanTransferSeries } from "../../src/synth/meanTransfer.ts";
import { fermionTask } from "../../src/synth/blockTask.ts";
import { runBlocks } from "../../src/synth/workerPool.ts";
import type { FermionSystem } from "../../src/synth/fermionModel.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { chain, grid, ring, sampleMoments, system } from "./fermionFixtures.ts";

function sample(sys: FermionSystem, t: number, N: number, seed: string): Float64Array[] {
  const u = sys.propagator.at(t);
  const out = { dE_A: new Float64Array(N), dE_B: new Float64Array(N), dN: new Float64Array(N) };
  new FermionSampler(sys, u.re, u.im).sampleInto(rngFromText(seed), N, out);
  return [out.dE_A, out.dE_B, out.dN];
}

const thermo = { betaA: 1, muA: 0.4, betaB: 2.5, muB: -0.1 };
const cases: [string, () => FermionSystem, number][] = [
  ["chain 9 + chain 6", () => system(chain(9), chain(6, 0.8, 0.2), { strength: 0.5 }, thermo), 6],
  ["ring 7 + chain 5", () => system(ring(7), chain(5), { strength: 0.7, bonds: 2 }, thermo), 4],
  ["grid 3x3 + grid 2x3", () => system(grid(3, 3), grid(2, 3, 1.2), { strength: 0.4, bonds: 3 }, thermo), 3],
  ["chain 6 + ring 6 with a Peierls phase", () => system(chain(6), ring(6), { strength: 0.6, bonds: 2, flux: 1.1 }, thermo), 5],
];

describe("sampled moments agree with the exact ones", () => {
  for (const [name, build, t] of cases) {
    it(`${name}: sample means and covariances of (dE_A, dE_B, dN) lie within 4.5 standard errors of the exact values`, () => {
      const sys = build();
      const N = 12000;
      const cols = sample(sys, t, N, `moments ${name}`);
      const exact = exactMoments(sys, sys.propagator.at(t));
      const s = sampleMoments(cols);
      // 12 comparisons per case (3 means, 6 distinct covariances, counted generously): |z| < 4.5 has a
      // two-sided false-alarm rate of 7e-6 each, so the whole file stays below 1e-3 (seeds are fixed anyway).
      for (let a = 0; a < 3; a++) {
        expectClose(s.mean[a], exact.mean[a], { atol: 4.5 * s.seMean[a], source: "exactMoments (single-particle correlation matrices)" });
        for (let b = a; b < 3; b++) {
          expectClose(s.cov[a][b], exact.covariance[a][b], { atol: 4.5 * s.seCov[a][b] + 1e-12, source: "exactMoments (single-particle correlation matrices)" });
        }
      }
    });
  }
});

describe("identical reservoirs", () => {
  // Mirror symmetry A ↔ B of the whole set-up (common practice, no source): nothing is transferred on average.
  for (const [name, spec] of [
    ["chains of 10", chain(10)],
    ["3x4 grids", grid(3, 4)],
    ["rings of 7", ring(7)],
  ] as const) {
    it(`identical ${name} at the same temperature and chemical potential: ⟨dN⟩ = ⟨Q⟩ = 0 at every contact time`, () => {
      const sys = system(spec, spec, { strength: 0.5, bonds: 2 }, { betaA: 1.5, muA: 0.2, betaB: 1.5, muB: 0.2 });
      const series = meanTransferSeries(sys, sys.propagator);
      for (const t of [0.5, 2, 5, 13, 40, 97]) {
        const m = series(t);
        // 1e-12: exact cancellation up to rounding of O(n³) sums of O(1) numbers.
        expectClose(m.dN, 0, { atol: 1e-12, source: "A ↔ B mirror symmetry (common practice)" });
        expectClose((m.dE_B - m.dE_A) / 2, 0, { atol: 1e-12, source: "A ↔ B mirror symmetry (common practice)" });
      }
      // The sampler agrees: mean transfer within 4.5 standard errors of zero.
      const cols = sample(sys, 5, 8000, `identical ${name}`);
      const s = sampleMoments(cols);
      expectClose(s.mean[2], 0, { atol: 4.5 * s.seMean[2], source: "A ↔ B mirror symmetry (common practice)" });
    });
  }
});

describe("worker pool", () => {
  it("runBlocks gives the same realisations in this thread and on two worker threads", async () => {
    const sys = system(chain(8), chain(7), { strength: 0.5 }, thermo);
    const task = fermionTask(sys, sys.propagator.at(3));
    const inThread = await runBlocks(task, 1300, "pool", { workers: 0, blockSize: 250 });
    let progress = 0;
    const onWorkers = await runBlocks(task, 1300, "pool", { workers: 2, blockSize: 250, onProgress: (done) => (progress = done) });
    expect(progress).toBe(1300);
    for (let c = 0; c < 3; c++) expect(Array.from(onWorkers[c])).toEqual(Array.from(inThread[c]));
  });
});
