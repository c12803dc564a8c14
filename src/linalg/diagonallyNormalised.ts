import { squareSize, type Matrix } from "./matrix.ts";

/**
 * S_ij / √(S_ii S_jj): a symmetric matrix scaled to unit diagonal (a
 * correlation-like matrix). Its eigenvalues do not depend on the units of
 * the fluxes, so a margin on the smallest one is meaningful; for 2×2 the
 * smallest is 1 − |r| with r the off-diagonal entry. Returns null when a
 * diagonal entry is not positive (then the matrix is not positive definite
 * and the scaling is undefined).
 */
export function diagonallyNormalised(s: readonly (readonly number[])[]): Matrix | null {
  const n = squareSize(s);
  const d = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    if (!(s[i][i] > 0)) return null;
    d[i] = Math.sqrt(s[i][i]);
  }
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : s[i][j] / (d[i] * d[j]))));
}
