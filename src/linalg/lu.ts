import { copyMatrix, squareSize, type Matrix } from "./matrix.ts";

/**
 * LU factorisation with partial pivoting, PA = LU (Golub & Van Loan,
 * Matrix Computations, 4th ed. (2013), §3.4, Algorithm 3.4.1), stored
 * compactly: unit lower L below the diagonal, U on and above it.
 */
export interface LuFactors {
  lu: Matrix;
  /** Row i of PA is row pivot[i] of A. */
  pivot: number[];
  /** +1 or −1: the sign of the permutation. */
  sign: number;
  /** True when a zero pivot appeared (A singular to working precision). */
  singular: boolean;
}

export function luDecompose(a: readonly (readonly number[])[]): LuFactors {
  const n = squareSize(a, "luDecompose: the matrix");
  const lu = copyMatrix(a);
  const pivot = Array.from({ length: n }, (_, i) => i);
  let sign = 1;
  let singular = false;
  for (let k = 0; k < n; k++) {
    let p = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(lu[i][k]) > Math.abs(lu[p][k])) p = i;
    if (p !== k) {
      [lu[p], lu[k]] = [lu[k], lu[p]];
      [pivot[p], pivot[k]] = [pivot[k], pivot[p]];
      sign = -sign;
    }
    const d = lu[k][k];
    if (d === 0) {
      singular = true;
      continue;
    }
    for (let i = k + 1; i < n; i++) {
      const f = (lu[i][k] /= d);
      for (let j = k + 1; j < n; j++) lu[i][j] -= f * lu[k][j];
    }
  }
  return { lu, pivot, sign, singular };
}
