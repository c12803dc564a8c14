import { CholeskyDecomposition, Matrix } from "ml-matrix";
import { fSf } from "./fDistribution.ts";

/**
 * Hotelling's test that a K-vector of moment residuals has mean zero, from its
 * sums over B blocks of consecutive observations (batch means). Blocks long
 * enough to hold the serial correlation give sums that are nearly independent
 * and, by the central limit theorem within a block, nearly normal (Carlstein,
 * Ann. Stat. 14, 1171 (1986); Künsch, Ann. Stat. 17, 1217 (1989); for batch
 * means of a dependent series, Schmeiser, Oper. Res. 30, 556 (1982)). With
 * x̄ the mean block sum and S their sample covariance (divisor B − 1),
 *   T² = B x̄ᵀ S⁻¹ x̄,   F = (B − K) T² / (K (B − 1)) ~ F(K, B − K)
 * under the null (Hotelling, Ann. Math. Stat. 2, 360 (1931)); the covariance
 * is estimated, not assumed, so the dependence between neighbours inside a
 * block enters it, and the F law accounts for estimating it from B blocks.
 */
export interface BlockHotelling {
  /** Hotelling's T². */
  statistic: number;
  /** F = (B − K) T² / (K (B − 1)) and its degrees of freedom (K, B − K). */
  f: number;
  dof: number;
  denominatorDof: number;
  pValue: number;
  blocks: number;
}

/** `sums[b][k]`: the sum of residual k over block b. Needs B > K; NaN p-value when S is singular. */
export function blockHotelling(sums: ArrayLike<number>[]): BlockHotelling {
  const B = sums.length;
  const K = B > 0 ? sums[0].length : 0;
  const none: BlockHotelling = { statistic: Number.NaN, f: Number.NaN, dof: K, denominatorDof: B - K, pValue: Number.NaN, blocks: B };
  if (K === 0 || B <= K) return none;
  const mean = new Float64Array(K);
  for (const s of sums) for (let k = 0; k < K; k++) mean[k] += s[k] / B;
  const S = Matrix.zeros(K, K);
  for (const s of sums) {
    for (let j = 0; j < K; j++) {
      const dj = s[j] - mean[j];
      for (let k = 0; k <= j; k++) S.set(j, k, S.get(j, k) + (dj * (s[k] - mean[k])) / (B - 1));
    }
  }
  for (let j = 0; j < K; j++) for (let k = 0; k < j; k++) S.set(k, j, S.get(j, k));
  const chol = new CholeskyDecomposition(S);
  if (!chol.isPositiveDefinite()) return none;
  const m = Matrix.columnVector(Array.from(mean));
  const statistic = B * m.transpose().mmul(chol.solve(m)).get(0, 0);
  const f = ((B - K) * statistic) / (K * (B - 1));
  return { statistic, f, dof: K, denominatorDof: B - K, pValue: fSf(f, K, B - K), blocks: B };
}
