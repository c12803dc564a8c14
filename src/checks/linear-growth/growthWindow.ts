import { findLinearWindow, type LinearWindowSearch } from "../../stats/changePoint.ts";
import { weightedFit } from "../../stats/weightedLeastSquares.ts";
import { normalQuantile, normalTwoSidedP } from "../../stats/normal.ts";
import { tost, type TostResult } from "../../stats/tost.ts";
import type { ChannelCurve } from "./series.ts";

/**
 * The verdict of one channel:
 * - `linear`: a window of at least minPoints contact times where the mean
 *   transfer is a straight line (residual and end-point tests), with a slope
 *   significantly different from zero and a slope change across the window
 *   bounded within the margin (two one-sided tests on the curvature): a
 *   stationary flux exists and is resolved;
 * - `no-growth`: a linear window whose slope is not significantly non-zero;
 * - `unresolved`: a window exists but its curvature is not bounded within the
 *   margin, or no run passes the tests while some short runs are not rejected;
 * - `nowhere-linear`: every run of minPoints consecutive contact times curves
 *   significantly (an intersection–union test at alpha: Berger, Technometrics
 *   24, 295 (1982)), so the data show no stationary regime;
 * - `too-few`: fewer than minPoints contact times.
 */
export type ChannelVerdict = "linear" | "no-growth" | "unresolved" | "nowhere-linear" | "too-few";

export interface FiniteSizeFlag {
  kind: "saturation" | "recurrence" | "faster growth" | "departure";
  description: string;
}

export interface ChannelGrowth {
  curve: ChannelCurve;
  verdict: ChannelVerdict;
  search: LinearWindowSearch | null;
  flux: number | null;
  fluxSe: number | null;
  fluxCi: [number, number] | null;
  /** Relative change of the slope across the window, with its TOST decision. */
  slopeChange: TostResult | null;
  growthP: number | null;
  transient: boolean;
  finiteSize: FiniteSizeFlag | null;
}

export interface GrowthOptions {
  minPoints: number;
  alpha: number;
  confidence: number;
  margin: number;
  relativeFloor: number;
}

function finiteSizeFlag(search: LinearWindowSearch, curve: ChannelCurve, slope: number): FiniteSizeFlag | null {
  const w = search.window!;
  if (!w.finish) return null;
  const after = curve.y.slice(w.end + 1);
  const peak = Math.max(...curve.y.slice(w.start, w.end + 1).map((y) => y * Math.sign(slope)));
  // Recurrence: the transfer turns back below its value at the window's end by more than the noise.
  const sigmaEnd = search.sigma[w.end];
  const turnsBack = after.some((y, k) => Math.sign(slope) * y < peak - 3 * Math.max(sigmaEnd, search.sigma[w.end + 1 + k]));
  if (turnsBack) return { kind: "recurrence", description: "the mean transfer turns back after the window (a recurrence: the signal has crossed the smaller reservoir and returned)" };
  if (w.finish.slopeOutside === null) return { kind: "departure", description: "the last contact time leaves the line; more contact times beyond it would tell saturation from recurrence" };
  const ratio = w.finish.slopeOutside / slope;
  if (ratio < 1) return { kind: "saturation", description: `growth slows after the window (slope ${ratio < 0.05 ? "near zero" : `${(100 * ratio).toFixed(0)} % of the flux`}): finite-size saturation` };
  return { kind: "faster growth", description: "the transfer grows faster after the window; this is not a finite-size signature" };
}

export function analyseChannel(curve: ChannelCurve, o: GrowthOptions): ChannelGrowth {
  const empty = { search: null, flux: null, fluxSe: null, fluxCi: null, slopeChange: null, growthP: null, transient: false, finiteSize: null };
  if (curve.t.length < o.minPoints) return { curve, verdict: "too-few", ...empty };
  const search = findLinearWindow(curve.t, curve.y, curve.u, { minPoints: o.minPoints, alpha: o.alpha, relativeFloor: o.relativeFloor });
  const w = search.window;
  if (!w) {
    const verdict = search.minimalRuns > 0 && search.minimalRunsRejected === search.minimalRuns ? "nowhere-linear" : "unresolved";
    return { curve, verdict, ...empty, search };
  }
  const flux = w.fit.slope;
  const fluxSe = Math.sqrt(w.fit.varSlope);
  const z = normalQuantile((1 + o.confidence) / 2);
  const growthP = normalTwoSidedP(flux / fluxSe);
  // Curvature inside the window: y = c + J (t − t̄) + q (t − t̄)²; the slope changes by 2 q (t_end − t_start) across it.
  const ts = curve.t.slice(w.start, w.end + 1);
  const tBar = w.fit.tBar;
  const span = ts[ts.length - 1] - ts[0];
  let slopeChange: TostResult | null = null;
  if (ts.length >= 3 && flux !== 0) {
    const quad = weightedFit(
      ts.map((t) => [1, t - tBar, (t - tBar) ** 2]),
      curve.y.slice(w.start, w.end + 1),
      Array.from(search.sigma.slice(w.start, w.end + 1)),
    );
    const factor = (2 * span) / Math.abs(flux);
    slopeChange = tost({ estimate: quad.coefficients[2] * factor, se: quad.standardErrors[2] * factor, lower: -o.margin, upper: o.margin, alpha: 1 - o.confidence });
  }
  const verdict: ChannelVerdict = growthP >= o.alpha ? "no-growth" : slopeChange?.equivalent ? "linear" : "unresolved";
  return {
    curve,
    verdict,
    search,
    flux,
    fluxSe,
    fluxCi: [flux - z * fluxSe, flux + z * fluxSe],
    slopeChange,
    growthP,
    transient: w.onset !== null,
    finiteSize: finiteSizeFlag(search, curve, flux),
  };
}
