/**
 * Holm's step-down multiple test, S. Holm, Scand. J. Stat. 6, 65–70 (1979).
 *
 * Sort the m p-values ascending, p(1) ≤ … ≤ p(m). Reject H(k) while
 * p(k) ≤ alpha/(m − k + 1); stop at the first k where this fails and retain
 * it and every later hypothesis. The family-wise error rate is at most alpha
 * for any dependence between the tests.
 *
 * Convention pinned here: the comparison is "less than or equal", and it is
 * made on the adjusted p-value p~(k) = max_{j ≤ k} min(1, (m − j + 1) p(j))
 * (Wright, Biometrics 48, 1005 (1992)), so that "rejected" and "adjusted
 * p ≤ alpha" never disagree, even where (m − k + 1) p(k) equals alpha to the
 * last bit.
 */
export interface HolmResult {
  alpha: number;
  /** Number of hypotheses m. */
  m: number;
  /** Holm-adjusted p-values, in the input order. */
  adjusted: number[];
  /** Whether each hypothesis is rejected at alpha, in the input order. */
  rejected: boolean[];
  /** Index (input order) of the hypothesis with the smallest adjusted p, or -1 when m = 0. */
  smallest: number;
}

export function holm(pValues: readonly number[], alpha: number): HolmResult {
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`holm needs alpha in (0, 1), got ${alpha}`);
  const m = pValues.length;
  pValues.forEach((p, i) => {
    if (!(p >= 0 && p <= 1)) throw new RangeError(`holm needs p-values in [0, 1]; p[${i}] = ${p}`);
  });
  // Stable sort by p keeps ties in input order, so the result is reproducible.
  const order = pValues.map((_, i) => i).sort((a, b) => pValues[a] - pValues[b] || a - b);
  const adjusted = new Array<number>(m);
  let running = 0;
  order.forEach((index, k) => {
    // k is 0-based here, so m − k is the published m − k + 1.
    running = Math.max(running, Math.min(1, (m - k) * pValues[index]));
    adjusted[index] = running;
  });
  const rejected = adjusted.map((p) => p <= alpha);
  return { alpha, m, adjusted, rejected, smallest: m > 0 ? order[0] : -1 };
}
