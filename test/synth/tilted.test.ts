import { describe, expect, it } from "vitest";
import { sampleTilted, tiltedExponentialMean, tiltedMoments, type TiltedFamily } from "../../src/synth/tiltedFamily.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { sampleMoments } from "./fermionFixtures.ts";

const family: TiltedFamily = { theta: { W: 9.5, Q: 2.7, N: 0.4 }, spreadW: 0.06, spreadQ: 0.25, correlation: 0.3, intensity: 1.2 };

/** Skellam probability of n for Poisson means m1, m2, by direct summation over the Poisson terms. */
function skellam(n: number, m1: number, m2: number): number {
  let s = 0;
  const logFact = (k: number) => {
    let x = 0;
    for (let i = 2; i <= k; i++) x += Math.log(i);
    return x;
  };
  for (let k = Math.max(0, -n); k < 200; k++) {
    s += Math.exp(-m1 - m2 + (n + k) * Math.log(m1) + k * Math.log(m2) - logFact(n + k) - logFact(k));
  }
  return s;
}

describe("tilted family", () => {
  it("tiltedExponentialMean at the tilt itself is 1 for any base law (integral relation, exact)", () => {
    for (const f of [family, { ...family, correlation: -0.8, intensity: 0 }, { ...family, theta: { W: 0, Q: -4, N: -1.3 } }]) {
      expectClose(tiltedExponentialMean(f, f.theta), 1, { atol: 1e-13, source: "⟨e^{−θ·z}⟩ = 1 for P ∝ P0 e^{θ·z/2}, P0 symmetric" });
    }
    // With other coefficients it differs from 1.
    expect(Math.abs(tiltedExponentialMean(family, { W: 9.5, Q: 4, N: 0.4 }) - 1)).toBeGreaterThan(1e-3);
  });

  it("the particle law obeys P(n)/P(−n) = e^{θ_N n} (Skellam, J. R. Stat. Soc. 109, 296 (1946))", () => {
    const m1 = family.intensity * Math.exp(family.theta.N / 2);
    const m2 = family.intensity * Math.exp(-family.theta.N / 2);
    for (const n of [1, 2, 5]) {
      expectClose(Math.log(skellam(n, m1, m2) / skellam(-n, m1, m2)), family.theta.N * n, { atol: 1e-12, source: "exact tilt of the symmetric Skellam law" });
    }
  });

  it("sampled means and covariances of (W, Q, dN) agree with tiltedMoments within 4.5 standard errors", () => {
    const N = 40000;
    const d = sampleTilted(family, N, rngFromText("tilted moments"));
    const s = sampleMoments([d.W, d.Q, d.dN]);
    const m = tiltedMoments(family);
    const mean = [m.mean.W, m.mean.Q, m.mean.dN];
    // 9 comparisons at |z| < 4.5 (false-alarm rate ~ 6e-5 together; the seed is fixed).
    for (let a = 0; a < 3; a++) {
      expectClose(s.mean[a], mean[a], { atol: 4.5 * s.seMean[a], source: "tilted normal N(Cθ/2, C) and tilted Skellam moments" });
      for (let b = a; b < 3; b++) expectClose(s.cov[a][b], m.covariance[a][b], { atol: 4.5 * s.seCov[a][b] + 1e-15, source: "tilted family covariance" });
    }
  });
});
