import { copyMatrix, squareSize } from "./matrix.ts";

/**
 * Eigenvalues of a real symmetric matrix, ascending, by the cyclic Jacobi
 * method (Golub & Van Loan, Matrix Computations, 4th ed. (2013), §8.5.2–8.5.3,
 * Algorithms 8.5.1 "symmetric Schur decomposition" and 8.5.3 "cyclic Jacobi").
 * Each rotation zeroes one off-diagonal pair; sweeps repeat until the
 * off-diagonal norm is negligible against the whole matrix. Accurate to a
 * few ulps of the largest eigenvalue and ample for n ≤ 9. Only the upper
 * triangle is trusted to be symmetric: the input is symmetrised first.
 */
export function symmetricEigenvalues(s: readonly (readonly number[])[]): number[] {
  const n = squareSize(s, "symmetricEigenvalues: the matrix");
  if (n === 2) return eigenvalues2x2(s[0][0], (s[0][1] + s[1][0]) / 2, s[1][1]);
  const a = copyMatrix(s);
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const v = (a[i][j] + a[j][i]) / 2;
      a[i][j] = v;
      a[j][i] = v;
    }
  }
  for (const row of a) for (const v of row) if (!Number.isFinite(v)) throw new RangeError("symmetricEigenvalues: the matrix has a non-finite entry");
  let total = 0;
  for (const row of a) for (const v of row) total += v * v;
  const tolerance = Number.EPSILON * Number.EPSILON * total;
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) off += 2 * a[i][j] * a[i][j];
    if (off <= tolerance) break;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        if (a[p][q] === 0) continue;
        // Golub & Van Loan Alg. 8.5.1: (c, s) with tau = (a_qq − a_pp)/(2 a_pq), t the smaller root of t² + 2τt − 1 = 0.
        const tau = (a[q][q] - a[p][p]) / (2 * a[p][q]);
        const t = (tau >= 0 ? 1 : -1) / (Math.abs(tau) + Math.sqrt(1 + tau * tau));
        const c = 1 / Math.sqrt(1 + t * t);
        const sn = t * c;
        // A ← Jᵀ A J, touching rows and columns p and q only.
        for (let k = 0; k < n; k++) {
          const akp = a[k][p];
          const akq = a[k][q];
          a[k][p] = c * akp - sn * akq;
          a[k][q] = sn * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p][k];
          const aqk = a[q][k];
          a[p][k] = c * apk - sn * aqk;
          a[q][k] = sn * apk + c * aqk;
        }
        a[p][q] = 0;
        a[q][p] = 0;
      }
    }
  }
  return a.map((row, i) => row[i]).sort((x, y) => x - y);
}

/**
 * Closed form for [[a, b], [b, d]]: (a + d)/2 ∓ √(((a − d)/2)² + b²), with hypot
 * against overflow; the Jacobi rotation gives the same numbers for n = 2 and
 * this path is several times faster in Monte Carlo loops.
 */
function eigenvalues2x2(a: number, b: number, d: number): number[] {
  if (![a, b, d].every(Number.isFinite)) throw new RangeError("symmetricEigenvalues: the matrix has a non-finite entry");
  const mean = (a + d) / 2;
  const radius = Math.hypot((a - d) / 2, b);
  return [mean - radius, mean + radius];
}

/** The smallest eigenvalue of a real symmetric matrix. */
export function smallestEigenvalue(s: readonly (readonly number[])[]): number {
  return symmetricEigenvalues(s)[0];
}
