import { describe, it, expect } from "vitest";
import { empiricalQuantile, propagateUncertainty } from "../../src/stats/monteCarlo.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

describe("propagateUncertainty", () => {
  const draws = 20000;

  it("reproduces the exact law of a linear function: u² = Σ c_i² u_i² (GUM, JCGM 100:2008 eq. 10)", () => {
    const r = propagateUncertainty((x) => [2 * x[0] - 3 * x[1]], [1, 2], [0.1, 0.2], rngFromText("test:mc-linear"), draws);
    const u = Math.sqrt(4 * 0.01 + 9 * 0.04); // 0.6325
    expect(r.outputs[0].estimate).toBe(-4);
    // The sample sd of N normal draws has relative standard error 1/√(2(N−1)) = 0.5 %; allow 4 of them (2 %).
    expectClose(r.outputs[0].sd, u, { rtol: 0.02, source: "exact linear propagation; 4 standard errors of an sd from 2e4 draws" });
    // The mean has standard error u/√N = 0.0045; allow 4 of them.
    expectClose(r.outputs[0].mean, -4, { atol: 4 * (u / Math.sqrt(draws)), source: "exact mean; 4 standard errors" });
  });

  it("gives the log-normal spread of a product: exp(x), x ~ N(0, 0.5²), sd = √((e^{σ²}−1) e^{σ²})", () => {
    const s = 0.5;
    const exactSd = Math.sqrt((Math.exp(s * s) - 1) * Math.exp(s * s)); // 0.6039, exact log-normal moments
    const r = propagateUncertainty((x) => [Math.exp(x[0])], [0], [s], rngFromText("test:mc-lognormal"), draws);
    // Heavier tails: relative se of the sd about √((κ−1)/(4N)) with kurtosis κ ≈ 10 here → 1.1 %; allow 5 %.
    expectClose(r.outputs[0].sd, exactSd, { rtol: 0.05, source: "exact log-normal standard deviation; ~4.5 standard errors" });
    // Median of the log-normal is exactly e^0 = 1; its se ≈ 1.2533·σ_med/√N ≈ 0.0045; allow 0.02.
    expectClose(empiricalQuantile(r.outputs[0].sorted, 0.5), 1, { atol: 0.02, source: "exact log-normal median; ~4 standard errors" });
  });

  it("counts draws where an output is not finite and leaves them out", () => {
    const r = propagateUncertainty((x) => [x[0] > 0 ? 1 : Number.NaN, x[0]], [0], [1], rngFromText("test:mc-valid"), 1000);
    expect(r.outputs[0].valid + r.outputs[1].valid).toBeGreaterThan(1000);
    expect(r.outputs[1].valid).toBe(1000);
    // Binomial(1000, 1/2): sd 15.8; 4 sd = 63.
    expect(Math.abs(r.outputs[0].valid - 500)).toBeLessThan(64);
    expect(r.outputs[0].sd).toBe(0);
  });

  it("is reproducible from the seed text", () => {
    const a = propagateUncertainty((x) => [x[0] * x[1]], [1, 2], [0.1, 0.3], rngFromText("same"), 500);
    const b = propagateUncertainty((x) => [x[0] * x[1]], [1, 2], [0.1, 0.3], rngFromText("same"), 500);
    expect(a.outputs[0].sd).toBe(b.outputs[0].sd);
  });

  it("refuses mismatched inputs", () => {
    expect(() => propagateUncertainty((x) => [x[0]], [1, 2], [0.1], rngFromText("x"), 10)).toThrow("propagateUncertainty: 2 values but 1 uncertainties");
  });
});

describe("empiricalQuantile", () => {
  it("interpolates between order statistics (Hyndman & Fan definition 7)", () => {
    // Definition 7 on (1, 2, 3, 4): h = (n−1)p = 0.75 at p = 0.25 → 1.75 (same as R's quantile type 7 default).
    expect(empiricalQuantile([1, 2, 3, 4], 0.25)).toBe(1.75);
    expect(empiricalQuantile([1, 2, 3, 4], 1)).toBe(4);
    expect(empiricalQuantile([5], 0.3)).toBe(5);
  });
});
