import type { TraceDataset } from "../../ingest/types.ts";
import { exp } from "../../math/index.ts";
import type { PlotSpec, Series } from "../plotSpec.ts";
import type { JumpRate } from "./tunnellingRates.ts";

/** Points per state on the survival curve: enough to see a bend, few enough to read. */
const POINTS = 30;

/**
 * The fraction of complete stays in each state that last longer than t, on a
 * logarithmic axis, beside e^{−Γ_x t} with Γ_x the estimated total rate out of
 * x. For a Markovian conductor a stay in x ends at the constant rate Γ_x, so
 * its length is exponential (the memoryless property: Norris, Markov Chains,
 * 1997, Thm 2.3.3; from memory) and the markers follow the line; a bend shows
 * missed short stays (too few at small t) or a hidden state (a second slope),
 * the ways a real detector record departs from the assumption behind the rates.
 */
export function dwellSurvivalPlot(d: Pick<TraceDataset, "states">, rates: JumpRate[]): PlotSpec | null {
  const series: Series[] = [];
  for (const s of d.states) {
    const stays = [...s.dwells].sort((a, b) => a - b);
    const out = rates.filter((r) => r.from === s.label).reduce((a, r) => a + r.rate, 0);
    if (stays.length < 2 || !(out > 0)) continue;
    // Up to the stay that 1 % outlast: beyond it the fraction rests on a handful of stays.
    const end = stays[Math.floor(0.99 * (stays.length - 1))];
    if (!(end > 0)) continue;
    const t = Array.from({ length: POINTS }, (_, k) => (end * k) / (POINTS - 1));
    const longer = t.map((x) => stays.length - upperBound(stays, x));
    series.push({ type: "points", name: `stays in state ${s.label}`, x: t, y: longer.map((n) => n / stays.length) });
    series.push({ type: "line", name: `e^(−Γ t), Γ = total rate out of ${s.label}`, x: t, y: t.map((x) => exp(-out * x)), style: "dashed" });
  }
  if (series.length === 0) return null;
  return {
    id: "dwell-survival",
    title: "How long the conductor stays in each state",
    alt: "For each state, the fraction of complete stays longer than t (markers, logarithmic axis) and the exponential e^(−Γ t) that a Markovian conductor with the estimated total rate Γ out of that state gives (dashed). Markers on the line support the rates; a bend at short t points to missed short stays, a second slope to a state the detector does not see.",
    x: { label: "Time in the state t", unit: "s" },
    y: { label: "Fraction of stays longer than t", scale: "log" },
    series,
  };
}

/** Number of entries of the sorted `values` that are ≤ x. */
function upperBound(values: number[], x: number): number {
  let lo = 0;
  let hi = values.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (values[mid] <= x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
