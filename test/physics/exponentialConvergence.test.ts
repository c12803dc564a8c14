/**
 * The resolvability rule for ⟨e^−Σ⟩ when the realisations are windows cut
 * from one trace. Jarzynski (Phys. Rev. E 73, 046105 (2006)): N realisations
 * resolve the exponential average only while ⟨Σ⟩ < ln N. For correlated
 * windows N counts N/g independent ones, g = 1 + 2 Σ ρ_k the statistical
 * inefficiency (the variance of the mean of N windows is g σ²/N; common
 * practice in Monte Carlo error analysis, e.g. Sokal 1997, from memory).
 */
import { describe, expect, it } from "vitest";
import { exponentialConvergence } from "../../src/physics/exponentialConvergence.ts";
import { normalQuantile } from "../../src/stats/normal.ts";
import { expectClose } from "../helpers/expectClose.ts";

/**
 * Σ at the n quantiles (i + ½)/n of the Gaussian law with variance 2⟨Σ⟩, the
 * one that obeys the detailed relation exactly: deterministic, no random numbers.
 */
function gaussianSigma(n: number, mean: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = mean + Math.sqrt(2 * mean) * normalQuantile((i + 0.5) / n);
  return out;
}

describe("exponentialConvergence on correlated windows", () => {
  it("counts N windows as N/g realisations: ln(N/g) replaces ln N in Jarzynski's rule", () => {
    // N = 20 000 windows, ⟨Σ⟩ = 1.5 (so e^⟨Σ⟩ ≈ 4.5): ln N = 9.90, ln(N/4) = 8.52 (exact arithmetic).
    const sigma = gaussianSigma(20000, 1.5);
    const independent = exponentialConvergence(sigma, null);
    const correlated = exponentialConvergence(sigma, null, 4);
    expectClose(independent.logN, Math.log(20000), { rtol: 1e-12, source: "definition: ln N" });
    expectClose(correlated.logN, Math.log(5000), { rtol: 1e-12, source: "definition: ln(N/g)" });
    expect(correlated.inefficiency).toBe(4);
    expectClose(correlated.effectiveSampleSize, independent.effectiveSampleSize / 4, { rtol: 1e-12, source: "definition: Kish's size over g" });
    expect(independent.resolved).toBe(true);
    expect(correlated.resolved).toBe(true);
  });

  it("turns a resolved average into an unresolved one when the windows are strongly correlated", () => {
    // ⟨Σ⟩ = 6 with N = 1000: ln 1000 = 6.91 > 6 passes the rule; with g = 5, ln 200 = 5.30 < 6 does not.
    const sigma = gaussianSigma(1000, 6);
    const alone = exponentialConvergence(sigma, null);
    expect(alone.reason ?? "").not.toContain("is not below");
    const traced = exponentialConvergence(sigma, null, 5);
    expect(traced.resolved).toBe(false);
    expect(traced.reason).toContain("is not below ln(N/g) = 5.30 (N = 1000 windows, g = 5.0 windows per independent realisation)");
  });

  it("never counts anticorrelated windows as more than they are (g below 1 is taken as 1)", () => {
    const sigma = gaussianSigma(2000, 1);
    expect(exponentialConvergence(sigma, null, 0.6)).toEqual(exponentialConvergence(sigma, null));
  });
});
