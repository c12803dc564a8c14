import { describe, it, expect } from "vitest";
import { tost } from "../../src/stats/tost.ts";
import { expectClose } from "../helpers/expectClose.ts";

describe("tost", () => {
  it("computes the two statistics and p = max(p_L, p_U) (Schuirmann 1987) against the t table", () => {
    // Estimate 0.2, se 0.1, margin ±0.5, ν = 10: t_L = 7, t_U = 3.
    const r = tost({ estimate: 0.2, se: 0.1, lower: -0.5, upper: 0.5, alpha: 0.05, df: 10 });
    expectClose(r.tLower, 7, { rtol: 1e-12, source: "exact arithmetic (0.2 + 0.5)/0.1" });
    expectClose(r.tUpper, 3, { rtol: 1e-12, source: "exact arithmetic (0.5 − 0.2)/0.1" });
    expect(r.p).toBe(r.pUpper);
    // 90 % interval: 0.2 ± t(0.95, 10)·0.1, t(0.95, 10) = 1.812461 (NIST/SEMATECH e-Handbook §1.3.6.7.2).
    expectClose(r.interval[0], 0.2 - 0.1812461, { atol: 1e-7, source: "NIST t table, 6 decimals" });
    expectClose(r.interval[1], 0.2 + 0.1812461, { atol: 1e-7, source: "NIST t table, 6 decimals" });
    expect(r.equivalent).toBe(true);
  });

  it("decides exactly as the 1 − 2α interval inside the margin does", () => {
    // t(0.95, 10) = 1.812461: an estimate 0.3 with se 0.11 has upper limit 0.4994 < 0.5 (equivalent),
    // with se 0.111 it has 0.5012 > 0.5 (not equivalent).
    expect(tost({ estimate: 0.3, se: 0.11, lower: -0.5, upper: 0.5, alpha: 0.05, df: 10 }).equivalent).toBe(true);
    const r = tost({ estimate: 0.3, se: 0.111, lower: -0.5, upper: 0.5, alpha: 0.05, df: 10 });
    expect(r.equivalent).toBe(false);
    expect(r.interval[1]).toBeGreaterThan(0.5);
  });

  it("uses the normal law for a known standard uncertainty (df = Infinity)", () => {
    // p_U = 1 − Φ(1.644854) = 0.05 at the one-sided z_0.95 of NIST §1.3.6.7.1.
    const r = tost({ estimate: 0, se: 1, lower: -1.644854, upper: 1.644854, alpha: 0.05 });
    expectClose(r.pUpper, 0.05, { atol: 1e-7, source: "NIST/SEMATECH §1.3.6.7.1: z_0.95 = 1.644854 (6 decimals)" });
    expect(r.df).toBe(Infinity);
  });

  it("treats se = 0 as an exact value", () => {
    expect(tost({ estimate: 0.1, se: 0, lower: -1, upper: 1, alpha: 0.05 }).equivalent).toBe(true);
    expect(tost({ estimate: 1, se: 0, lower: -1, upper: 1, alpha: 0.05 }).equivalent).toBe(false);
  });

  it("refuses an empty margin", () => {
    expect(() => tost({ estimate: 0, se: 1, lower: 1, upper: -1, alpha: 0.05 })).toThrow("tost needs lower < upper, got [1, -1]");
  });
});
