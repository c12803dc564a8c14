import { log } from "../math/index.ts";
/**
 * Shape ξ of the right tail of a positive sample, by Hill's estimator on the
 * largest M = min(N/5, 3√N) values (B. M. Hill, Ann. Stat. 3, 1163 (1975);
 * the tail size follows Vehtari, Simpson, Gelman, Yao & Gabry, "Pareto smoothed
 * importance sampling", J. Mach. Learn. Res. 25, 1 (2024)):
 *   ξ = (1/M) Σ_{i ≤ M} ln(x_(i) / x_(M+1)),  x_(1) ≥ x_(2) ≥ …
 * A tail P(X > t) ~ t^{−1/ξ} has a finite variance only for ξ < 1/2: above
 * that, averages converge slower than 1/√N and normal or bootstrap intervals of
 * the mean are not to be trusted (Vehtari et al. 2024, §3).
 * Weights are multiplicities: whole histogram cells enter the tail until M
 * realisations are reached.
 */
export function hillTailShape(x: ArrayLike<number>, weight: ArrayLike<number> | null = null): number {
  if (!weight) return hillUnweighted(x);
  const idx: number[] = [];
  let total = 0;
  for (let i = 0; i < x.length; i++) {
    const w = weight ? weight[i] : 1;
    if (w > 0 && x[i] > 0) {
      idx.push(i);
      total += w;
    }
  }
  const M = Math.min(total / 5, 3 * Math.sqrt(total));
  if (M < 5) return Number.NaN;
  // Only the top of the sample matters: a native numeric sort finds a cut below
  // the top M + 1 realisations (cells can be large, so widen until enough weight).
  const values = new Float64Array(idx.length);
  for (let j = 0; j < idx.length; j++) values[j] = x[idx[j]];
  values.sort();
  let cutIndex = Math.max(0, values.length - Math.ceil(M) - 2);
  const top: number[] = [];
  for (;;) {
    const cut = values[cutIndex];
    top.length = 0;
    let w = 0;
    for (const i of idx) {
      if (x[i] >= cut) {
        top.push(i);
        w += weight ? weight[i] : 1;
      }
    }
    if (w > M || cutIndex === 0) break;
    cutIndex = Math.max(0, cutIndex - Math.ceil(M));
  }
  top.sort((a, b) => x[b] - x[a]);
  let taken = 0;
  let sumLog = 0;
  let k = 0;
  for (; k < top.length && taken < M; k++) {
    const w = weight ? weight[top[k]] : 1;
    sumLog += w * log(x[top[k]]);
    taken += w;
  }
  if (k >= top.length) return Number.NaN;
  const threshold = log(x[top[k]]);
  return sumLog / taken - threshold;
}

/** The same estimator for one realisation per value: a native sort of the positive values. */
function hillUnweighted(x: ArrayLike<number>): number {
  let count = 0;
  for (let i = 0; i < x.length; i++) if (x[i] > 0) count++;
  const values = new Float64Array(count);
  let k = 0;
  for (let i = 0; i < x.length; i++) if (x[i] > 0) values[k++] = x[i];
  values.sort();
  const M = Math.floor(Math.min(count / 5, 3 * Math.sqrt(count)));
  if (M < 5) return Number.NaN;
  const threshold = log(values[count - M - 1]);
  let sumLog = 0;
  for (let j = count - M; j < count; j++) sumLog += log(values[j]);
  return sumLog / M - threshold;
}
