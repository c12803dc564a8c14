import type { TraceTransition } from "./transitionMap.ts";

/**
 * Consecutive windows [t₀ + kτ, t₀ + (k+1)τ) of a trace: per window the
 * particles and energy each lead gains (from the jumps inside it) and the
 * conductor's state at its two ends. Jumps at the very end of a window belong
 * to it; the trace's last, incomplete window is dropped.
 */
export interface TraceWindows {
  dN_A: Float64Array;
  dN_B: Float64Array;
  dE_A: Float64Array;
  dE_B: Float64Array;
  start: Float64Array;
  end: Float64Array;
}

export function cutWindows(times: Float64Array, states: Int32Array, jumps: (TraceTransition | null)[], tau: number): TraceWindows {
  const t0 = times[0];
  const span = times[times.length - 1] - t0;
  const count = Math.floor(span / tau);
  const w: TraceWindows = {
    dN_A: new Float64Array(count),
    dN_B: new Float64Array(count),
    dE_A: new Float64Array(count),
    dE_B: new Float64Array(count),
    start: new Float64Array(count),
    end: new Float64Array(count),
  };
  let j = 1;
  let state = states[0];
  for (let k = 0; k < count; k++) {
    const lo = t0 + k * tau;
    const hi = lo + tau;
    while (j < times.length && times[j] <= lo) state = states[j++];
    w.start[k] = state;
    while (j < times.length && times[j] <= hi) {
      const t = jumps[j];
      if (t) {
        w.dN_A[k] += t.dN_A;
        w.dN_B[k] += t.dN_B;
        w.dE_A[k] += t.dE_A;
        w.dE_B[k] += t.dE_B;
      }
      state = states[j++];
    }
    w.end[k] = state;
  }
  return w;
}
