// Coverage of the block bootstrap on windows cut from simulated traces (a benchmark, not a test):
// for each of TRACE_COVERAGE_TRACES (default 200) stationary double-dot trajectories, the windows of one
// length become a samples dataset as `kind: trace` builds it, and the 95 % BCa intervals of two
// quantities with exactly known values are formed: ⟨e^−Σ_tot⟩ = 1 (Seifert, PRL 95, 040602 (2005)) and
// the mean count ⟨n⟩ = J τ (stationarity; J from the tilted generator's Perron root). Printed: the
// fraction of traces whose interval covers the truth, with blocks and, for comparison, treating the
// windows as independent. `npm run bench -- traceCoverage`; TRACE_COVERAGE_WINDOWS sets windows per trace.
import { samplesFromColumns } from "../src/ingest/samples.ts";
import { blockLengthFor } from "../src/ingest/trace/blockLength.ts";
import { cutWindows } from "../src/ingest/trace/cutWindows.ts";
import { resamplingUnits } from "../src/checks/resamplingUnits.ts";
import { bcaInterval, bootstrapRatio } from "../src/stats/bootstrap.ts";
import { rngFromText } from "../src/stats/rng.ts";
import { simulateTrajectory, stationaryDistribution, tiltedGeneratorEigenvalue } from "../src/synth/countingModel.ts";
import { doubleDotModel, intoB } from "../src/synth/dotModels.ts";
import { betaPerMeV } from "../src/synth/units.ts";
import type { SamplesDatasetConfig } from "../src/config/types.ts";
import type { SamplesDataset } from "../src/ingest/types.ts";

export async function run(): Promise<Record<string, unknown>> {
  const traces = Number(process.env.TRACE_COVERAGE_TRACES ?? 200);
  const windowsPerTrace = Number(process.env.TRACE_COVERAGE_WINDOWS ?? 2000);
  const tau = 1; // ns: short windows, where neighbours are most correlated
  const beta = betaPerMeV(1);
  const model = doubleDotModel({ levelLeft: 0.1, levelRight: 0.1, rateA: 1, rateB: 1, rateInter: 0.3, beta: { A: beta, B: beta }, mu: { A: 0.08, B: 0 }, interBeta: null });
  const p = stationaryDistribution(model);
  const h = 1e-5;
  const current = (tiltedGeneratorEigenvalue(model, intoB, h) - tiltedGeneratorEigenvalue(model, intoB, -h)) / (2 * h);
  const config: SamplesDatasetConfig = {
    id: "bench",
    kind: "samples",
    file: "bench",
    columns: { dE_A: "dE_A", dE_B: "dE_B", dN_A: "dN_A", dN_B: "dN_B", state_start: "state_start", state_end: "state_end" },
    energy_unit: "meV",
    reservoirs: { A: { T: 1, mu: 0.08 }, B: { T: 1, mu: 0 } },
    tau: tau * 1e-9,
    work: "measured",
  };
  const covered = { expBlocks: 0, expIid: 0, meanBlocks: 0, meanIid: 0 };
  let blockLengths = 0;
  const started = performance.now();
  for (let k = 0; k < traces; k++) {
    const t = simulateTrajectory(model, p, windowsPerTrace * tau, rngFromText(`trace coverage ${k}`));
    const times = Float64Array.from([0, ...t.times]);
    const states = Int32Array.from([t.initial, ...t.states]);
    const jumps = [null, ...Array.from(t.transitions, (i) => model.transitions[i])];
    const w = cutWindows(times, states, jumps, tau);
    const n = w.start.length;
    const base = samplesFromColumns(config, "bench", { dE_A: w.dE_A, dE_B: w.dE_B, dN_A: w.dN_A, dN_B: w.dN_B, state_start: w.start, state_end: w.end }, n, Uint32Array.from({ length: n }, (_, i) => i + 1), `bench-${k}`);
    const block = blockLengthFor([w.dN_B, base.sigma]);
    blockLengths += block.length;
    const blocked: SamplesDataset = {
      ...base,
      windows: { block: Int32Array.from({ length: n }, (_, i) => Math.floor(i / block.length)), blocks: Math.ceil(n / block.length), blockLength: block.length, correlationWindows: block.correlation, rule: "bench" },
    };
    const u = Float64Array.from(base.sigma, (s) => Math.exp(-s));
    const du = Float64Array.from(u, (x) => -x);
    const nB = Float64Array.from(w.dN_B);
    const interval = (d: SamplesDataset, x: Float64Array, dx: Float64Array | null, stream: string) => {
      const units = resamplingUnits(d, x, dx);
      return bcaInterval(bootstrapRatio(units.u, units.v, units.weight, rngFromText(`${stream} ${k}`), { resamples: 1000 }), 0.95);
    };
    const inside = (ci: [number, number], truth: number) => (ci[0] <= truth && truth <= ci[1] ? 1 : 0);
    covered.expBlocks += inside(interval(blocked, u, du, "exp"), 1);
    covered.expIid += inside(interval(base, u, du, "exp"), 1);
    covered.meanBlocks += inside(interval(blocked, nB, null, "mean"), current * tau);
    covered.meanIid += inside(interval(base, nB, null, "mean"), current * tau);
  }
  const rate = (c: number) => c / traces;
  const result = {
    traces,
    windows_per_trace: windowsPerTrace,
    nominal: 0.95,
    mean_block_length: blockLengths / traces,
    coverage_exp_minus_sigma_blocks: rate(covered.expBlocks),
    coverage_exp_minus_sigma_independent: rate(covered.expIid),
    coverage_mean_count_blocks: rate(covered.meanBlocks),
    coverage_mean_count_independent: rate(covered.meanIid),
    seconds: (performance.now() - started) / 1000,
  };
  // Binomial standard error of a coverage near 0.95 over `traces` traces: √(0.95·0.05/traces).
  process.stdout.write(
    `   ${traces} traces of ${windowsPerTrace} windows (mean block ${result.mean_block_length.toFixed(2)} windows); coverage of the 95 % interval (±${(Math.sqrt(0.0475 / traces)).toFixed(3)}):\n` +
      `   ⟨e^−Σ_tot⟩ = 1: blocks ${result.coverage_exp_minus_sigma_blocks.toFixed(3)}, independent windows ${result.coverage_exp_minus_sigma_independent.toFixed(3)}\n` +
      `   ⟨n⟩ = Jτ:       blocks ${result.coverage_mean_count_blocks.toFixed(3)}, independent windows ${result.coverage_mean_count_independent.toFixed(3)}\n`,
  );
  return result;
}
