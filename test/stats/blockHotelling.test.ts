import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { fSf } from "../../src/stats/fDistribution.ts";
import { blockHotelling } from "../../src/stats/blockHotelling.ts";
import { studentTTwoSidedP } from "../../src/stats/studentT.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

// jstat (npm, MIT), a general-purpose reference implementation of the F distribution.
const jStat = createRequire(import.meta.url)("jstat") as { centralF: { cdf(x: number, d1: number, d2: number): number } };

describe("upper tail of the F distribution", () => {
  it("gives 0.05 at the tabulated 5 % point F(2, 10) = 4.10 (printed F tables, e.g. Abramowitz & Stegun table 26.9; from memory)", () => {
    // The table value is rounded to three digits: 4.10 against the exact 4.1028, so a tolerance of 3e-4 in p.
    expectClose(fSf(4.1028, 2, 10), 0.05, { atol: 3e-4, source: "F table, 5 % point of F(2, 10) = 4.1028" });
  });

  it("matches jstat's central F at several degrees of freedom, including small tails", () => {
    for (const [x, d1, d2] of [
      [0.5, 1, 5],
      [3, 5, 40],
      [1.2, 30, 300],
      [25, 3, 100],
      [2.5, 7, 7.5],
    ]) {
      const reference = 1 - jStat.centralF.cdf(x, d1, d2);
      // jstat's incomplete beta stops its continued fraction near 1e-9 relative (3e-11 absolute seen at F(5, 40)),
      // and 1 − cdf loses digits below 1e-15 absolute in small tails: 1e-8 relative plus 1e-15 absolute.
      expectClose(fSf(x, d1, d2), reference, { rtol: 1e-8, atol: 1e-15, source: `jstat centralF.cdf(${x}, ${d1}, ${d2})` });
    }
  });

  it("is 1 at zero and 0 at infinity", () => {
    expect(fSf(0, 3, 4)).toBe(1);
    expect(fSf(Number.POSITIVE_INFINITY, 3, 4)).toBe(0);
  });
});

describe("Hotelling's test from block sums", () => {
  it("reduces to Student's one-sample t test for one residual (T² = t², F(1, B − 1) tail = two-sided t tail)", () => {
    // Exact identity (Hotelling 1931): with K = 1, T² = B x̄²/s² = t² and F = T².
    const rng = rngFromText("hotelling one");
    const sums = Array.from({ length: 25 }, () => [0.3 + rng.normal()]);
    const h = blockHotelling(sums);
    const x = sums.map((s) => s[0]);
    const mean = x.reduce((a, b) => a + b, 0) / x.length;
    const sd = Math.sqrt(x.reduce((a, b) => a + (b - mean) ** 2, 0) / (x.length - 1));
    const t = mean / (sd / Math.sqrt(x.length));
    expectClose(h.statistic, t * t, { rtol: 1e-12, source: "T² = t² for one variable" });
    expectClose(h.pValue, studentTTwoSidedP(t, x.length - 1), { rtol: 1e-9, source: "F(1, ν) tail = two-sided t tail with ν degrees of freedom" });
    expect(h.dof).toBe(1);
    expect(h.denominatorDof).toBe(24);
  });

  it("is invariant under a change of scale of each residual and rejects a shifted mean", () => {
    const rng = rngFromText("hotelling scale");
    const sums = Array.from({ length: 60 }, () => [rng.normal(), rng.normal() + 0.8 * rng.normal(), 0.5 + rng.normal()]);
    const scaled = sums.map((s) => [s[0] * 1e6, s[1] * 1e-3, s[2]]);
    const a = blockHotelling(sums);
    const b = blockHotelling(scaled);
    // T² is affine invariant (Anderson, An Introduction to Multivariate Statistical Analysis (2003), §5.2).
    expectClose(b.statistic, a.statistic, { rtol: 1e-9, source: "affine invariance of T²" });
    // The third residual has mean 0.5 per block: 60 blocks put it about 3.9 standard errors from zero.
    expect(a.pValue).toBeLessThan(0.01);
  });

  it("gives no p-value with no more blocks than residuals", () => {
    expect(Number.isNaN(blockHotelling([[1, 2], [3, 4]]).pValue)).toBe(true);
  });
});
