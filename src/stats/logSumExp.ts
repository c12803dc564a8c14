import { exp, log } from "../math/index.ts";
/**
 * Exponential averages without overflow: log Σ w_i exp(x_i) by shifting with
 * the largest exponent first (the "log-sum-exp trick", e.g. Press, Teukolsky,
 * Vetterling & Flannery, Numerical Recipes, 3rd ed. (2007), §16.1).
 * Zero weights are skipped; an empty or all-zero sum gives −Infinity.
 */
export function logSumExp(x: ArrayLike<number>, weight: ArrayLike<number> | null = null, scale = 1): number {
  let max = -Infinity;
  for (let i = 0; i < x.length; i++) {
    if (weight && weight[i] === 0) continue;
    const v = scale * x[i];
    if (v > max) max = v;
  }
  if (max === -Infinity) return -Infinity;
  if (max === Infinity) return Infinity;
  let sum = 0;
  for (let i = 0; i < x.length; i++) {
    const w = weight ? weight[i] : 1;
    if (w === 0) continue;
    sum += w * exp(scale * x[i] - max);
  }
  return max + log(sum);
}

/** log of the weighted mean of exp(scale·x_i): logSumExp minus log of the total weight. */
export function logMeanExp(x: ArrayLike<number>, weight: ArrayLike<number> | null = null, scale = 1): number {
  let total = 0;
  if (weight) for (let i = 0; i < weight.length; i++) total += weight[i];
  else total = x.length;
  return logSumExp(x, weight, scale) - log(total);
}

/** log(1 + exp(x)) without overflow or loss of precision for large |x|. */
export function log1pExp(x: number): number {
  return x > 0 ? x + Math.log1p(exp(-x)) : Math.log1p(exp(x));
}

/** The logistic function 1/(1 + exp(−x)), evaluated on the side that cannot overflow. */
export function logistic(x: number): number {
  if (x >= 0) return 1 / (1 + exp(-x));
  const e = exp(x);
  return e / (1 + e);
}
