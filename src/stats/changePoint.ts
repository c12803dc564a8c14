import { chiSquareSf } from "./chiSquare.ts";
import { normalTwoSidedP } from "./normal.ts";

/**
 * The window of a sampled curve y(t) where it is a straight line, with the
 * change points where that window begins (after a transient) and ends (at
 * saturation or recurrence).
 *
 * Method, in three steps:
 * 1. Every run of consecutive points (at least `minPoints`) is fitted by a
 *    weighted straight line. A run is linear when its residual chi-square is
 *    not significant at alpha and each of its two end points agrees with the
 *    line fitted to the rest of the run (a prediction-residual z test at
 *    alpha): the end-point test keeps one bent point from hiding in a long
 *    run's chi-square. The linear window is the longest such run (ties: the
 *    larger chi-square p-value).
 * 2. The change points are the join points of a segmented (two-phase) fit:
 *    the line of the window against the line of the points before it (onset)
 *    or after it (end). By Hudson's result the least-squares join lies at the
 *    intersection of the two separately fitted lines when that intersection
 *    falls between the adjacent samples; otherwise it sits at the bracket's
 *    edge (D. J. Hudson, J. Am. Stat. Assoc. 61, 1097 (1966)). With a single
 *    point outside the window the join is placed mid-bracket.
 * 3. When the points carry no uncertainties, their noise is estimated from
 *    the pseudo-residuals of consecutive triples (Gasser, Sroka &
 *    Jennen-Steinmetz, Biometrika 73, 625 (1986)), taken robustly as
 *    1.4826 × median absolute value (Hampel, J. Am. Stat. Assoc. 69, 383
 *    (1974)) so that the kinks themselves do not inflate it, and floored at a
 *    relative tolerance of the curve's size so that noise-free output of a
 *    simulation is judged linear to that tolerance.
 */
export interface LinearWindowOptions {
  /** Fewest points a linear window may have (≥ 3, so that its residual test has a degree of freedom). */
  minPoints: number;
  alpha: number;
  /** Noise floor as a fraction of max |y|, used only when uncertainties are estimated. */
  relativeFloor: number;
}

export interface LineFit {
  /** Fitted at the weighted mean time tBar, where intercept and slope are uncorrelated. */
  tBar: number;
  yBar: number;
  slope: number;
  varYBar: number;
  varSlope: number;
  chiSquare: number;
  dof: number;
  pValue: number;
  /** Value of the line at time t. */
  at(t: number): number;
  /** Variance of the line's value at time t. */
  varAt(t: number): number;
}

export interface ChangePoint {
  /** Sampled times on either side of the change: the last point outside and the first inside the window, in time order. */
  bracket: [number, number];
  /** Estimated time of the change (Hudson's join point). */
  time: number;
  /** Points outside the window on this side. */
  points: number;
  /** Slope of the line fitted to those points (null with fewer than two). */
  slopeOutside: number | null;
}

export interface LinearWindow {
  /** Indices of the first and last point of the window (inclusive), into the sorted input. */
  start: number;
  end: number;
  fit: LineFit;
  onset: ChangePoint | null;
  finish: ChangePoint | null;
}

export interface LinearWindowSearch {
  window: LinearWindow | null;
  /** Standard deviation used for each point. */
  sigma: Float64Array;
  noise: "given" | "estimated";
  /** Runs of exactly minPoints points, and how many of them the residual test rejected (all rejected: nowhere linear). */
  minimalRuns: number;
  minimalRunsRejected: number;
}

/** Weighted straight line through points lo..hi (inclusive), optionally leaving one index out. */
export function fitLine(t: ArrayLike<number>, y: ArrayLike<number>, sigma: ArrayLike<number>, lo: number, hi: number, skip = -1): LineFit {
  let W = 0;
  let tw = 0;
  let yw = 0;
  for (let k = lo; k <= hi; k++) {
    if (k === skip) continue;
    const w = 1 / (sigma[k] * sigma[k]);
    W += w;
    tw += w * t[k];
    yw += w * y[k];
  }
  const tBar = tw / W;
  const yBar = yw / W;
  let Stt = 0;
  let Sty = 0;
  let count = 0;
  for (let k = lo; k <= hi; k++) {
    if (k === skip) continue;
    const w = 1 / (sigma[k] * sigma[k]);
    Stt += w * (t[k] - tBar) ** 2;
    Sty += w * (t[k] - tBar) * (y[k] - yBar);
    count++;
  }
  const slope = Sty / Stt;
  let chiSquare = 0;
  for (let k = lo; k <= hi; k++) {
    if (k === skip) continue;
    chiSquare += ((y[k] - yBar - slope * (t[k] - tBar)) / sigma[k]) ** 2;
  }
  const dof = count - 2;
  return {
    tBar,
    yBar,
    slope,
    varYBar: 1 / W,
    varSlope: 1 / Stt,
    chiSquare,
    dof,
    pValue: dof > 0 ? chiSquareSf(chiSquare, dof) : 1,
    at: (x) => yBar + slope * (x - tBar),
    varAt: (x) => 1 / W + (x - tBar) ** 2 / Stt,
  };
}

/** Noise of a sampled curve from consecutive triples, robust to a few kinks (Gasser et al. 1986; Hampel 1974). */
export function pseudoResidualNoise(t: ArrayLike<number>, y: ArrayLike<number>): number {
  const values: number[] = [];
  for (let i = 1; i + 1 < t.length; i++) {
    const span = t[i + 1] - t[i - 1];
    const a = (t[i + 1] - t[i]) / span;
    const b = (t[i] - t[i - 1]) / span;
    const e = a * y[i - 1] + b * y[i + 1] - y[i];
    values.push(Math.abs(e) / Math.sqrt(a * a + b * b + 1));
  }
  if (values.length === 0) return 0;
  values.sort((p, q) => p - q);
  const mid = values.length >> 1;
  const median = values.length % 2 ? values[mid] : (values[mid - 1] + values[mid]) / 2;
  return 1.4826 * median;
}

function runIsLinear(t: ArrayLike<number>, y: ArrayLike<number>, s: ArrayLike<number>, lo: number, hi: number, alpha: number): { linear: boolean; fit: LineFit } {
  const fit = fitLine(t, y, s, lo, hi);
  if (fit.pValue < alpha) return { linear: false, fit };
  for (const k of [lo, hi]) {
    const rest = fitLine(t, y, s, lo, hi, k);
    const z = (y[k] - rest.at(t[k])) / Math.sqrt(s[k] * s[k] + rest.varAt(t[k]));
    if (normalTwoSidedP(z) < alpha) return { linear: false, fit };
  }
  return { linear: true, fit };
}

function changePoint(t: ArrayLike<number>, y: ArrayLike<number>, s: ArrayLike<number>, window: LineFit, lo: number, hi: number, outside: number, inside: number): ChangePoint {
  const bracket: [number, number] = outside < inside ? [t[outside], t[inside]] : [t[inside], t[outside]];
  const points = hi - lo + 1;
  if (points < 2) return { bracket, time: (bracket[0] + bracket[1]) / 2, points, slopeOutside: null };
  const other = fitLine(t, y, s, lo, hi);
  const dSlope = window.slope - other.slope;
  // Intersection of the two lines: window.at(x) = other.at(x).
  let time = dSlope !== 0 ? (other.at(0) - window.at(0)) / dSlope : Number.NaN;
  if (!Number.isFinite(time)) time = (bracket[0] + bracket[1]) / 2;
  time = Math.min(bracket[1], Math.max(bracket[0], time));
  return { bracket, time, points, slopeOutside: other.slope };
}

/**
 * Find the linear window of y(t). `t` must be strictly increasing; `u` gives
 * standard uncertainties of y (null: estimated from the curve itself).
 */
export function findLinearWindow(t: ArrayLike<number>, y: ArrayLike<number>, u: ArrayLike<number> | null, options: LinearWindowOptions): LinearWindowSearch {
  const n = t.length;
  if (options.minPoints < 3) throw new RangeError(`findLinearWindow needs minPoints >= 3, got ${options.minPoints}`);
  for (let i = 1; i < n; i++) if (!(t[i] > t[i - 1])) throw new RangeError("findLinearWindow needs strictly increasing times");
  let sigma: Float64Array;
  if (u) sigma = Float64Array.from(u);
  else {
    let maxAbs = 0;
    for (let i = 0; i < n; i++) maxAbs = Math.max(maxAbs, Math.abs(y[i]));
    const s = Math.max(pseudoResidualNoise(t, y), options.relativeFloor * maxAbs, Number.MIN_VALUE);
    sigma = new Float64Array(n).fill(s);
  }
  let best: { lo: number; hi: number; fit: LineFit } | null = null;
  let minimalRuns = 0;
  let minimalRunsRejected = 0;
  for (let lo = 0; lo + options.minPoints <= n; lo++) {
    for (let hi = lo + options.minPoints - 1; hi < n; hi++) {
      const run = runIsLinear(t, y, sigma, lo, hi, options.alpha);
      if (hi - lo + 1 === options.minPoints) {
        minimalRuns++;
        if (run.fit.pValue < options.alpha) minimalRunsRejected++;
      }
      if (!run.linear) continue;
      const longer = !best || hi - lo > best.hi - best.lo;
      const tie = best && hi - lo === best.hi - best.lo && run.fit.pValue > best.fit.pValue;
      if (longer || tie) best = { lo, hi, fit: run.fit };
    }
  }
  let window: LinearWindow | null = null;
  if (best) {
    const { lo, hi, fit } = best;
    window = {
      start: lo,
      end: hi,
      fit,
      onset: lo > 0 ? changePoint(t, y, sigma, fit, 0, lo - 1, lo - 1, lo) : null,
      finish: hi < n - 1 ? changePoint(t, y, sigma, fit, hi + 1, n - 1, hi + 1, hi) : null,
    };
  }
  return { window, sigma, noise: u ? "given" : "estimated", minimalRuns, minimalRunsRejected };
}
