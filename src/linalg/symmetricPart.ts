import { squareSize, type Matrix } from "./matrix.ts";

/**
 * (A + Aᵀ)/2: the part of an Onsager matrix that fixes the entropy
 * production XᵀLX (the antisymmetric part drops out of the quadratic form).
 */
export function symmetricPart(a: readonly (readonly number[])[]): Matrix {
  const n = squareSize(a);
  // Plain loops: Array.from with a map function is slow in V8, and this runs inside Monte Carlo loops.
  const out: Matrix = new Array(n);
  for (let i = 0; i < n; i++) {
    const row = new Array<number>(n);
    for (let j = 0; j < n; j++) row[j] = i === j ? a[i][i] : (a[i][j] + a[j][i]) / 2;
    out[i] = row;
  }
  return out;
}
