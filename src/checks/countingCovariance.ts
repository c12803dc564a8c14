import type { SamplesDataset } from "../ingest/types.ts";
import type { LogisticFit } from "../stats/logisticFit.ts";
import { logistic } from "../stats/logSumExp.ts";

/**
 * Covariance of a logistic exchange fit on counted data, replacing the
 * inverse Fisher information where it is not the whole story:
 * - the stationary distribution p was estimated from the same rows, and the
 *   linear predictor depends on it through the boundary term b = ln p(x₀) − ln p(x_τ);
 * - the rows are consecutive windows of one trajectory (block structure).
 *
 * Each realisation's influence on θ̂ is φ_i = I⁻¹ (r_i + a_i): r_i = (1 − σ(η_i)) z_i
 * its score, a_i = Σ_x H_x (1[x₀ᵢ = x] − p̂(x))/(N p̂(x)) the first-order effect of
 * re-estimating p (H_x = ∂(Σ score)/∂ ln p(x)). The covariance is the sandwich
 * Σ_units Φ Φᵀ over independent units (realisations, or blocks of windows):
 * Huber, Proc. Fifth Berkeley Symp. 1, 221 (1967); White, Econometrica 50, 1
 * (1982); the estimated-p term by the delta method (van der Vaart, Asymptotic
 * Statistics (1998), ch. 3 and 5).
 *
 * `carries` says how the boundary enters: through the offset (the joint fit on
 * the currents) or through each feature (the contracted fit on Σ_tot itself).
 * Returns the fit unchanged for independent realisations without states.
 */
export function withCountingCovariance(d: SamplesDataset, fit: LogisticFit, features: ArrayLike<number>[], carries: "offset" | "features"): LogisticFit {
  if (fit.status !== "converged" || (!d.states && !d.windows)) return fit;
  const p = features.length;
  const n = fit.eta.length;
  const w = (i: number) => (d.weight ? d.weight[i] : 1);
  const theta = fit.coefficients;
  const states = d.states && d.states.source === "estimated" ? d.states : null;
  // H[x][j]: derivative of the total score (component j) with respect to ln p(x).
  const K = states ? states.labels.length : 0;
  const H = Array.from({ length: K }, () => new Float64Array(p));
  let N = 0;
  for (let i = 0; i < n; i++) N += w(i);
  if (states) {
    for (let i = 0; i < n; i++) {
      const s = logistic(fit.eta[i]);
      const dEta = carries === "offset" ? 1 : theta.reduce((acc, t) => acc + t, 0);
      for (let j = 0; j < p; j++) {
        // ∂/∂b [(1 − σ(η)) z_j] = −σ(1 − σ) ∂η/∂b z_j + (1 − σ) ∂z_j/∂b.
        const dz = carries === "features" ? 1 : 0;
        const g = w(i) * (-s * (1 - s) * dEta * features[j][i] + (1 - s) * dz);
        H[states.start[i]][j] += g;
        H[states.end[i]][j] -= g;
      }
    }
  }
  const units = d.windows ? d.windows.blocks : n;
  const sums = Array.from({ length: units }, () => new Float64Array(p));
  for (let i = 0; i < n; i++) {
    const s = logistic(fit.eta[i]);
    const unit = d.windows ? d.windows.block[i] : i;
    for (let j = 0; j < p; j++) {
      let v = (1 - s) * features[j][i];
      if (states) {
        const x = states.start[i];
        let sumH = 0;
        for (let k = 0; k < K; k++) sumH += H[k][j];
        v += (H[x][j] / states.probability[x] - sumH) / N;
      }
      // A histogram row of weight w holds w independent realisations: its squares add w times.
      sums[unit][j] += d.windows ? w(i) * v : v;
    }
  }
  const meat = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let u = 0; u < units; u++) {
    const f = d.windows ? 1 : w(u);
    for (let j = 0; j < p; j++) for (let k = 0; k < p; k++) meat[j][k] += f * sums[u][j] * sums[u][k];
  }
  const bread = fit.covariance;
  const cov = bread.map((row) => meat[0].map((_, k) => row.reduce((acc, b, m) => acc + b * meat[m].reduce((a2, mm, l) => a2 + mm * bread[l][k], 0), 0)));
  return { ...fit, covariance: cov, standardErrors: cov.map((row, j) => Math.sqrt(row[j])) };
}
