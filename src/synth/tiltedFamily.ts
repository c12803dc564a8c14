import type { Rng } from "../stats/rng.ts";
import { poissonDeviate } from "../stats/poissonDeviate.ts";

/**
 * The exactly tilted family P(W, Q, dN) ∝ P0(W, Q, dN) exp((θ_W W + θ_Q Q + θ_N dN)/2)
 * with a symmetric base law P0(z) = P0(−z). Every such law obeys
 * P(z)/P(−z) = exp(θ·z) exactly, and every law that obeys it has this form
 * (Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11, 043014 (2009); the
 * logistic form of the same statement underlies Bennett's acceptance ratio,
 * Shirts, Bair, Hooker & Pande, PRL 91, 140601 (2003)). With θ = (β̄, a_Q, a_N)
 * of the declared reservoirs, Σ = θ·z is the entropy production.
 *
 * Base law here: (W, Q) centred bivariate normal with spreads s_W, s_Q and
 * correlation r, independent of dN ~ Skellam(l, l) (Skellam, J. R. Stat. Soc.
 * 109, 296 (1946)). Tilting a centred normal N(0, C) by e^{θ·x/2} gives
 * N(Cθ/2, C); tilting Skellam(l, l) by e^{b n/2} gives the difference of
 * Poisson(l e^{b/2}) and Poisson(l e^{−b/2}).
 */
export interface TiltedFamily {
  /** Tilt coefficients (1/energy, 1/energy, dimensionless). */
  theta: { W: number; Q: number; N: number };
  spreadW: number;
  spreadQ: number;
  correlation: number;
  /** Skellam intensity l of the untilted particle law (0: dN ≡ 0). */
  intensity: number;
}

export function tiltedMoments(f: TiltedFamily): { mean: { W: number; Q: number; dN: number }; covariance: number[][] } {
  const cWW = f.spreadW ** 2;
  const cQQ = f.spreadQ ** 2;
  const cWQ = f.correlation * f.spreadW * f.spreadQ;
  const up = f.intensity * Math.exp(f.theta.N / 2);
  const down = f.intensity * Math.exp(-f.theta.N / 2);
  return {
    mean: { W: (cWW * f.theta.W + cWQ * f.theta.Q) / 2, Q: (cWQ * f.theta.W + cQQ * f.theta.Q) / 2, dN: up - down },
    covariance: [
      [cWW, cWQ, 0],
      [cWQ, cQQ, 0],
      [0, 0, up + down],
    ],
  };
}

/**
 * Exact ⟨exp(−c·z)⟩ under the family, for coefficients c (e.g. the declared
 * affinities): Gaussian and Poisson moment generating functions. It equals 1
 * when c = θ, the integral fluctuation relation.
 */
export function tiltedExponentialMean(f: TiltedFamily, c: { W: number; Q: number; N: number }): number {
  const m = tiltedMoments(f);
  const C = m.covariance;
  const v = [-c.W, -c.Q];
  const gauss = v[0] * m.mean.W + v[1] * m.mean.Q + (v[0] * v[0] * C[0][0] + 2 * v[0] * v[1] * C[0][1] + v[1] * v[1] * C[1][1]) / 2;
  const up = f.intensity * Math.exp(f.theta.N / 2);
  const down = f.intensity * Math.exp(-f.theta.N / 2);
  const skellam = up * (Math.exp(-c.N) - 1) + down * (Math.exp(c.N) - 1);
  return Math.exp(gauss + skellam);
}

export function sampleTilted(f: TiltedFamily, count: number, rng: Rng): { W: Float64Array; Q: Float64Array; dN: Float64Array } {
  const m = tiltedMoments(f);
  const W = new Float64Array(count);
  const Q = new Float64Array(count);
  const dN = new Float64Array(count);
  const r = f.correlation;
  const rc = Math.sqrt(Math.max(0, 1 - r * r));
  const up = f.intensity * Math.exp(f.theta.N / 2);
  const down = f.intensity * Math.exp(-f.theta.N / 2);
  for (let i = 0; i < count; i++) {
    const z1 = rng.normal();
    const z2 = rng.normal();
    W[i] = m.mean.W + f.spreadW * z1;
    Q[i] = m.mean.Q + f.spreadQ * (r * z1 + rc * z2);
    dN[i] = f.intensity > 0 ? poissonDeviate(rng, up) - poissonDeviate(rng, down) : 0;
  }
  return { W, Q, dN };
}
