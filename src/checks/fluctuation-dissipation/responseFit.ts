import type { SamplesDataset } from "../../ingest/types.ts";
import { weightedLeastSquares, combinationVariance, type WlsFit, type WlsObservation } from "../../stats/weightedLeastSquares.ts";
import { chiSquareSf } from "../../stats/chiSquare.ts";
import { inverse } from "../../linalg/solve.ts";
import { AFFINITY_OF, type Channel, type Sweep } from "./sweep.ts";
import { withinCellScatter } from "../helpers.ts";
import { exp } from "../../math/index.ts";

/**
 * The joint response fit of a sweep (physics: linear response from the exchange
 * relations; Andrieux & Gaspard, J. Chem. Phys. 121, 6167 (2004)).
 *
 * Each realisation gives a vector of per-time observables
 *   J  = x/tau                                   (mean fluxes),
 *   K  = vech((x − x̄)(x − x̄)^T)/(2 tau)          (covariances, x̄ the dataset mean),
 *   J~ = x (1 + exp(−beta_bar W))/(2 tau)        (weighted fluxes; only with work),
 * for x the channels that carry transfer. Per dataset their means and the
 * full covariance of those means (sample covariance / n; for K this is the
 * delta-method covariance of the sample covariance, Cramér, Mathematical
 * Methods of Statistics (1946) §27.7) enter one generalised least-squares fit
 * in which every output is linear in the affinity vector a: y_o = c_o + g_o·a.
 * Then
 *   s = c(J), L = g(J)            J = s + L a,
 *   s~ = c(J~), L~ = g(J~)        (weighted identity: s~ = 0, L~ symmetric),
 *   L_fluct = c(K) + s s^T tau/2  (the second moment <x x^T>_0/(2 tau) at a = 0:
 *                                  covariance plus the mean's square, each
 *                                  extrapolated to zero affinity),
 * and the fit's coefficient covariance gives every uncertainty, correlations
 * between the matrices included (they come from the same realisations).
 * Extrapolating the covariance rather than the raw second moment removes the
 * term <x><x>^T, quadratic in a, which would otherwise bias a straight-line
 * extrapolation (for an exactly tilted Gaussian the covariance does not depend
 * on a at all).
 */
export interface ResponseFit {
  channels: Channel[];
  /** Affinity names, conjugate to the channels (a_Q, a_N). */
  affinities: ("a_Q" | "a_N")[];
  fit: WlsFit;
  /** Index of a coefficient: output block, then column 0 (intercept) or 1 + j (slope on affinity j). */
  index: (output: number, column: number) => number;
  outputs: { J: number[]; M: number[][]; Jw: number[] | null };
  points: SweepPoint[];
  tau: number;
  linearity: Linearity;
  /** Polynomial order of the fitted model in the affinities. */
  model: "linear" | "quadratic";
}

export interface SweepPoint {
  id: string;
  a: number[];
  n: number;
  beta_bar: number;
  mean: number[];
  covariance: number[][];
}

/** A realisation's weight exp(−β̄W) is beyond double precision (work below about −700 k_B T̄). */
export class WeightOverflowError extends Error {
  override name = "WeightOverflowError";
}

/** Output layout: J (m), then the covariances M (upper triangle, m(m+1)/2), then J~ (m) when there is work. */
function layout(m: number, work: boolean): ResponseFit["outputs"] & { count: number } {
  const J = Array.from({ length: m }, (_, i) => i);
  const M: number[][] = Array.from({ length: m }, () => new Array<number>(m).fill(-1));
  let k = m;
  for (let i = 0; i < m; i++) for (let j = i; j < m; j++) M[i][j] = M[j][i] = k++;
  const Jw = work ? Array.from({ length: m }, (_, i) => k + i) : null;
  return { J, M, Jw, count: k + (work ? m : 0) };
}

/** Mean and covariance of the mean of the per-realisation observables, frequency-weighted, two passes. */
export function sweepPoint(d: SamplesDataset, channels: Channel[], tau: number, work: boolean): SweepPoint {
  const m = channels.length;
  const lay = layout(m, work);
  const O = lay.count;
  const cols = channels.map((c) => (c === "Q" ? d.Q : d.dN));
  const bb = d.affinity.beta_bar;
  const f = new Float64Array(O);
  const features = (i: number) => {
    for (let c = 0; c < m; c++) f[lay.J[c]] = cols[c][i] / tau;
    for (let a = 0; a < m; a++) for (let b = a; b < m; b++) f[lay.M[a][b]] = (unbias * (cols[a][i] - xBar[a]) * (cols[b][i] - xBar[b])) / (2 * tau);
    if (lay.Jw) {
      const factor = (1 + exp(-bb * d.W[i])) / (2 * tau);
      if (!Number.isFinite(factor)) {
        throw new WeightOverflowError(`${d.id}: exp(−β̄W) overflows at W = ${d.W[i]} J (β̄W = ${bb * d.W[i]}); the weighted flux cannot be formed in double precision`);
      }
      for (let c = 0; c < m; c++) f[lay.Jw[c]] = cols[c][i] * factor;
    }
    return f;
  };
  // Pass 1: the mean of x, about which the covariance features are formed.
  const xBar = new Array<number>(m).fill(0);
  let n = 0;
  for (let i = 0; i < d.sigma.length; i++) {
    const w = d.weight ? d.weight[i] : 1;
    if (w === 0) continue;
    n += w;
    for (let c = 0; c < m; c++) xBar[c] += (w / n) * (cols[c][i] - xBar[c]);
  }
  const unbias = n / (n - 1);
  const mean = new Array<number>(O).fill(0);
  n = 0;
  for (let i = 0; i < d.sigma.length; i++) {
    const w = d.weight ? d.weight[i] : 1;
    if (w === 0) continue;
    const v = features(i);
    n += w;
    for (let o = 0; o < O; o++) mean[o] += (w / n) * (v[o] - mean[o]); // running weighted mean (West 1979)
  }
  // A file summarised into cells: the second-moment features of the cells' means lack the
  // within-cell scatter, which the summary kept (law of total variance).
  for (let a = 0; a < m; a++) {
    for (let b = a; b < m; b++) mean[lay.M[a][b]] += (unbias * withinCellScatter(d, channels[a], channels[b])) / (2 * tau * n);
  }
  const cov = Array.from({ length: O }, () => new Array<number>(O).fill(0));
  for (let i = 0; i < d.sigma.length; i++) {
    const w = d.weight ? d.weight[i] : 1;
    if (w === 0) continue;
    const v = features(i);
    for (let p = 0; p < O; p++) {
      const dp = v[p] - mean[p];
      for (let q = p; q < O; q++) cov[p][q] += w * dp * (v[q] - mean[q]);
    }
  }
  // Covariance of the mean: frequency-weighted sample covariance (n − 1) divided by n.
  for (let p = 0; p < O; p++) for (let q = p; q < O; q++) cov[q][p] = cov[p][q] = cov[p][q] / ((n - 1) * n);
  return { id: d.id, a: channels.map((c) => d.affinity[AFFINITY_OF[c]]), n, beta_bar: bb, mean, covariance: cov };
}

/** Design rows of one observation: every output linear in a, each with its own coefficients. */
function designFor(point: SweepPoint, outputs: number, features: (a: number[]) => number[]): number[][] {
  const row = features(point.a);
  const p = row.length;
  return Array.from({ length: outputs }, (_, o) => {
    const r = new Array<number>(outputs * p).fill(0);
    for (let j = 0; j < p; j++) r[o * p + j] = row[j];
    return r;
  });
}

const linear = (a: number[]) => [1, ...a];

/** Quadratic terms a_i a_j (i ≤ j) appended to the linear ones, for the linearity test. */
const quadratic = (a: number[]) => {
  const q: number[] = [];
  for (let i = 0; i < a.length; i++) for (let j = i; j < a.length; j++) q.push(a[i] * a[j]);
  return [1, ...a, ...q];
};

/**
 * The joint fit. The model is linear in the affinities unless the linearity
 * test finds the quadratic terms significant and the datasets determine them;
 * then every output gets quadratic terms too, and s, L, L~ and L_fluct are
 * read off at zero affinity (intercepts and first derivatives there), so the
 * curvature does not bias them.
 */
export function fitResponse(sweep: Sweep, alpha: number): ResponseFit {
  const m = sweep.channels.length;
  const lay = layout(m, sweep.work);
  const points = sweep.datasets.map((d) => sweepPoint(d, sweep.channels, sweep.tau, sweep.work));
  const fluxOutputs = [...lay.J, ...(lay.Jw ?? [])];
  const linearity = linearityOf(points, fluxOutputs, m, alpha);
  const model = linearity.linear === false && linearity.method === "quadratic terms" ? "quadratic" : "linear";
  const features = model === "quadratic" ? quadratic : linear;
  const observations: WlsObservation[] = points.map((pt) => ({ design: designFor(pt, lay.count, features), y: pt.mean, covariance: pt.covariance }));
  const fit = weightedLeastSquares(observations);
  const p = features(points[0].a).length;
  return {
    channels: sweep.channels,
    affinities: sweep.channels.map((c) => AFFINITY_OF[c]),
    fit,
    index: (output, column) => output * p + column,
    outputs: { J: lay.J, M: lay.M, Jw: lay.Jw },
    points,
    tau: sweep.tau,
    linearity,
    model,
  };
}

/** A matrix of coefficients with its standard errors, and the coefficient indices behind each entry. */
export interface EstimatedMatrix {
  value: number[][];
  se: number[][];
  /** Gradient of each entry with respect to the fit coefficients (exact for linear entries; the delta method otherwise). */
  combination: number[][][];
}

export interface EstimatedVector {
  value: number[];
  se: number[];
  combination: number[][];
}

function unit(size: number, index: number): number[] {
  const c = new Array<number>(size).fill(0);
  c[index] = 1;
  return c;
}

function fromCombinations(fit: WlsFit, comb: number[][][], value?: number[][]): EstimatedMatrix {
  return {
    value: value ?? comb.map((row) => row.map((c) => c.reduce((s, w, k) => s + w * fit.coefficients[k], 0))),
    se: comb.map((row) => row.map((c) => Math.sqrt(combinationVariance(fit.covariance, c)))),
    combination: comb,
  };
}

/** L (from J) or L~ (from J~): row i = flux i, column j = slope on affinity j. */
export function responseMatrix(r: ResponseFit, outputs: number[]): EstimatedMatrix {
  const P = r.fit.coefficients.length;
  return fromCombinations(r.fit, outputs.map((o) => outputs.map((_, j) => unit(P, r.index(o, 1 + j)))));
}

/** s (from J) or s~ (from J~): the intercepts. */
export function interceptVector(r: ResponseFit, outputs: number[]): EstimatedVector {
  const P = r.fit.coefficients.length;
  const m = fromCombinations(r.fit, [outputs.map((o) => unit(P, r.index(o, 0)))]);
  return { value: m.value[0], se: m.se[0], combination: m.combination[0] };
}

/**
 * L_fluct = <x x^T>_0/(2 tau) = c(K) + s s^T tau/2: the covariance intercepts
 * plus the square of the spontaneous mean transfer s tau; its uncertainty by
 * the delta method (gradient τ/2 (s_j e_{s_i} + s_i e_{s_j}) for the product).
 */
export function fluctuationMatrix(r: ResponseFit): EstimatedMatrix {
  const P = r.fit.coefficients.length;
  const s = interceptVector(r, r.outputs.J);
  const half = r.tau / 2;
  const comb = r.outputs.M.map((row, i) =>
    row.map((o, j) => {
      const g = unit(P, r.index(o, 0));
      const si = r.index(r.outputs.J[i], 0);
      const sj = r.index(r.outputs.J[j], 0);
      g[si] += half * s.value[j];
      g[sj] += half * s.value[i];
      return g;
    }),
  );
  const value = r.outputs.M.map((row, i) => row.map((o, j) => r.fit.coefficients[r.index(o, 0)] + half * s.value[i] * s.value[j]));
  return fromCombinations(r.fit, comb, value);
}

/** A − B entry by entry, with the covariance between A and B taken into account. */
export function difference(r: ResponseFit, A: EstimatedMatrix, B: EstimatedMatrix): EstimatedMatrix {
  return fromCombinations(
    r.fit,
    A.combination.map((row, i) => row.map((c, j) => c.map((w, k) => w - B.combination[i][j][k]))),
    A.value.map((row, i) => row.map((v, j) => v - B.value[i][j])),
  );
}

/** (A ± A^T)/2 with uncertainties. */
export function symmetrised(r: ResponseFit, A: EstimatedMatrix, sign: 1 | -1): EstimatedMatrix {
  return fromCombinations(
    r.fit,
    A.combination.map((row, i) => row.map((c, j) => c.map((w, k) => (w + sign * A.combination[j][i][k]) / 2))),
    A.value.map((row, i) => row.map((v, j) => (v + sign * A.value[j][i]) / 2)),
  );
}

/** Variance of a linear combination of the fit's coefficients. */
export function varianceOf(r: ResponseFit, c: number[]): number {
  return combinationVariance(r.fit.covariance, c);
}

export interface Linearity {
  method: "quadratic terms" | "residual chi-square" | "none";
  statistic: number | null;
  dof: number | null;
  p_value: number | null;
  /** true: linear at alpha; false: significant curvature; null: not testable with these datasets. */
  linear: boolean | null;
  note: string;
}

/**
 * Is the sweep still in the linear regime? With enough datasets the fluxes
 * (mean and, with work, weighted) are refitted with all quadratic terms
 * a_i a_j and the quadratic coefficients are tested jointly (Wald test,
 * chi-square with as many degrees of freedom as coefficients; Wald, Trans.
 * Am. Math. Soc. 54, 426 (1943)); otherwise the residual chi-square of the
 * linear fit is used (a lack-of-fit test with known errors).
 */
export function linearityOf(points: SweepPoint[], J: number[], d: number, alpha: number): Linearity {
  const m = J.length;
  const sub = (pt: SweepPoint) => ({ y: J.map((o) => pt.mean[o]), covariance: J.map((o) => J.map((q) => pt.covariance[o][q])) });
  const K = points.length;
  const nq = (d * (d + 1)) / 2;
  const pq = 1 + d + nq;
  if (K >= pq) {
    try {
      const fit = weightedLeastSquares(points.map((pt) => ({ design: designFor(pt, m, quadratic), ...sub(pt) })));
      const idx: number[] = [];
      for (let o = 0; o < m; o++) for (let k = 0; k < nq; k++) idx.push(o * pq + 1 + d + k);
      const q = idx.map((i) => fit.coefficients[i]);
      const Cq = idx.map((i) => idx.map((j) => fit.covariance[i][j]));
      const Ci = inverse(Cq);
      const statistic = q.reduce((s, qi, i) => s + qi * q.reduce((t, qj, j) => t + Ci[i][j] * qj, 0), 0);
      const p = chiSquareSf(statistic, idx.length);
      return {
        method: "quadratic terms",
        statistic,
        dof: idx.length,
        p_value: p,
        linear: p >= alpha,
        note: p >= alpha ? `quadratic terms in the affinities are not significant (Wald p = ${p.toPrecision(3)})` : `quadratic terms in the affinities are significant (Wald p = ${p.toPrecision(3)})`,
      };
    } catch {
      // Quadratic terms not identifiable from this arrangement of affinities: fall back to the residual test.
    }
  }
  const fit = weightedLeastSquares(points.map((pt) => ({ design: designFor(pt, m, linear), ...sub(pt) })));
  if (fit.dof <= 0) {
    return { method: "none", statistic: null, dof: null, p_value: null, linear: null, note: `${K} datasets leave no degree of freedom to test linearity; add datasets at further affinities` };
  }
  const p = chiSquareSf(fit.chiSquare, fit.dof);
  return {
    method: "residual chi-square",
    statistic: fit.chiSquare,
    dof: fit.dof,
    p_value: p,
    linear: p >= alpha,
    note: p >= alpha ? `the plane fits the mean fluxes (residual chi-square p = ${p.toPrecision(3)})` : `the plane does not fit the mean fluxes (residual chi-square p = ${p.toPrecision(3)})`,
  };
}
