/**
 * Transitions from a sampled detector signal by two thresholds with hysteresis
 * (a Schmitt trigger; common practice in single-electron counting, e.g.
 * Gustavsson et al., Phys. Rev. Lett. 96, 076605 (2006)): the state changes to
 * the high state when the level rises above `high` and to the low state when it
 * falls below `low`; levels in between keep the current state, so noise within
 * the band cannot produce false jumps. Samples before the first threshold
 * crossing are dropped (the state is not yet known).
 */
export interface DetectedTrace {
  /** Time of the first known state, then of each detected jump. */
  times: Float64Array;
  /** The state from that time on. */
  states: Int32Array;
  /** Index of the sample (0-based) that decided each entry, for messages. */
  sampleOf: Uint32Array;
}

export function detectTransitions(time: Float64Array, level: Float64Array, low: number, high: number, lowState: number, highState: number): DetectedTrace {
  const times: number[] = [];
  const states: number[] = [];
  const samples: number[] = [];
  let state: number | null = null;
  for (let i = 0; i < time.length; i++) {
    const v = level[i];
    let next: number | null = state;
    if (v > high) next = highState;
    else if (v < low) next = lowState;
    if (next !== null && next !== state) {
      times.push(time[i]);
      states.push(next);
      samples.push(i);
      state = next;
    }
  }
  return { times: Float64Array.from(times), states: Int32Array.from(states), sampleOf: Uint32Array.from(samples) };
}
