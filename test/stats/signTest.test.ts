import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { binomialLowerTail, binomialUpperTail, signTest } from "../../src/stats/signTest.ts";
import { expectClose } from "../helpers/expectClose.ts";

// jstat (npm, MIT) as a general-purpose reference library for the binomial law; it ships no types.
const jStat = createRequire(import.meta.url)("jstat") as { binomial: { cdf(k: number, n: number, p: number): number } };

describe("binomial tails and the exact sign test", () => {
  it("agrees with jstat's binomial distribution function across sizes and probabilities", () => {
    for (const [k, m, p] of [[3, 20, 0.5], [12, 30, 0.475], [480, 1000, 0.525], [7, 9, 0.2], [0, 5, 0.5]] as const) {
      // jstat rounds its binomial distribution function to 10 decimal places, hence atol 6e-11.
      expectClose(binomialLowerTail(k, m, p), jStat.binomial.cdf(k, m, p), { atol: 6e-11, source: "jstat 1.9 binomial.cdf" });
      const upper = 1 - (k > 0 ? jStat.binomial.cdf(k - 1, m, p) : 0);
      expectClose(binomialUpperTail(k, m, p), upper, { atol: 6e-11, source: "jstat 1.9: 1 − binomial.cdf(k − 1)" });
    }
    // Exact: P(K ≤ 3 | 20, 1/2) = (1 + 20 + 190 + 1140)/2^20.
    expectClose(binomialLowerTail(3, 20, 0.5), 1351 / 2 ** 20, { rtol: 1e-12, source: "exact binomial sum" });
  });

  it("gives the tabulated two-sided p of 5 positive signs in 20: 2 · 0.0207 = 0.0414", () => {
    // Binomial table n = 20, p = 1/2: P(X ≤ 5) = 0.0207 (e.g. Beyer, CRC Standard Probability and Statistics
    // Tables and Formulae (1991), cumulative binomial table; from memory), exactly 21700/2^20 = 0.020694732.
    const t = signTest(5, 15, 0.05, 0.05);
    expectClose(t.p, (2 * 21700) / 2 ** 20, { rtol: 1e-12, source: "exact: 2 Σ_{k≤5} C(20,k)/2^20 = 43400/1048576" });
    expect(t.asymmetry).toBe(-0.5);
    expect(t.equivalent).toBe(false);
  });

  it("shows equivalence within ±0.05 only with enough signs: exact two one-sided binomial tests", () => {
    // 10 000 signs, 5 050 positive: asymmetry 0.01. One-sided p's P(K ≥ 5050 | 0.475) and P(K ≤ 5050 | 0.525)
    // are both far below 0.05 (about 4.5 and 3.5 standard deviations of √(m p q) = 49.9 away).
    const big = signTest(5050, 4950, 0.05, 0.05);
    expect(big.equivalent).toBe(true);
    expectClose(big.equivalenceP, Math.max(1 - jStat.binomial.cdf(5049, 10000, 0.475), jStat.binomial.cdf(5050, 10000, 0.525)), { atol: 1.2e-10, source: "jstat 1.9 binomial.cdf (rounded to 10 decimals)" });
    // 100 signs cannot: the asymmetry is known to about ±0.16.
    expect(signTest(51, 49, 0.05, 0.05).equivalent).toBe(false);
    // No signs at all: nothing to decide.
    expect(signTest(0, 0, 0.05, 0.05)).toMatchObject({ p: 1, equivalent: false });
  });
});
