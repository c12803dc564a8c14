import { samplesFromColumns } from "../../src/ingest/samples.ts";
import { blockLengthFor } from "../../src/ingest/trace/blockLength.ts";
import { cutWindows } from "../../src/ingest/trace/cutWindows.ts";
import type { SamplesDatasetConfig } from "../../src/config/types.ts";
import type { SamplesDataset } from "../../src/ingest/types.ts";
import { simulateTrajectory, type CountingModel } from "../../src/synth/countingModel.ts";
import type { Rng } from "../../src/stats/rng.ts";

/**
 * Windows of several lengths cut from one simulated stationary trajectory, each length a samples dataset
 * built as a `kind: trace` audit builds it (src/ingest/trace/loadTrace.ts): per-lead counts and energies,
 * the states at both window ends, p estimated from the start states, and blocks of consecutive windows of
 * twice the integrated autocorrelation time (at least 2). Times in ns, energies in meV, as `synth` writes.
 * Used by the tests and benchmarks of the statistics on trace windows.
 */
export interface TraceSetting {
  model: CountingModel;
  /** Stationary distribution of the model's states (the trajectory's start). */
  stationary: ArrayLike<number>;
  /** Declared leads (temperatures in K, chemical potentials in meV). */
  reservoirs: { A: { T: number; mu: number }; B: { T: number; mu: number } };
  /** Trace length, ns. */
  duration: number;
  /** Window lengths, ns. */
  taus: number[];
  series?: string;
}

export function traceWindowDatasets(s: TraceSetting, rng: Rng, id = "trace"): SamplesDataset[] {
  const t = simulateTrajectory(s.model, s.stationary, s.duration, rng);
  const times = Float64Array.from([0, ...t.times]);
  const states = Int32Array.from([t.initial, ...t.states]);
  const jumps = [null, ...Array.from(t.transitions, (i) => s.model.transitions[i])];
  // The trace's content: its last jump time and jump count stand in for the file digest.
  const digest = `${id}-${t.times.length}-${t.times[t.times.length - 1]}`;
  return s.taus.map((tau) => {
    const w = cutWindows(times, states, jumps, tau);
    const n = w.start.length;
    const config: SamplesDatasetConfig = {
      id: `${id}-tau-${tau}ns`,
      kind: "samples",
      file: `${id}.csv`,
      columns: { dE_A: "dE_A", dE_B: "dE_B", dN_A: "dN_A", dN_B: "dN_B", state_start: "state_start", state_end: "state_end" },
      energy_unit: "meV",
      reservoirs: s.reservoirs,
      tau: tau * 1e-9,
      work: "measured",
      series: s.series ?? id,
    };
    const lines = Uint32Array.from({ length: n }, (_, i) => i + 1);
    const d = samplesFromColumns(config, id, { dE_A: w.dE_A, dE_B: w.dE_B, dN_A: w.dN_A, dN_B: w.dN_B, state_start: w.start, state_end: w.end }, n, lines, digest);
    const block = blockLengthFor([w.dN_B, d.sigma]);
    return {
      ...d,
      windows: {
        block: Int32Array.from({ length: n }, (_, i) => Math.floor(i / block.length)),
        blocks: Math.ceil(n / block.length),
        blockLength: block.length,
        correlationWindows: block.correlation,
        rule: "twice the integrated autocorrelation time, at least 2",
      },
    };
  });
}
