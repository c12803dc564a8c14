import { CholeskyDecomposition, Matrix } from "ml-matrix";
import { log1pExp, logistic } from "./logSumExp.ts";
import { chiSquareSf } from "./chiSquare.ts";
import { columnDependence } from "./columnDependence.ts";

/**
 * Maximum-likelihood fit of ln P(z)/P(−z) = θ·z from realisations z_i alone.
 *
 * Every law obeying P(z)/P(−z) = exp(θ·z) has the form
 * P(z) = 2 P_s(z)/(1 + exp(−θ·z)) with P_s symmetric, so conditioning on the
 * pair {z, −z} leaves a logistic likelihood Π σ(θ·z_i): logistic regression
 * with every label 1 and no intercept, the idea behind Bennett's acceptance
 * ratio (Shirts, Bair, Hooker & Pande, Phys. Rev. Lett. 91, 140601 (2003)).
 *
 * Newton's method (iteratively reweighted least squares for this model;
 * McCullagh & Nelder, Generalized Linear Models, 2nd ed. (1989), §4.4) with an
 * Armijo backtracking line search on the concave log-likelihood. Features are
 * divided by their root mean square first (no centring: the model has no
 * intercept), so energies of order 1e-23 J condition as well as numbers of
 * order 1. Standard errors come from the inverse Fisher information.
 *
 * Features that are exactly linearly dependent in the data leave θ identified
 * only up to the null space; callers fit a basis of the column space instead
 * (columnDependence) and test the identifiable combinations.
 *
 * The MLE does not exist when some direction θ has θ·z_i ≥ 0 for every
 * realisation (and > 0 for one): the likelihood then grows without bound along
 * θ. The fit reports that as `separable` instead of returning a huge number.
 */
export type LogisticStatus = "converged" | "separable" | "degenerate" | "not-converged";

export interface LogisticFit {
  status: LogisticStatus;
  /** θ in the units of 1/feature; NaN unless converged. */
  coefficients: number[];
  standardErrors: number[];
  covariance: number[][];
  logLikelihood: number;
  iterations: number;
  /** Total weight of realisations with θ·z < 0 at the last iterate. */
  negativeWeight: number;
  /** Why the fit is not usable, for a person. */
  message?: string;
  /** Internal state for score tests at the fitted point. */
  eta: Float64Array;
  scales: number[];
}

const CONVERGED = 1e-8;

const DEPENDENT = "the features are linearly dependent (the information matrix is singular), so the coefficients are not identified separately";
const ILL_CONDITIONED =
  "the information matrix is numerically singular although the features are linearly independent (too few realisations carry information about some combination of them), so the coefficients are not identified separately";

export interface LogisticOptions {
  maxIterations?: number;
  /**
   * A known term added to θ·z in every row, with coefficient 1 (an offset, McCullagh & Nelder 1989, §4.3):
   * ln P(z, o)/P(−z, −o) = θ·z + o. Counted data through a conductor use it for the boundary term
   * ln p(x₀) − ln p(x_τ) of Seifert's total entropy production.
   */
  offset?: ArrayLike<number>;
}

function rms(x: ArrayLike<number>, weight: ArrayLike<number> | null): number {
  let s = 0;
  let w = 0;
  for (let i = 0; i < x.length; i++) {
    const wi = weight ? weight[i] : 1;
    s += wi * x[i] * x[i];
    w += wi;
  }
  return Math.sqrt(s / w);
}

function linearPredictor(features: ArrayLike<number>[], scales: number[], beta: number[], out: Float64Array, offset?: ArrayLike<number>): void {
  if (offset) out.set(offset);
  else out.fill(0);
  for (let j = 0; j < features.length; j++) {
    const f = features[j];
    const b = beta[j] / scales[j];
    for (let i = 0; i < out.length; i++) out[i] += b * f[i];
  }
}

function logLikelihood(eta: Float64Array, weight: ArrayLike<number> | null): number {
  let ll = 0;
  for (let i = 0; i < eta.length; i++) {
    const w = weight ? weight[i] : 1;
    if (w !== 0) ll -= w * log1pExp(-eta[i]);
  }
  return ll;
}

/** Gradient and Fisher information in the scaled coordinates. */
function scoreAndInformation(features: ArrayLike<number>[], scales: number[], eta: Float64Array, weight: ArrayLike<number> | null) {
  const p = features.length;
  const grad = new Array<number>(p).fill(0);
  const info = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  // Accumulate on the raw features, then scale once (keeps the row loop lean).
  const g = new Float64Array(p);
  const h2 = new Float64Array(p * p);
  for (let i = 0; i < eta.length; i++) {
    const w = weight ? weight[i] : 1;
    if (w === 0) continue;
    const s = logistic(eta[i]);
    const r = w * (1 - s);
    const h = w * s * (1 - s);
    for (let j = 0; j < p; j++) {
      const xj = features[j][i];
      g[j] += r * xj;
      const hx = h * xj;
      for (let k = 0; k <= j; k++) h2[j * p + k] += hx * features[k][i];
    }
  }
  for (let j = 0; j < p; j++) {
    grad[j] = g[j] / scales[j];
    for (let k = 0; k <= j; k++) info[j][k] = h2[j * p + k] / (scales[j] * scales[k]);
  }
  for (let j = 0; j < p; j++) for (let k = 0; k < j; k++) info[k][j] = info[j][k];
  return { grad, info };
}

function negativeWeightOf(eta: Float64Array, weight: ArrayLike<number> | null): { negative: number; allNonNegative: boolean; anyPositive: boolean } {
  let negative = 0;
  let anyPositive = false;
  for (let i = 0; i < eta.length; i++) {
    const w = weight ? weight[i] : 1;
    if (w === 0) continue;
    if (eta[i] < 0) negative += w;
    else if (eta[i] > 0) anyPositive = true;
  }
  return { negative, allNonNegative: negative === 0, anyPositive };
}

function failed(status: LogisticStatus, p: number, message: string, eta: Float64Array, scales: number[], iterations: number, negativeWeight: number, ll: number): LogisticFit {
  const nan = new Array<number>(p).fill(Number.NaN);
  return {
    status,
    coefficients: nan,
    standardErrors: nan.slice(),
    covariance: Array.from({ length: p }, () => nan.slice()),
    logLikelihood: ll,
    iterations,
    negativeWeight,
    message,
    eta,
    scales,
  };
}

function convergedFit(beta: number[], info: number[][], scales: number[], ll: number, iterations: number, eta: Float64Array, weight: ArrayLike<number> | null): LogisticFit {
  const p = beta.length;
  const cov = new CholeskyDecomposition(new Matrix(info)).solve(Matrix.eye(p)).to2DArray();
  const covariance = cov.map((row, j) => row.map((c, k) => c / (scales[j] * scales[k])));
  return {
    status: "converged",
    coefficients: beta.map((b, j) => b / scales[j]),
    standardErrors: covariance.map((row, j) => Math.sqrt(row[j])),
    covariance,
    logLikelihood: ll,
    iterations,
    negativeWeight: negativeWeightOf(eta, weight).negative,
    eta,
    scales,
  };
}

/**
 * Fit θ in ln P(z)/P(−z) = Σ_j θ_j z_j. `features[j][i]` is feature j of row i;
 * `weight` the multiplicity of each row (histograms) or null.
 */
export function fitExchangeLogistic(features: ArrayLike<number>[], weight: ArrayLike<number> | null, options: LogisticOptions = {}): LogisticFit {
  const p = features.length;
  const n = p > 0 ? features[0].length : 0;
  const maxIterations = options.maxIterations ?? 100;
  const scales = features.map((f) => rms(f, weight));
  const eta = new Float64Array(n);
  if (p === 0 || n === 0) return failed("degenerate", p, "no features or no realisations to fit", eta, scales, 0, 0, 0);
  const zero = scales.findIndex((s) => !(s > 0) || !Number.isFinite(s));
  if (zero >= 0) return failed("degenerate", p, `feature ${zero + 1} is zero in every realisation, so its coefficient is not identified`, eta, scales, 0, 0, 0);
  // Exact dependence must be caught in the data: after scaling, proportional columns are identical and the
  // rounded information matrix may still pass as positive definite, giving finite nonsense coefficients.
  if (p > 1 && columnDependence(features, weight).dependent.length > 0) return failed("degenerate", p, DEPENDENT, eta, scales, 0, 0, 0);

  let beta = new Array<number>(p).fill(0);
  if (options.offset) eta.set(options.offset);
  let ll = logLikelihood(eta, weight);
  const trial = new Float64Array(n);
  for (let it = 1; it <= maxIterations; it++) {
    const { grad, info } = scoreAndInformation(features, scales, eta, weight);
    const chol = new CholeskyDecomposition(new Matrix(info));
    if (!chol.isPositiveDefinite()) {
      const nw = negativeWeightOf(eta, weight);
      // The columns are independent (checked above), so the realisations that carry weight do not pin some combination.
      return failed("degenerate", p, ILL_CONDITIONED, eta, scales, it, nw.negative, ll);
    }
    const step = chol.solve(Matrix.columnVector(grad)).to1DArray();
    const decrement = step.reduce((acc, s, j) => acc + s * grad[j], 0); // Newton decrement squared
    // λ²/2 approximates the log-likelihood still to gain; 1e-8 moves θ by ~1e-4 standard errors.
    if (decrement / 2 < CONVERGED) {
      // Inside the quadratic basin: take the last full Newton step, which squares the remaining error.
      const last = beta.map((b, j) => b + step[j]);
      linearPredictor(features, scales, last, trial, options.offset);
      const llLast = logLikelihood(trial, weight);
      if (llLast >= ll) {
        eta.set(trial);
        return convergedFit(last, info, scales, llLast, it, eta, weight);
      }
      return convergedFit(beta, info, scales, ll, it, eta, weight);
    }
    // Armijo backtracking: accept t when ll rises by at least 1e-4 t·(grad·step).
    let t = 1;
    let next = beta;
    let llNext = -Infinity;
    for (let k = 0; k < 40; k++) {
      next = beta.map((b, j) => b + t * step[j]);
      linearPredictor(features, scales, next, trial, options.offset);
      llNext = logLikelihood(trial, weight);
      if (llNext >= ll + 1e-4 * t * decrement) break;
      t /= 2;
    }
    if (!(llNext >= ll)) {
      // No ascent possible in floating point: at the optimum if the remaining gain is far below one unit of log-likelihood.
      if (decrement / 2 < 1e-4) return convergedFit(beta, info, scales, ll, it, eta, weight);
      break;
    }
    beta = next;
    eta.set(trial);
    ll = llNext;
    const nw = negativeWeightOf(eta, weight);
    if (nw.allNonNegative && nw.anyPositive) {
      return failed(
        "separable",
        p,
        "no realisation has θ·z < 0 along the fitted direction, so the likelihood grows without bound and the maximum-likelihood estimate does not exist",
        eta,
        scales,
        it,
        0,
        ll,
      );
    }
  }
  const nw = negativeWeightOf(eta, weight);
  return failed("not-converged", p, `Newton's method did not converge in ${maxIterations} iterations`, eta, scales, maxIterations, nw.negative, ll);
}

export interface ScoreTest {
  statistic: number;
  dof: number;
  pValue: number;
}

/**
 * Rao's score test that extra features (e.g. odd cubic terms) have zero
 * coefficients at the fitted point, so that departures from the exponential
 * form itself can be detected: U = Σ w (1 − σ) e, V = I_ee − I_eθ I_θθ^{-1} I_θe,
 * statistic U' V^{-1} U ~ χ²(dim e) (Rao, Proc. Camb. Phil. Soc. 44, 50 (1948)).
 */
export function logisticScoreTest(fit: LogisticFit, features: ArrayLike<number>[], extra: ArrayLike<number>[], weight: ArrayLike<number> | null): ScoreTest {
  const q = extra.length;
  if (fit.status !== "converged" || q === 0) return { statistic: Number.NaN, dof: q, pValue: Number.NaN };
  const all = [...features, ...extra];
  const scales = [...fit.scales, ...extra.map((e) => rms(e, weight))];
  if (scales.some((s) => !(s > 0))) return { statistic: Number.NaN, dof: q, pValue: Number.NaN };
  const { grad, info } = scoreAndInformation(all, scales, fit.eta, weight);
  const p = features.length;
  const Itt = new Matrix(info.slice(0, p).map((r) => r.slice(0, p)));
  const Ite = new Matrix(info.slice(0, p).map((r) => r.slice(p)));
  const Iee = new Matrix(info.slice(p).map((r) => r.slice(p)));
  const V = Iee.sub(Ite.transpose().mmul(new CholeskyDecomposition(Itt).solve(Ite)));
  const U = Matrix.columnVector(grad.slice(p));
  const chol = new CholeskyDecomposition(V);
  if (!chol.isPositiveDefinite()) return { statistic: Number.NaN, dof: q, pValue: Number.NaN };
  const statistic = U.transpose().mmul(chol.solve(U)).get(0, 0);
  return { statistic, dof: q, pValue: chiSquareSf(statistic, q) };
}
