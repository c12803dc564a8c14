/**
 * Weighted mean and variance in one pass, West's weighted form of Welford's
 * update: D. H. D. West, Commun. ACM 22, 532 (1979). Stable where the naive
 * sum of squares cancels. Weights are frequencies (histogram counts), so the
 * variance uses the frequency correction n − 1 with n = Σw.
 */
export interface Moments {
  n: number; // total weight (number of realisations)
  mean: number;
  variance: number; // unbiased for frequency weights
  standardError: number; // of the mean
}

export function weightedMoments(x: ArrayLike<number>, weight: ArrayLike<number> | null = null): Moments {
  return weightedMeanOf(x.length, (i) => x[i], weight);
}

/** Weighted mean of f(x_i) without storing the mapped values. */
export function weightedMeanOf(length: number, f: (i: number) => number, weight: ArrayLike<number> | null = null): Moments {
  let n = 0;
  let mean = 0;
  let m2 = 0;
  for (let i = 0; i < length; i++) {
    const w = weight ? weight[i] : 1;
    if (w === 0) continue;
    const nNew = n + w;
    const delta = f(i) - mean;
    const r = (delta * w) / nNew;
    mean += r;
    m2 += n * delta * r;
    n = nNew;
  }
  const variance = n > 1 ? m2 / (n - 1) : Number.NaN;
  return { n, mean, variance, standardError: n > 1 ? Math.sqrt(variance / n) : Number.NaN };
}
