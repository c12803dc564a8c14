import { squareSize, type Matrix } from "./matrix.ts";

/**
 * (A + Aᵀ)/2: the part of an Onsager matrix that fixes the entropy
 * production XᵀLX (the antisymmetric part drops out of the quadratic form).
 */
export function symmetricPart(a: readonly (readonly number[])[]): Matrix {
  const n = squareSize(a);
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? a[i][i] : (a[i][j] + a[j][i]) / 2)));
}
