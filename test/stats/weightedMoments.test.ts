import { describe, it, expect } from "vitest";
import { weightedMeanOf, weightedMoments } from "../../src/stats/weightedMoments.ts";
import { expectClose } from "../helpers/expectClose.ts";

/** NIST StRD "NumAcc" style data: centre c, then 500 pairs c ± 0.1 (the datasets' layout from memory). */
function numAcc(c: number): Float64Array {
  const x = [c];
  for (let i = 0; i < 500; i++) x.push(c - 0.1, c + 0.1);
  return Float64Array.from(x);
}

describe("weightedMoments", () => {
  it("gets NIST StRD NumAcc1 exactly: 10000001, 10000003, 10000002 → mean 10000002, sd 1", () => {
    // Certified values of NIST Statistical Reference Datasets, univariate NumAcc1 (also exact by hand).
    const m = weightedMoments(Float64Array.from([10000001, 10000003, 10000002]));
    expect(m.mean).toBe(10000002);
    expect(m.variance).toBe(1);
  });

  it("keeps the digits of NumAcc3/NumAcc4-like data (large offset, spread 0.1)", () => {
    // Mean c and sd exactly √(1000·0.01/1000) = 0.1 by construction (NIST StRD certifies 0.1 for NumAcc2–4).
    // A naive sum of squares loses every digit at c = 1e7; Welford keeps ~1e-9 relative.
    for (const c of [1.2, 1000000.2, 10000000.2]) {
      const m = weightedMoments(numAcc(c));
      expectClose(m.mean, c, { rtol: 1e-14, source: "exact by construction (NIST StRD NumAcc layout)" });
      expectClose(Math.sqrt(m.variance), 0.1, { rtol: 1e-8, source: "exact by construction; rtol covers the representation error of c ± 0.1 at 1e7" });
    }
  });

  it("treats weights as frequencies: the same as repeating rows", () => {
    const w = weightedMoments(Float64Array.from([1, 4, 6]), Float64Array.from([2, 1, 3]));
    const r = weightedMoments(Float64Array.from([1, 1, 4, 6, 6, 6]));
    expect(w.n).toBe(6);
    expectClose(w.mean, r.mean, { rtol: 1e-15, source: "identity: frequency weights" });
    expectClose(w.variance, r.variance, { rtol: 1e-14, source: "identity: frequency weights" });
    expectClose(w.standardError, Math.sqrt(r.variance / 6), { rtol: 1e-14, source: "definition se = √(s²/n)" });
  });

  it("skips zero weights and reports NaN spread for a single realisation", () => {
    const m = weightedMoments(Float64Array.from([5, 100]), Float64Array.from([1, 0]));
    expect(m.mean).toBe(5);
    expect(m.variance).toBeNaN();
    expect(weightedMeanOf(3, (i) => i * i).mean).toBeCloseTo(5 / 3, 15);
  });
});
