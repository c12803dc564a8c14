/**
 * Exact (structural) linear dependence among the columns of a data matrix.
 *
 * A rank-revealing QR factorisation of the weighted, scaled data matrix
 * √w_i · x_ij / s_j (s_j the weighted root mean square of column j): columns
 * are taken in a preferred order and kept as a basis when the part of them
 * orthogonal to the basis so far is larger than `tolerance` times their own
 * length (the sine of the angle between the column and the span of the basis);
 * the others are written as a combination of the basis. Orthogonalisation is
 * modified Gram–Schmidt applied twice ("twice is enough": Giraud, Langou,
 * Rozložník & van den Eshof, Numer. Math. 101, 87 (2005)), which keeps the
 * computed sine accurate to a few units of rounding, unlike a Cholesky
 * factorisation of the second-moment matrix, where it would be lost below
 * about 1e−8 to cancellation (Golub & Van Loan, Matrix Computations, 4th ed.
 * (2013), §5.2 and §5.4.2 on QR with column pivoting).
 *
 * Working on the data rather than a fitted information matrix separates a
 * dependence that holds in every realisation (a property of the system, e.g.
 * Q = ε ΔN for transport through a single level, which no amount of data of the
 * same kind removes) from a merely ill-conditioned fit.
 */

/** A column that is a combination of the basis columns in every row. */
export interface DependentColumn {
  /** Index of the dependent column. */
  index: number;
  /** column[index] = Σ_j coefficients[j] · column[basis[j]] in every row (raw units). All zero for a zero column. */
  coefficients: number[];
  /** Weighted root-mean-square of what the combination leaves over, relative to the column's own (0 when exact). */
  residual: number;
}

export interface ColumnDependence {
  /** Columns kept as a basis of the column space, in the order they were taken. */
  basis: number[];
  dependent: DependentColumn[];
}

/**
 * Default tolerance on the relative residual. A column that agrees with a
 * combination of the others to one part in 10⁶ of its root-mean-square carries
 * at most 10⁻¹² of the information of an independent column per realisation
 * (information scales with the squared residual), so no realistic sample
 * identifies its own coefficient; the threshold also absorbs the rounding of
 * data written with seven or more significant digits, and lies far above the
 * ~1e−15 left by floating-point rounding of exact relations.
 */
export const DEPENDENCE_TOLERANCE = 1e-6;

export interface DependenceOptions {
  /** Order in which columns are offered to the basis (default 0, 1, …): earlier columns are preferred. */
  order?: number[];
  tolerance?: number;
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

/** Column dependence of `columns` (each of length n) with row weights `weight` (null: all 1). */
export function columnDependence(columns: ArrayLike<number>[], weight: ArrayLike<number> | null, options: DependenceOptions = {}): ColumnDependence {
  const p = columns.length;
  const n = p > 0 ? columns[0].length : 0;
  const tolerance = options.tolerance ?? DEPENDENCE_TOLERANCE;
  const order = options.order ?? columns.map((_, j) => j);
  const sw = new Float64Array(n);
  for (let i = 0; i < n; i++) sw[i] = Math.sqrt(weight ? weight[i] : 1);

  const basis: number[] = [];
  const scales: number[] = [];
  const q: Float64Array[] = []; // orthonormal basis vectors
  const r: number[][] = []; // R[k][j]: coefficient of q_k in scaled basis column j (upper triangular)
  const dependent: DependentColumn[] = [];
  for (const j of order) {
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) v[i] = sw[i] * columns[j][i];
    const norm0 = Math.sqrt(dot(v, v));
    if (!(norm0 > 0) || !Number.isFinite(norm0)) {
      dependent.push({ index: j, coefficients: [], residual: 0 });
      continue;
    }
    for (let i = 0; i < n; i++) v[i] /= norm0;
    // Two passes of modified Gram–Schmidt; proj accumulates the coefficients on q.
    const proj = new Array<number>(q.length).fill(0);
    for (let pass = 0; pass < 2; pass++) {
      for (let k = 0; k < q.length; k++) {
        const c = dot(q[k], v);
        proj[k] += c;
        const qk = q[k];
        for (let i = 0; i < n; i++) v[i] -= c * qk[i];
      }
    }
    const residual = Math.sqrt(dot(v, v)); // sine of the angle to the span (the column has unit length)
    if (residual > tolerance) {
      for (let i = 0; i < n; i++) v[i] /= residual;
      q.push(v);
      r.push(new Array<number>(p).fill(0));
      for (let k = 0; k < proj.length; k++) r[k][basis.length] = proj[k];
      r[q.length - 1][basis.length] = residual;
      basis.push(j);
      scales.push(norm0);
      continue;
    }
    // Solve R c = proj by back substitution: scaled column ≈ Σ_m c_m · (basis column m / its norm).
    const m = basis.length;
    const c = new Array<number>(m).fill(0);
    for (let k = m - 1; k >= 0; k--) {
      let s = proj[k];
      for (let l = k + 1; l < m; l++) s -= r[k][l] * c[l];
      c[k] = s / r[k][k];
    }
    dependent.push({ index: j, coefficients: c.map((cm, k) => (cm * norm0) / scales[k]), residual });
  }
  // Zero columns met before the basis was complete get a coefficient for every basis column.
  for (const d of dependent) if (d.coefficients.length < basis.length) d.coefficients = [...d.coefficients, ...new Array<number>(basis.length - d.coefficients.length).fill(0)];
  return { basis, dependent };
}

/**
 * The combinations of θ that the data identify: θ·z = Σ_j φ_j z_{basis j} in
 * every row, with φ_j = θ_{basis j} + Σ_k c_{jk} θ_{dependent k}.
 */
export function identifiableCombinations(dep: ColumnDependence, theta: number[]): number[] {
  return dep.basis.map((b, j) => dep.dependent.reduce((acc, d) => acc + d.coefficients[j] * theta[d.index], theta[b]));
}
