import { CholeskyDecomposition, Matrix } from "ml-matrix";
import type { SamplesDataset } from "../ingest/types.ts";
import type { LogisticFit, ScoreTest } from "../stats/logisticFit.ts";
import { logistic } from "../stats/logSumExp.ts";
import { chiSquareSf } from "../stats/chiSquare.ts";

/**
 * Influence sums over independent units for counted data: each row's vector
 * g_i (a score, a moment residual) plus the first-order effect of
 * re-estimating the stationary distribution p from the start states,
 * a_i = Σ_x H_x (1[x₀ᵢ = x] − p̂(x))/(N p̂(x)) with H_x = ∂(Σ_i w_i g_i)/∂ ln p(x)
 * (the delta method: van der Vaart, Asymptotic Statistics (1998), ch. 3 and
 * 5), summed over the units that are independent: single realisations, or
 * blocks of consecutive windows of one trajectory (Carlstein, Ann. Stat. 14,
 * 1171 (1986); Künsch, Ann. Stat. 17, 1217 (1989)).
 *
 * `dRows[j][i]` = ∂g_ij/∂b_i, the derivative with respect to the row's boundary
 * term b = ln p(x₀) − ln p(x_τ); null when g does not depend on p.
 * Returns `sums[u][j]` and the multiplicity of each unit (a histogram row of
 * weight w holds w independent realisations: its squares add w times; blocks
 * already hold their weights inside the sums).
 */
export interface UnitSums {
  sums: Float64Array[];
  multiplicity: Float64Array | null;
}

export function influenceSums(d: SamplesDataset, rows: ArrayLike<number>[], dRows: ArrayLike<number>[] | null): UnitSums {
  const p = rows.length;
  const n = d.sigma.length;
  const w = (i: number) => (d.weight ? d.weight[i] : 1);
  const states = dRows && d.states && d.states.source === "estimated" ? d.states : null;
  const K = states ? states.labels.length : 0;
  // H[x][j]: derivative of the total (component j) with respect to ln p(x); b = ln p(x₀) − ln p(x_τ).
  const H = Array.from({ length: K }, () => new Float64Array(p));
  let N = 0;
  for (let i = 0; i < n; i++) N += w(i);
  if (states && dRows) {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < p; j++) {
        const g = w(i) * dRows[j][i];
        H[states.start[i]][j] += g;
        H[states.end[i]][j] -= g;
      }
    }
  }
  const sumH = new Float64Array(p);
  for (let k = 0; k < K; k++) for (let j = 0; j < p; j++) sumH[j] += H[k][j];
  const units = d.windows ? d.windows.blocks : n;
  const sums = Array.from({ length: units }, () => new Float64Array(p));
  for (let i = 0; i < n; i++) {
    const unit = d.windows ? d.windows.block[i] : i;
    for (let j = 0; j < p; j++) {
      let v = rows[j][i];
      if (states) v += (H[states.start[i]][j] / states.probability[states.start[i]] - sumH[j]) / N;
      sums[unit][j] += d.windows ? w(i) * v : v;
    }
  }
  return { sums, multiplicity: d.windows || !d.weight ? null : d.weight };
}

/** Σ_u m_u s_u s_uᵀ: the middle of a sandwich covariance. */
function outerSum(u: UnitSums): number[][] {
  const p = u.sums.length ? u.sums[0].length : 0;
  const meat = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  u.sums.forEach((s, k) => {
    const f = u.multiplicity ? u.multiplicity[k] : 1;
    for (let j = 0; j < p; j++) for (let l = 0; l < p; l++) meat[j][l] += f * s[j] * s[l];
  });
  return meat;
}

/**
 * Covariance of a logistic exchange fit on counted data, replacing the
 * inverse Fisher information where it is not the whole story:
 * - the stationary distribution p was estimated from the same rows, and the
 *   linear predictor depends on it through the boundary term b = ln p(x₀) − ln p(x_τ);
 * - the rows are consecutive windows of one trajectory (block structure).
 *
 * Each realisation's influence on θ̂ is φ_i = I⁻¹ (r_i + a_i): r_i = (1 − σ(η_i)) z_i
 * its score, a_i the effect of re-estimating p (influenceSums). The covariance is
 * the sandwich I⁻¹ (Σ_units Φ Φᵀ) I⁻¹ over independent units: Huber, Proc. Fifth
 * Berkeley Symp. 1, 221 (1967); White, Econometrica 50, 1 (1982).
 *
 * `carries` says how the boundary enters: through the offset (the joint fit on
 * the currents) or through each feature (the contracted fit on Σ_tot itself).
 * Returns the fit unchanged for independent realisations without states.
 */
export function withCountingCovariance(d: SamplesDataset, fit: LogisticFit, features: ArrayLike<number>[], carries: "offset" | "features"): LogisticFit {
  if (fit.status !== "converged" || (!d.states && !d.windows)) return fit;
  const scores = scoreRows(fit, features);
  const derivatives = scoreDerivatives(fit, features, features.map(() => (carries === "features" ? 1 : 0)), carries === "offset" ? 1 : fit.coefficients.reduce((acc, t) => acc + t, 0));
  const meat = outerSum(influenceSums(d, scores, derivatives));
  const bread = fit.covariance;
  const cov = bread.map((row) => meat[0].map((_, k) => row.reduce((acc, b, m) => acc + b * meat[m].reduce((a2, mm, l) => a2 + mm * bread[l][k], 0), 0)));
  return { ...fit, covariance: cov, standardErrors: cov.map((row, j) => Math.sqrt(row[j])) };
}

/** Per-row score (1 − σ(η_i)) z_ij of each feature. */
function scoreRows(fit: LogisticFit, features: ArrayLike<number>[]): Float64Array[] {
  return features.map((z) => Float64Array.from(fit.eta, (eta, i) => (1 - logistic(eta)) * z[i]));
}

/**
 * ∂/∂b of each row's score: −σ(1 − σ) (∂η/∂b) z_j + (1 − σ) ∂z_j/∂b, with ∂z_j/∂b given per feature
 * (a number for every row, or an array) and ∂η/∂b the same for every row.
 */
function scoreDerivatives(fit: LogisticFit, features: ArrayLike<number>[], dFeature: (number | ArrayLike<number>)[], dEta: number): Float64Array[] {
  return features.map((z, j) =>
    Float64Array.from(fit.eta, (eta, i) => {
      const s = logistic(eta);
      const dz = dFeature[j];
      return -s * (1 - s) * dEta * z[i] + (1 - s) * (typeof dz === "number" ? dz : dz[i]);
    }),
  );
}

/**
 * Score test of extra features in the contracted fit ln P(Σ)/P(−Σ) = cΣ on counted data, robust to the
 * block structure of windows and to the estimated p: the efficient score of the extra features,
 * ψ_i = r_e,i − I_eθ I_θθ⁻¹ r_θ,i (the nuisance coefficient projected out; Cox & Hinkley, Theoretical
 * Statistics (1974), §9.3), its variance the sum over independent units of Σ ψ (with the p term of
 * influenceSums) instead of the model's information (Boos, Am. Stat. 46, 327 (1992); Kent, Biometrika 69,
 * 19 (1982)). χ² with as many degrees of freedom as extra features. Σ_tot carries b with unit slope, so
 * ∂Σ/∂b = 1 and the extra features' derivatives are given (3Σ² for Σ³).
 */
export function countingScoreTest(d: SamplesDataset, fit: LogisticFit, features: ArrayLike<number>[], extra: ArrayLike<number>[], dExtra: ArrayLike<number>[]): ScoreTest {
  const q = extra.length;
  const p = features.length;
  const none: ScoreTest = { statistic: Number.NaN, dof: q, pValue: Number.NaN };
  if (fit.status !== "converged" || q === 0) return none;
  const all = [...features, ...extra];
  const n = fit.eta.length;
  const w = (i: number) => (d.weight ? d.weight[i] : 1);
  const info = Array.from({ length: p + q }, () => new Array<number>(p + q).fill(0));
  for (let i = 0; i < n; i++) {
    const s = logistic(fit.eta[i]);
    const h = w(i) * s * (1 - s);
    for (let j = 0; j < p + q; j++) for (let k = 0; k < p + q; k++) info[j][k] += h * all[j][i] * all[k][i];
  }
  const Itt = new CholeskyDecomposition(new Matrix(info.slice(0, p).map((r) => r.slice(0, p))));
  if (!Itt.isPositiveDefinite()) return none;
  // A[e][j] = (I_eθ I_θθ⁻¹)[e][j].
  const A = Itt.solve(new Matrix(info.slice(0, p).map((r) => r.slice(p)))).transpose().to2DArray();
  const dEta = fit.coefficients.reduce((acc, t) => acc + t, 0);
  const r = scoreRows(fit, all);
  const dr = scoreDerivatives(fit, all, [...features.map(() => 1), ...dExtra], dEta);
  const project = (m: Float64Array[]) => Array.from({ length: q }, (_, e) => Float64Array.from(m[p + e], (v, i) => v - A[e].reduce((acc, a, j) => acc + a * m[j][i], 0)));
  const units = influenceSums(d, project(r), project(dr));
  const meat = outerSum(units);
  const U = new Float64Array(q);
  units.sums.forEach((s, k) => {
    const f = units.multiplicity ? units.multiplicity[k] : 1;
    for (let e = 0; e < q; e++) U[e] += f * s[e];
  });
  const V = new CholeskyDecomposition(new Matrix(meat));
  if (!V.isPositiveDefinite()) return none;
  const u = Matrix.columnVector(Array.from(U));
  const statistic = u.transpose().mmul(V.solve(u)).get(0, 0);
  return { statistic, dof: q, pValue: chiSquareSf(statistic, q) };
}
