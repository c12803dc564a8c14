/**
 * What a trace says about each state of the conductor, whatever the leads:
 * the time spent in it, the jumps out of it (by the state jumped to) and the
 * durations of its complete stays (entered and left inside the record; the
 * first stay, begun before the record, and the last, still running at its
 * end, are censored). Rows that repeat the current state are not jumps.
 *
 * For a Markov conductor these are the sufficient statistics of its rates:
 * the likelihood of a record is Π_{x→y} Γ_{xy}^{N_{xy}} e^{−Γ_{xy} T_x}, so
 * Γ̂_{xy} = N_{xy}/T_x (Albert, Ann. Math. Stat. 33, 727 (1962); from memory).
 */
export interface StateOccupancy {
  label: number;
  /** Time spent in the state over the whole record (s), censored stays included. */
  time: number;
  /** Jumps out of the state, by the state jumped to (ascending). */
  exits: { to: number; count: number }[];
  /** Durations (s) of the complete stays, in time order. */
  dwells: number[];
}

export interface TraceOccupancy {
  /** Length of the record (s): from the first row to the last. */
  duration: number;
  /** Every state the trace shows, by label (ascending). */
  states: StateOccupancy[];
}

export function traceOccupancy(times: Float64Array, states: Int32Array): TraceOccupancy {
  const by = new Map<number, { time: number; exits: Map<number, number>; dwells: number[] }>();
  const entry = (label: number) => {
    let e = by.get(label);
    if (!e) by.set(label, (e = { time: 0, exits: new Map(), dwells: [] }));
    return e;
  };
  let current = states[0];
  let since = times[0];
  let complete = false; // the first stay began before the record
  entry(current);
  for (let i = 1; i < states.length; i++) {
    if (states[i] === current) continue;
    const e = entry(current);
    const stay = times[i] - since;
    e.time += stay;
    e.exits.set(states[i], (e.exits.get(states[i]) ?? 0) + 1);
    if (complete) e.dwells.push(stay);
    current = states[i];
    since = times[i];
    complete = true;
    entry(current);
  }
  entry(current).time += times[times.length - 1] - since;
  return {
    duration: times[times.length - 1] - times[0],
    states: [...by]
      .sort((a, b) => a[0] - b[0])
      .map(([label, e]) => ({ label, time: e.time, exits: [...e.exits].sort((a, b) => a[0] - b[0]).map(([to, count]) => ({ to, count })), dwells: e.dwells })),
  };
}
