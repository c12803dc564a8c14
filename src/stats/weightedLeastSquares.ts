import { CholeskyDecomposition, Matrix, QrDecomposition } from "ml-matrix";

/**
 * Weighted (generalised) least squares with several correlated outputs per
 * observation: observation k gives a vector y_k (m outputs) with known
 * covariance V_k and the model y_k = X_k θ. The estimate minimises
 *
 *     chi² = Σ_k (y_k − X_k θ)^T V_k^{-1} (y_k − X_k θ),
 *
 * with covariance of the coefficients Cov θ = (Σ X_k^T V_k^{-1} X_k)^{-1}
 * (Aitken's generalised least squares; Draper & Smith, Applied Regression
 * Analysis, 3rd ed., Wiley 1998, §9.2; Bevington & Robinson, Data Reduction and
 * Error Analysis, 3rd ed., McGraw-Hill 2003, ch. 7). When the V_k are the true
 * covariances, chi² follows a chi-square law with (Σ m_k − p) degrees of freedom.
 *
 * Numerics: each block is whitened with the Cholesky factor of its correlation
 * matrix (after dividing by the standard deviations), the stacked system's
 * columns are scaled to unit length, and it is solved by Householder QR
 * (Golub & Van Loan, Matrix Computations, 4th ed. 2013, §5.3), never by forming
 * the normal equations. Columns of very different size (an intercept beside
 * affinities of order 1e22 per joule) therefore cost no precision.
 */
export interface WlsObservation {
  /** m × p design rows for this observation. */
  design: number[][];
  /** m outputs. */
  y: number[];
  /** m × m covariance of y (symmetric, positive definite). */
  covariance: number[][];
}

export interface WlsFit {
  coefficients: number[];
  /** p × p covariance of the coefficients. */
  covariance: number[][];
  standardErrors: number[];
  chiSquare: number;
  /** Σ m_k − p. */
  dof: number;
  /** Raw residuals y_k − X_k θ, one array per observation. */
  residuals: number[][];
}

/** The design cannot determine every coefficient (collinear columns, too few observations). */
export class RankDeficientError extends Error {
  override name = "RankDeficientError";
}

/** A covariance block that is not positive definite (a constant output, a perfectly correlated pair). */
export class SingularCovarianceError extends Error {
  override name = "SingularCovarianceError";
}

/** Relative size of a triangular pivot below which a column counts as dependent on the others. */
const RANK_TOLERANCE = 1e-10;

/** Solve G z = b for lower-triangular G. */
function forwardSubstitute(G: Matrix, b: number[]): number[] {
  const n = b.length;
  const z = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let j = 0; j < i; j++) s -= G.get(i, j) * z[j];
    z[i] = s / G.get(i, i);
  }
  return z;
}

/** Whitened rows of one observation: G^{-1} D^{-1} [X | y], with V = D R D and R = G G^T. */
function whiten(o: WlsObservation, index: number): { rows: number[][]; rhs: number[] } {
  const m = o.y.length;
  if (o.design.length !== m || o.covariance.length !== m) {
    throw new Error(`weightedLeastSquares: observation ${index} has ${m} outputs but ${o.design.length} design rows and ${o.covariance.length} covariance rows`);
  }
  const d = o.covariance.map((row, i) => Math.sqrt(row[i]));
  if (d.some((x) => !(x > 0) || !Number.isFinite(x))) {
    throw new SingularCovarianceError(`observation ${index}: an output has zero or undefined variance`);
  }
  const R = new Matrix(m, m);
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) R.set(i, j, o.covariance[i][j] / (d[i] * d[j]));
  const chol = new CholeskyDecomposition(R);
  if (!chol.isPositiveDefinite()) throw new SingularCovarianceError(`observation ${index}: the covariance of the outputs is not positive definite`);
  const G = chol.lowerTriangularMatrix;
  const p = o.design[0]?.length ?? 0;
  const rhs = forwardSubstitute(G, o.y.map((v, i) => v / d[i]));
  const cols: number[][] = [];
  for (let j = 0; j < p; j++) cols.push(forwardSubstitute(G, o.design.map((row, i) => row[j] / d[i])));
  const rows = Array.from({ length: m }, (_, i) => cols.map((c) => c[i]));
  return { rows, rhs };
}

export function weightedLeastSquares(observations: WlsObservation[]): WlsFit {
  if (observations.length === 0) throw new RankDeficientError("no observations");
  const p = observations[0].design[0]?.length ?? 0;
  const A: number[][] = [];
  const b: number[] = [];
  observations.forEach((o, k) => {
    const w = whiten(o, k);
    for (const row of w.rows) if (row.length !== p) throw new Error(`weightedLeastSquares: observation ${k} has design rows of length ${row.length}, expected ${p}`);
    A.push(...w.rows);
    b.push(...w.rhs);
  });
  const n = A.length;
  if (n < p) throw new RankDeficientError(`${n} outputs cannot determine ${p} coefficients`);
  // Equilibrate columns (unit Euclidean norm) so the rank test is scale-free.
  const scale = new Array<number>(p).fill(0);
  for (const row of A) for (let j = 0; j < p; j++) scale[j] += row[j] * row[j];
  for (let j = 0; j < p; j++) {
    scale[j] = Math.sqrt(scale[j]);
    if (!(scale[j] > 0)) throw new RankDeficientError(`coefficient ${j} multiplies a column that is zero in every observation`);
  }
  const As = new Matrix(A.map((row) => row.map((v, j) => v / scale[j])));
  const qr = new QrDecomposition(As);
  const Rt = qr.upperTriangularMatrix;
  let maxPivot = 0;
  for (let j = 0; j < p; j++) maxPivot = Math.max(maxPivot, Math.abs(Rt.get(j, j)));
  for (let j = 0; j < p; j++) {
    if (!(Math.abs(Rt.get(j, j)) > RANK_TOLERANCE * maxPivot)) {
      throw new RankDeficientError(`coefficient ${j} is not determined by the design (its column depends on the others)`);
    }
  }
  const thetaScaled = qr.solve(Matrix.columnVector(b)).getColumn(0);
  const coefficients = thetaScaled.map((v, j) => v / scale[j]);
  // Cov = (R^T R)^{-1} = R^{-1} R^{-T}, in scaled coordinates, then unscaled.
  const Rinv = backInvert(Rt, p);
  const covariance: number[][] = [];
  for (let i = 0; i < p; i++) {
    const row: number[] = [];
    for (let j = 0; j < p; j++) {
      let s = 0;
      for (let k = Math.max(i, j); k < p; k++) s += Rinv[i][k] * Rinv[j][k];
      row.push(s / (scale[i] * scale[j]));
    }
    covariance.push(row);
  }
  let chiSquare = 0;
  for (let i = 0; i < n; i++) {
    let fit = 0;
    for (let j = 0; j < p; j++) fit += A[i][j] * coefficients[j];
    chiSquare += (b[i] - fit) ** 2;
  }
  const residuals = observations.map((o) => o.y.map((y, i) => y - o.design[i].reduce((s, x, j) => s + x * coefficients[j], 0)));
  return {
    coefficients,
    covariance,
    standardErrors: covariance.map((row, i) => Math.sqrt(row[i])),
    chiSquare,
    dof: n - p,
    residuals,
  };
}

/** Inverse of the leading p × p upper-triangular block of R, by back substitution. */
function backInvert(R: Matrix, p: number): number[][] {
  const inv = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let j = 0; j < p; j++) {
    inv[j][j] = 1 / R.get(j, j);
    for (let i = j - 1; i >= 0; i--) {
      let s = 0;
      for (let k = i + 1; k <= j; k++) s += R.get(i, k) * inv[k][j];
      inv[i][j] = -s / R.get(i, i);
    }
  }
  return inv;
}

/** One output per observation with a standard deviation: the common case of a weighted fit. */
export function weightedFit(design: number[][], y: ArrayLike<number>, sigma: ArrayLike<number>): WlsFit {
  return weightedLeastSquares(design.map((row, k) => ({ design: [row], y: [y[k]], covariance: [[sigma[k] * sigma[k]]] })));
}

/** The covariance of a linear combination c^T θ. */
export function combinationVariance(cov: number[][], c: number[]): number {
  let s = 0;
  for (let i = 0; i < c.length; i++) {
    if (c[i] === 0) continue;
    for (let j = 0; j < c.length; j++) s += c[i] * cov[i][j] * c[j];
  }
  return s;
}
