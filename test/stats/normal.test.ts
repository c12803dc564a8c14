import { describe, it, expect } from "vitest";
import { erfc, normalCdf, normalQuantile, normalSf, normalTwoSidedP } from "../../src/stats/normal.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { jStat } from "./jstatReference.ts";

describe("normalCdf", () => {
  it("reproduces the NIST/SEMATECH e-Handbook table of areas from 0 to z (§1.3.6.7.1)", () => {
    // Table entries (5 decimals): z = 1.00 → 0.34134, 1.96 → 0.47500, 2.58 → 0.49506, 0.50 → 0.19146.
    const table: [number, number][] = [[1.0, 0.34134], [1.96, 0.475], [2.58, 0.49506], [0.5, 0.19146]];
    for (const [z, area] of table) expectClose(normalCdf(z) - 0.5, area, { atol: 5e-6, source: `NIST/SEMATECH §1.3.6.7.1, area 0..${z} to 5 decimals` });
  });

  it("matches jstat.normal.cdf in the body", () => {
    for (const z of [-3.2, -1, 0, 0.4, 2.2]) expectClose(normalCdf(z), jStat.normal.cdf(z, 0, 1), { rtol: 1e-12, atol: 1e-15, source: "jstat 1.9 normal.cdf" });
  });

  it("keeps the far upper tail: Q(10) lies between successive truncations of the asymptotic series", () => {
    // A&S 26.2.12: Q(x) = φ(x)/x · (1 − 1/x² + 3/x⁴ − 15/x⁶ + …), an alternating series whose partial sums bracket Q.
    const x = 10;
    const front = Math.exp(-x * x / 2) / Math.sqrt(2 * Math.PI) / x;
    const lower = front * (1 - 1 / x ** 2 + 3 / x ** 4 - 15 / x ** 6);
    const upper = front * (1 - 1 / x ** 2 + 3 / x ** 4 - 15 / x ** 6 + 105 / x ** 8);
    const q = normalSf(x);
    expect(q).toBeGreaterThan(lower);
    expect(q).toBeLessThan(upper);
    expect(upper - lower).toBeLessThan(2e-6 * q); // the bracket is tight enough to mean something
  });

  it("has erfc(0) = 1 and two-sided p = 1 at z = 0", () => {
    expect(erfc(0)).toBe(1);
    expect(normalTwoSidedP(0)).toBe(1);
    // Two-sided 5 % point: z = 1.959964 (NIST §1.3.6.7.1 quantile table, 6 decimals).
    expectClose(normalTwoSidedP(1.959964), 0.05, { atol: 2e-7, source: "NIST/SEMATECH z_0.975 = 1.959964" });
  });
});

describe("normalQuantile", () => {
  it("reproduces the NIST/SEMATECH critical values z_0.95, z_0.975, z_0.995", () => {
    expectClose(normalQuantile(0.95), 1.644854, { atol: 5e-7, source: "NIST/SEMATECH e-Handbook §1.3.6.7.1 (6 decimals)" });
    expectClose(normalQuantile(0.975), 1.959964, { atol: 5e-7, source: "NIST/SEMATECH e-Handbook §1.3.6.7.1 (6 decimals)" });
    expectClose(normalQuantile(0.995), 2.575829, { atol: 5e-7, source: "NIST/SEMATECH e-Handbook §1.3.6.7.1 (6 decimals)" });
  });

  it("inverts the cdf across the range, tails included", () => {
    for (const p of [1e-12, 1e-5, 0.02, 0.5, 0.7, 0.999]) {
      expectClose(normalCdf(normalQuantile(p)), p, { rtol: 1e-12, source: "identity Φ(Φ⁻¹(p)) = p (AS 241 is good to ~1e-16)" });
    }
    expect(normalQuantile(0)).toBe(-Infinity);
    expect(() => normalQuantile(2)).toThrow("normalQuantile needs p in [0, 1], got 2");
  });
});
