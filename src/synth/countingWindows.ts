import { columnsToCsv, formatCell } from "./csv.ts";
import { exitRates, simulateTrajectory, type CountingModel, type Trajectory } from "./countingModel.ts";
import type { Rng } from "../stats/rng.ts";

/**
 * Windows of length τ cut from one stationary trajectory, separated by gaps so
 * that neighbouring windows are nearly independent (the state correlation
 * decays as e^{−g/t_rel}; see `windowGap`). Each window's counts: particles and
 * energy gained by each lead, and the conductor's state at both ends.
 */
export interface CountedWindows {
  trajectory: Trajectory;
  dN_A: Int32Array;
  dN_B: Int32Array;
  dE_A: Float64Array;
  dE_B: Float64Array;
  start: Int32Array;
  end: Int32Array;
}

/**
 * The gap between windows: four times the longest mean dwell time 1/min(exit rate), which for these
 * few-state conductors is at least the slowest relaxation time (for two states the relaxation rate is the
 * sum of the two exit rates), so the state correlation across a gap is below e^{−4} ≈ 2 %, and far less
 * for Σ, which depends on the boundary states only through a small term.
 */
export function windowGap(m: CountingModel): number {
  const rates = Array.from(exitRates(m)).filter((r) => r > 0);
  return 4 / Math.min(...rates);
}

export function countedWindows(m: CountingModel, p: ArrayLike<number>, tau: number, gap: number, count: number, rng: Rng): CountedWindows {
  const period = tau + gap;
  const trajectory = simulateTrajectory(m, p, count * period, rng);
  const out: CountedWindows = {
    trajectory,
    dN_A: new Int32Array(count),
    dN_B: new Int32Array(count),
    dE_A: new Float64Array(count),
    dE_B: new Float64Array(count),
    start: new Int32Array(count),
    end: new Int32Array(count),
  };
  let state = trajectory.initial;
  let j = 0;
  const jumps = trajectory.times.length;
  for (let k = 0; k < count; k++) {
    const t0 = k * period;
    const t1 = t0 + tau;
    while (j < jumps && trajectory.times[j] <= t0) state = trajectory.states[j++];
    out.start[k] = state;
    while (j < jumps && trajectory.times[j] <= t1) {
      const t = m.transitions[trajectory.transitions[j]];
      out.dN_A[k] += t.dN_A;
      out.dN_B[k] += t.dN_B;
      out.dE_A[k] += t.dE_A;
      out.dE_B[k] += t.dE_B;
      state = trajectory.states[j++];
    }
    out.end[k] = state;
  }
  return out;
}

/** The windows as a histogram: one row per distinct (dN_A, dN_B, start, end) with its count (energies follow from the counts). */
export function windowHistogramCsv(w: CountedWindows): string {
  const cells = new Map<string, { row: number[]; count: number }>();
  for (let k = 0; k < w.start.length; k++) {
    // Energies are sums of level energies: keyed as written (12 significant digits), so rounding in the sums cannot split a cell.
    const eA = Number(formatCell(w.dE_A[k]));
    const eB = Number(formatCell(w.dE_B[k]));
    const key = `${w.dN_A[k]},${w.dN_B[k]},${w.start[k]},${w.end[k]},${eA},${eB}`;
    const cell = cells.get(key);
    if (cell) cell.count++;
    else cells.set(key, { row: [eA, eB, w.dN_A[k], w.dN_B[k], w.start[k], w.end[k]], count: 1 });
  }
  const rows = [...cells.values()].sort((a, b) => a.row[3] - b.row[3] || a.row[2] - b.row[2] || a.row[4] - b.row[4] || a.row[5] - b.row[5]);
  const header = ["dE_A", "dE_B", "dN_A", "dN_B", "state_start", "state_end", "count"];
  return columnsToCsv(header, header.map((_, c) => rows.map((r) => (c < 6 ? r.row[c] : r.count))));
}

/** The trajectory as a trace file: time (ns) of each jump and the state after it; the first row is the state at time 0. */
export function traceCsv(t: Trajectory): string {
  const times = new Float64Array(t.times.length + 1);
  times.set(t.times, 1);
  const states = new Int32Array(t.states.length + 1);
  states[0] = t.initial;
  states.set(t.states, 1);
  return columnsToCsv(["time", "state"], [times, states]);
}
