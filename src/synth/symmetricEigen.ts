import { EigenvalueDecomposition, Matrix } from "ml-matrix";

/**
 * Eigen-decomposition of a real symmetric matrix with ml-matrix (a well-kept
 * npm library), whose symmetric path is Householder tridiagonalisation and
 * the implicit QL algorithm (`tred2`/`tql2` of Wilkinson & Reinsch, Handbook
 * for Automatic Computation II: Linear Algebra (Springer 1971), as in
 * EISPACK/JAMA). Input and output are row-major Float64Arrays so the
 * samplers can use them directly.
 */
export interface SymmetricEigen {
  n: number;
  /** Eigenvalues in ascending order. */
  values: Float64Array;
  /** Eigenvectors as columns of a row-major n × n matrix: vectors[i * n + k] is component i of vector k. */
  vectors: Float64Array;
}

/** Eigenvalues (ascending) and orthonormal eigenvectors of the symmetric n × n matrix `a` (row-major; only read). */
export function symmetricEigen(a: Float64Array, n: number): SymmetricEigen {
  if (a.length !== n * n) throw new Error(`symmetricEigen: expected ${n * n} entries, got ${a.length}`);
  const m = new Matrix(n, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) m.set(i, j, a[i * n + j]);
  const evd = new EigenvalueDecomposition(m, { assumeSymmetric: true });
  const raw = evd.realEigenvalues;
  const V = evd.eigenvectorMatrix;
  // tql2 already sorts ascending; the order is imposed here so callers can rely on it.
  const order = Array.from({ length: n }, (_, k) => k).sort((x, y) => raw[x] - raw[y]);
  const values = new Float64Array(n);
  const vectors = new Float64Array(n * n);
  order.forEach((k, col) => {
    values[col] = raw[k];
    for (let i = 0; i < n; i++) vectors[i * n + col] = V.get(i, k);
  });
  return { n, values, vectors };
}
