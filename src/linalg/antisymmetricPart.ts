import { squareSize, type Matrix } from "./matrix.ts";

/** (A − Aᵀ)/2: the part that carries broken time-reversal symmetry (zero when L = Lᵀ). */
export function antisymmetricPart(a: readonly (readonly number[])[]): Matrix {
  const n = squareSize(a);
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 0 : (a[i][j] - a[j][i]) / 2)));
}
