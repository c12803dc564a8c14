import type { ComplexMatrix } from "./complexMatrix.ts";
import { complexZeros } from "./complexMatrix.ts";
import { symmetricEigen } from "./symmetricEigen.ts";

/**
 * Eigen-decomposition of a complex Hermitian matrix H = X + iY through its
 * real symmetric embedding M = [[X, −Y], [Y, X]] (2n × 2n). M represents H
 * acting on (Re v, Im v), so every eigenvalue of H appears twice in M, with
 * real eigenvectors (x; y) and (−y; x) that stand for v and i·v
 * (e.g. Golub & Van Loan, Matrix Computations, 4th ed. (2013), §8.1 on
 * Hermitian problems solved in real arithmetic).
 *
 * Picking n complex eigenvectors from the 2n real ones must respect
 * degeneracies (a ring has doubly degenerate levels): within each cluster of
 * equal eigenvalues, complex Gram–Schmidt with pivoting on the largest
 * residual keeps exactly half of the real vectors and makes them orthonormal.
 */
export interface HermitianEigen {
  n: number;
  /** Eigenvalues, ascending. */
  values: Float64Array;
  /** Orthonormal eigenvectors as the columns of an n × n complex matrix. */
  vectors: ComplexMatrix;
}

export function hermitianEigen(h: ComplexMatrix): HermitianEigen {
  const n = h.rows;
  if (h.cols !== n) throw new Error(`hermitianEigen: matrix is ${h.rows}×${h.cols}, not square`);
  const n2 = 2 * n;
  const m = new Float64Array(n2 * n2);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const x = (h.re[i * n + j] + h.re[j * n + i]) / 2; // symmetrised against rounding in the input
      const y = (h.im[i * n + j] - h.im[j * n + i]) / 2;
      m[i * n2 + j] = x;
      m[(i + n) * n2 + j + n] = x;
      m[i * n2 + j + n] = -y;
      m[(i + n) * n2 + j] = y;
    }
  }
  const real = symmetricEigen(m, n2);
  const scale = Math.max(1, Math.abs(real.values[0]), Math.abs(real.values[n2 - 1]));
  const tol = 1e-9 * scale;
  const values = new Float64Array(n);
  const vectors = complexZeros(n, n);
  let accepted = 0;
  let start = 0;
  while (start < n2) {
    let end = start + 1;
    while (end < n2 && real.values[end] - real.values[end - 1] <= tol) end++;
    accepted = acceptCluster(real.values, real.vectors, n, start, end, values, vectors, accepted);
    start = end;
  }
  if (accepted !== n) throw new Error(`hermitianEigen: found ${accepted} of ${n} eigenvectors; the input is not Hermitian`);
  return { n, values, vectors };
}

/** Complex Gram–Schmidt with pivoting over the real eigenvectors start..end−1 of one cluster. */
function acceptCluster(
  realValues: Float64Array,
  realVectors: Float64Array,
  n: number,
  start: number,
  end: number,
  values: Float64Array,
  vectors: ComplexMatrix,
  accepted: number,
): number {
  const n2 = 2 * n;
  const size = end - start;
  const cr: Float64Array[] = [];
  const ci: Float64Array[] = [];
  for (let c = start; c < end; c++) {
    const r = new Float64Array(n);
    const i = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      r[k] = realVectors[k * n2 + c];
      i[k] = realVectors[(k + n) * n2 + c];
    }
    cr.push(r);
    ci.push(i);
  }
  const used = new Uint8Array(size);
  const want = Math.round(size / 2);
  for (let round = 0; round < want; round++) {
    let best = -1;
    let bestNorm = 0;
    for (let c = 0; c < size; c++) {
      if (used[c]) continue;
      let s = 0;
      for (let k = 0; k < n; k++) s += cr[c][k] * cr[c][k] + ci[c][k] * ci[c][k];
      if (s > bestNorm) {
        bestNorm = s;
        best = c;
      }
    }
    if (best < 0 || bestNorm < 0.25) break;
    used[best] = 1;
    const norm = Math.sqrt(bestNorm);
    const ur = cr[best].map((x) => x / norm);
    const ui = ci[best].map((x) => x / norm);
    const col = accepted++;
    values[col] = realValues[start + best];
    for (let k = 0; k < n; k++) {
      vectors.re[k * n + col] = ur[k];
      vectors.im[k * n + col] = ui[k];
    }
    // Remove the new direction from the remaining candidates: w ← w − u ⟨u, w⟩.
    for (let c = 0; c < size; c++) {
      if (used[c]) continue;
      let pr = 0;
      let pi = 0;
      for (let k = 0; k < n; k++) {
        pr += ur[k] * cr[c][k] + ui[k] * ci[c][k];
        pi += ur[k] * ci[c][k] - ui[k] * cr[c][k];
      }
      for (let k = 0; k < n; k++) {
        cr[c][k] -= ur[k] * pr - ui[k] * pi;
        ci[c][k] -= ur[k] * pi + ui[k] * pr;
      }
    }
  }
  return accepted;
}
