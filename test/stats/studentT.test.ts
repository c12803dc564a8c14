import { describe, it, expect } from "vitest";
import { studentTCdf, studentTPdf, studentTQuantile, studentTSf, studentTTwoSidedP } from "../../src/stats/studentT.ts";
import { normalCdf } from "../../src/stats/normal.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { jStat } from "./jstatReference.ts";

describe("studentTCdf", () => {
  it("is the Cauchy law at one degree of freedom: 1/2 + atan(t)/π (exact)", () => {
    for (const t of [-30, -2, -0.3, 0, 0.7, 5]) {
      expectClose(studentTCdf(t, 1), 0.5 + Math.atan(t) / Math.PI, { rtol: 1e-13, atol: 1e-16, source: "exact: t with ν = 1 is Cauchy" });
    }
  });

  it("has the closed form 1/2 + t/(2√(2+t²)) at two degrees of freedom (exact)", () => {
    for (const t of [-4, -1, 0.25, 3]) {
      expectClose(studentTCdf(t, 2), 0.5 + t / (2 * Math.sqrt(2 + t * t)), { rtol: 1e-13, source: "exact: t distribution with ν = 2" });
    }
  });

  it("matches jstat for non-integer and large degrees of freedom", () => {
    for (const [t, df] of [[-2.1, 3.5], [1.5, 30], [-0.4, 0.7], [2.9, 250]]) {
      // jstat 1.9 studentt.cdf goes through its ibeta, good to a few 1e-9 relative at small ν (see beta.test.ts).
      expectClose(studentTCdf(t, df), jStat.studentt.cdf(t, df), { rtol: 1e-8, source: `jstat 1.9 studentt.cdf(${t}, ${df})` });
    }
  });

  it("tends to the normal law as ν grows and equals it at ν = Infinity", () => {
    expect(studentTCdf(1.3, Infinity)).toBe(normalCdf(1.3));
    // |F_ν − Φ| is O(1/ν); at ν = 1e6 well below 1e-6.
    expectClose(studentTCdf(1.3, 1e6), normalCdf(1.3), { atol: 1e-6, source: "limit ν → ∞, error O(1/ν)" });
  });

  it("keeps upper-tail probabilities that subtraction would lose", () => {
    // Cauchy: P(T > t) = atan(1/t)/π exactly for t > 0.
    expectClose(studentTSf(1e8, 1), Math.atan(1e-8) / Math.PI, { rtol: 1e-10, source: "exact Cauchy upper tail atan(1/t)/π" });
    expectClose(studentTTwoSidedP(-3, 1), (2 * Math.atan(1 / 3)) / Math.PI, { rtol: 1e-12, source: "exact Cauchy two-sided tail" });
  });

  it("has the Cauchy density at ν = 1 (exact)", () => {
    expectClose(studentTPdf(2, 1), 1 / (Math.PI * 5), { rtol: 1e-13, source: "exact: 1/(π(1+t²))" });
  });
});

describe("studentTQuantile", () => {
  it("reproduces the NIST/SEMATECH t table (e-Handbook §1.3.6.7.2) at ν = 10", () => {
    // Table values 1.812 and 2.228; full precision computed and confirmed with jstat 1.9 studentt.inv.
    expectClose(studentTQuantile(0.95, 10), 1.812461, { atol: 5e-7, source: "NIST/SEMATECH e-Handbook §1.3.6.7.2, t(0.95, 10) = 1.812461 (6 decimals)" });
    expectClose(studentTQuantile(0.975, 10), 2.228139, { atol: 5e-7, source: "NIST/SEMATECH e-Handbook §1.3.6.7.2, t(0.975, 10) = 2.228139 (6 decimals)" });
  });

  it("inverts the Cauchy law exactly: tan(π(p − 1/2))", () => {
    for (const p of [0.001, 0.2, 0.5, 0.9, 0.999]) {
      expectClose(studentTQuantile(p, 1), Math.tan(Math.PI * (p - 0.5)), { rtol: 1e-12, atol: 1e-15, source: "exact Cauchy quantile" });
    }
  });

  it("matches jstat.studentt.inv and round-trips through the cdf", () => {
    for (const [p, df] of [[0.001, 7], [0.3, 2.5], [0.99, 40], [1e-8, 3]]) {
      const q = studentTQuantile(p, df);
      expectClose(q, jStat.studentt.inv(p, df), { rtol: 5e-8, source: `jstat 1.9 studentt.inv(${p}, ${df}); its result is off by ~1e-9 in probability, ~3e-8 relative in t` });
      expectClose(studentTCdf(q, df), p, { rtol: 1e-11, source: "identity F(F⁻¹(p)) = p" });
    }
  });

  it("refuses a probability outside [0, 1] and degrees of freedom ≤ 0", () => {
    expect(() => studentTQuantile(1.2, 3)).toThrow("studentTQuantile needs p in [0, 1], got 1.2");
    expect(() => studentTCdf(1, 0)).toThrow("Student t needs degrees of freedom > 0, got 0");
  });
});
