import { describe, expect, it } from "vitest";
import { fitExchangeLogistic, logisticScoreTest } from "../../src/stats/logisticFit.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

describe("fitExchangeLogistic", () => {
  it("solves a two-point law exactly: z = +1 three times, −1 once gives θ = ln 3 and SE √(4/3)", () => {
    // Exact: maximise 3 ln σ(θ) + ln σ(−θ) ⇒ σ(θ) = 3/4 ⇒ θ = ln 3; Fisher information
    // Σ w σ(1 − σ) z² = 4 · 3/16 = 3/4 ⇒ SE = √(4/3). rtol 1e-7: Newton stops at λ²/2 < 1e-8.
    const fit = fitExchangeLogistic([Float64Array.of(1, -1)], Float64Array.of(3, 1));
    expect(fit.status).toBe("converged");
    expectClose(fit.coefficients[0], Math.log(3), { rtol: 1e-7, source: "closed form σ(θ) = 3/4" });
    expectClose(fit.standardErrors[0], Math.sqrt(4 / 3), { rtol: 1e-6, source: "inverse Fisher information 4/3" });
  });

  it("gives the same answer for raw rows and for their histogram", () => {
    const raw = fitExchangeLogistic([Float64Array.of(1, 1, 1, -1, 2, 2, -2)], null);
    const hist = fitExchangeLogistic([Float64Array.of(1, -1, 2, -2)], Float64Array.of(3, 1, 2, 1));
    expect(raw.status).toBe("converged");
    // Identical likelihoods, summed in a different order: rtol 1e-10.
    expectClose(hist.coefficients[0], raw.coefficients[0], { rtol: 1e-10, source: "the same likelihood (identity)" });
    expectClose(hist.standardErrors[0], raw.standardErrors[0], { rtol: 1e-10, source: "the same information (identity)" });
  });

  it("fits two channels separately: orthogonal axes decouple into ln 3 and 0", () => {
    // z on the axes: (1,0)×3, (−1,0)×1, (0,1)×2, (0,−1)×2. The score equations decouple: θ1 = ln 3, θ2 = 0 (exact).
    const f1 = Float64Array.of(1, -1, 0, 0);
    const f2 = Float64Array.of(0, 0, 1, -1);
    const fit = fitExchangeLogistic([f1, f2], Float64Array.of(3, 1, 2, 2));
    expect(fit.status).toBe("converged");
    expectClose(fit.coefficients[0], Math.log(3), { rtol: 1e-7, source: "decoupled closed form" });
    expectClose(fit.coefficients[1], 0, { atol: 1e-7, source: "symmetric channel (exact)" });
  });

  it("recovers slope 1 from Gaussian entropy production with variance twice the mean", () => {
    // Exact: Σ ~ N(m, 2m) obeys P(Σ)/P(−Σ) = e^Σ (Seifert, Rep. Prog. Phys. 75, 126001 (2012)).
    const rng = rngFromText("logistic:gauss");
    const n = 100_000;
    const m = 1.5;
    const s = new Float64Array(n);
    for (let i = 0; i < n; i++) s[i] = m + Math.sqrt(2 * m) * rng.normal();
    const fit = fitExchangeLogistic([s], null);
    expect(fit.status).toBe("converged");
    // 4 standard errors (the fit's own, about 0.006 here).
    expectClose(fit.coefficients[0], 1, { atol: 4 * fit.standardErrors[0], source: "Seifert 2012, Gaussian Σ with variance 2m" });
    // Scale invariance: energies in joules (×1e-23) give the coefficient ×1e23 with the same relative error.
    const joules = Float64Array.from(s, (v) => v * 1e-23);
    const fitJ = fitExchangeLogistic([joules], null);
    expectClose(fitJ.coefficients[0] * 1e-23, fit.coefficients[0], { rtol: 1e-6, source: "θ·z is invariant under z → c z, θ → θ/c" });
    // The cubic score test sees no departure from the exponential form (p well above 0.001 for exact data).
    const cubic = logisticScoreTest(fit, [s], [Float64Array.from(s, (v) => v ** 3)], null);
    expect(cubic.pValue).toBeGreaterThan(0.001);
  });

  it("detects a log-ratio that is not linear in Σ with the cubic score test", () => {
    // Law with ln P(s)/P(−s) = s + 0.1 s³ (constructed: symmetric P0 tilted by exp((s + 0.1 s³)/2), sampled by
    // rejection from the symmetric N(0, 1) with acceptance σ(s + 0.1 s³), which gives exactly that ratio).
    const rng = rngFromText("logistic:cubic");
    const s: number[] = [];
    while (s.length < 50_000) {
      const x = rng.normal();
      if (rng.uniform() < 1 / (1 + Math.exp(-(x + 0.1 * x ** 3)))) s.push(x);
    }
    const arr = Float64Array.from(s);
    const fit = fitExchangeLogistic([arr], null);
    const cubic = logisticScoreTest(fit, [arr], [Float64Array.from(arr, (v) => v ** 3)], null);
    expect(cubic.pValue).toBeLessThan(1e-6);
  });

  it("reports separable data instead of an infinite coefficient", () => {
    const fit = fitExchangeLogistic([Float64Array.of(0.5, 1, 2, 3)], null);
    expect(fit.status).toBe("separable");
    expect(fit.message).toBe(
      "no realisation has θ·z < 0 along the fitted direction, so the likelihood grows without bound and the maximum-likelihood estimate does not exist",
    );
    expect(Number.isNaN(fit.coefficients[0])).toBe(true);
  });

  it("reports a feature that is zero everywhere and linearly dependent features", () => {
    expect(fitExchangeLogistic([Float64Array.of(1, -1), Float64Array.of(0, 0)], null).message).toBe(
      "feature 2 is zero in every realisation, so its coefficient is not identified",
    );
    const x = Float64Array.of(1, -1, 2, -0.5);
    const dep = fitExchangeLogistic([x, Float64Array.from(x, (v) => 2 * v)], null);
    expect(dep.status).toBe("degenerate");
    expect(dep.message).toBe("the features are linearly dependent (the information matrix is singular), so the coefficients are not identified separately");
  });
});
