import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { logGamma, regularizedGammaP, regularizedGammaQ } from "../../src/stats/gamma.ts";
import { chiSquareCdf, chiSquareQuantile, chiSquareSf } from "../../src/stats/chiSquare.ts";
import { expectClose } from "../helpers/expectClose.ts";

// jstat (npm, MIT) as a general-purpose reference library; it ships no types.
const jStat = createRequire(import.meta.url)("jstat") as {
  gammaln(x: number): number;
  lowRegGamma(a: number, x: number): number;
  chisquare: { cdf(x: number, k: number): number; inv(p: number, k: number): number };
};

describe("logGamma", () => {
  it("matches exact values: Γ(1/2) = √π, Γ(n) = (n − 1)!", () => {
    // Exact: Γ(1/2) = √π (Abramowitz & Stegun 6.1.8); rtol 1e-14, Lanczos g = 7 is good to ~1e-15.
    expectClose(logGamma(0.5), 0.5 * Math.log(Math.PI), { rtol: 1e-14, source: "Γ(1/2) = √π, A&S 6.1.8" });
    expectClose(logGamma(1), 0, { atol: 1e-15, source: "Γ(1) = 1" });
    expectClose(logGamma(10), Math.log(362880), { rtol: 1e-14, source: "Γ(10) = 9! = 362880" });
    // ln 170! summed term by term (definition of the factorial); 170 roundings of ~1e-16 each: rtol 1e-13.
    let lnFactorial = 0;
    for (let k = 2; k <= 170; k++) lnFactorial += Math.log(k);
    expectClose(logGamma(171), lnFactorial, { rtol: 1e-13, source: "Γ(171) = 170!, summed ln k" });
  });

  it("agrees with jstat.gammaln across small and large arguments", () => {
    // jstat uses its own Lanczos variant, accurate to ~1e-12 relative: tolerance 1e-10.
    for (const x of [1e-3, 0.1, 0.7, 1.5, 3.3, 12.5, 77, 1234.5]) {
      expectClose(logGamma(x), jStat.gammaln(x), { rtol: 1e-10, atol: 1e-12, source: `jstat.gammaln(${x})` });
    }
  });
});

describe("regularized incomplete gamma", () => {
  it("gives P(1, x) = 1 − e^−x exactly and P + Q = 1", () => {
    for (const x of [0.01, 0.5, 2, 10, 40]) {
      // Exact: γ(1, x) = 1 − e^−x; rtol 1e-13 covers the series and continued-fraction branches.
      expectClose(regularizedGammaP(1, x), -Math.expm1(-x), { rtol: 1e-13, source: "P(1, x) = 1 − e^−x (exact)" });
      expectClose(regularizedGammaQ(1, x), Math.exp(-x), { rtol: 1e-13, source: "Q(1, x) = e^−x (exact)" });
      expectClose(regularizedGammaP(3.7, x) + regularizedGammaQ(3.7, x), 1, { rtol: 1e-14, source: "P + Q = 1 (identity)" });
    }
  });

  it("agrees with jstat.lowRegGamma", () => {
    // jstat's series/continued fraction is accurate to ~1e-12 here; tolerance 1e-10 absolute.
    for (const [a, x] of [[0.5, 0.2], [2.5, 1], [2.5, 7], [10, 9], [50, 60], [0.1, 3]]) {
      expectClose(regularizedGammaP(a, x), jStat.lowRegGamma(a, x), { atol: 1e-10, source: `jstat.lowRegGamma(${a}, ${x})` });
    }
  });

  it("rejects arguments outside its domain", () => {
    expect(() => regularizedGammaP(0, 1)).toThrow("incomplete gamma needs a > 0 and x >= 0, got a = 0, x = 1");
    expect(() => logGamma(-1)).toThrow("logGamma needs x > 0, got -1");
  });
});

describe("chi-square distribution", () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.4 (upper critical values of the
  // chi-square distribution), printed to 3 decimals; full-precision values computed from the
  // inverse incomplete gamma. Tolerance 1e-6 absolute for the full-precision values.
  const table: [number, number, number][] = [
    [1, 0.05, 3.841459],
    [1, 0.01, 6.634897],
    [5, 0.05, 11.070498],
    [5, 0.01, 15.086272],
    [10, 0.05, 18.307038],
    [10, 0.01, 23.209251],
  ];
  it("reproduces the NIST upper critical values", () => {
    for (const [k, alpha, c] of table) {
      expectClose(chiSquareQuantile(1 - alpha, k), c, { atol: 1e-6, source: `NIST e-Handbook §1.3.6.7.4, dof ${k}, α = ${alpha}` });
      expectClose(chiSquareSf(c, k), alpha, { atol: 1e-7, source: `NIST e-Handbook §1.3.6.7.4, dof ${k}` });
    }
  });

  it("agrees with jstat's cdf and inverse", () => {
    // jstat's chisquare.inv iterates to ~1e-8 relative: tolerance 1e-7 relative on the quantile.
    for (const k of [0.5, 1, 2, 3, 7.5, 30, 200]) {
      for (const p of [0.001, 0.1, 0.5, 0.9, 0.999]) {
        const x = chiSquareQuantile(p, k);
        expectClose(chiSquareCdf(x, k), p, { rtol: 1e-12, source: "cdf(quantile(p)) = p (inverse pair)" });
        expectClose(x, jStat.chisquare.inv(p, k), { rtol: 1e-7, source: `jstat.chisquare.inv(${p}, ${k})` });
        expectClose(chiSquareCdf(x, k), jStat.chisquare.cdf(x, k), { atol: 1e-10, source: `jstat.chisquare.cdf at dof ${k}` });
      }
    }
  });

  it("keeps precision in the far upper tail where 1 − cdf would round to 0", () => {
    // Exact for k = 2: P(X > x) = e^{−x/2}; at x = 200 this is 3.72e-44.
    expectClose(chiSquareSf(200, 2), Math.exp(-100), { rtol: 1e-12, source: "chi-square with 2 dof is exponential (exact)" });
  });
});
