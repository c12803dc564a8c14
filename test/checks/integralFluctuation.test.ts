import { describe, expect, it } from "vitest";
import { integralFluctuationForDataset } from "../../src/checks/integral-fluctuation/integralFluctuation.ts";
import { exactExchangeData, fixtureDataset, testContext } from "./exchangeFixtures.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

type Values = { mean: number; ci: [number, number]; mean_sigma: number; ln_N: number; resolved: boolean };

/** Σ = a_Q Q with a_Q = 1/2 per E0 (T_A = 2 K, T_B = 1 K): Σ ~ N(m, v) when Q ~ N(2m, 4v). */
function gaussianSigma(seed: string, n: number, m: number, v: number, field?: number) {
  const rng = rngFromText(seed);
  const Q = new Float64Array(n);
  for (let i = 0; i < n; i++) Q[i] = 2 * (m + Math.sqrt(v) * rng.normal());
  return fixtureDataset({ id: "g", TA: 2, TB: 1, work: "zero", W: null, Q, dN: null, ...(field !== undefined ? { field } : {}) });
}

describe("integral-fluctuation", () => {
  it("passes on Gaussian Σ with variance twice the mean and brackets 1", () => {
    // Exact: ⟨e^−Σ⟩ = e^{−m + v/2} = 1 for v = 2m (Seifert, Rep. Prog. Phys. 75, 126001 (2012)).
    const r = integralFluctuationForDataset(gaussianSigma("if:gauss", 100_000, 1, 2), testContext());
    const v = r.values as Values;
    expect(r.status, r.summary).toBe("pass");
    expect(v.ci[0]).toBeLessThan(1);
    expect(v.ci[1]).toBeGreaterThan(1);
    // Var(e^−Σ) = e^{2m} − 1 = 6.39 for m = 1: SE 0.008 at 10^5; tolerance 4 SE.
    expectClose(v.mean, 1, { atol: 4 * Math.sqrt((Math.exp(2) - 1) / 100_000), source: "Seifert 2012, ⟨e^−Σ⟩ = 1" });
  });

  it("still applies with a magnetic field: it needs the forward process only", () => {
    // Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11, 043014 (2009): ⟨e^−Σ⟩ = 1 at any field.
    const r = integralFluctuationForDataset(gaussianSigma("if:field", 50_000, 0.5, 1, 0.7), testContext());
    expect(r.status, r.summary).toBe("pass");
  });

  it("is inconclusive, never a pass, when ⟨Σ⟩ exceeds ln N (Jarzynski 2006)", () => {
    // m = 12 > ln(2·10^4) = 9.9: the sample cannot contain the realisations that dominate the average
    // (Jarzynski, Phys. Rev. E 73, 046105 (2006)); the estimate is typically far below 1.
    const r = integralFluctuationForDataset(gaussianSigma("if:jarzynski", 20_000, 12, 24), testContext());
    const v = r.values as Values;
    expect(r.status).toBe("inconclusive");
    expect(v.resolved).toBe(false);
    expect(r.reason).toContain("is not below ln N = 9.9");
    expect(r.reason).toContain("(Jarzynski 2006)");
  });

  it("fails on data drawn at another temperature than declared", () => {
    const g = exactExchangeData({ seed: "if:wrongT", n: 100_000, TA: 1.3, TB: 1, drawTA: 1.6, withWork: false, heat: "gaussian", sQ: 1.5 });
    const r = integralFluctuationForDataset(fixtureDataset({ id: "w", TA: 1.3, TB: 1, work: "zero", ...g }), testContext());
    // Exact for the Gaussian heat law: ⟨e^{−a Q}⟩ with Q ~ N(a' s²/2, s²) is e^{s² a(a − a')/2} = 0.967 here (≠ 1).
    expect(r.status, r.summary).toBe("fail");
    const aTrue = 1 - 1 / 1.6;
    const aDecl = 1 - 1 / 1.3;
    const exact = Math.exp((1.5 ** 2 * aDecl * (aDecl - aTrue)) / 2);
    const v = r.values as Values;
    expectClose(v.mean, exact, { rtol: 0.01, source: "Gaussian moment generating function (exact); 1 % ≈ 4 SE at 10^5" });
  });

  it("fails when the average is significantly above 1, whatever the sample size", () => {
    // Declared affinity twice the true one: ⟨e^{−2Σ}⟩ = e^{2m} for Σ ~ N(m, 2m) (exact); m = 0.3 gives 1.82.
    const rng = rngFromText("if:above");
    const Q = new Float64Array(20_000);
    for (let i = 0; i < Q.length; i++) Q[i] = 0.3 + Math.sqrt(0.6) * rng.normal();
    // T_A = 1 K, T_B = 1/3 K: a_Q = 3 − 1 = 2 per E0, so the declared Σ is 2Q.
    const r = integralFluctuationForDataset(fixtureDataset({ id: "a", TA: 1, TB: 1 / 3, work: "zero", W: null, Q, dN: null }), testContext());
    expect(r.status).toBe("fail");
    expect(r.summary).toContain("significantly above 1");
  });
});
