import { describe, it, expect } from "vitest";
import { holm } from "../../src/stats/holm.ts";
import { expectClose } from "../helpers/expectClose.ts";

describe("holm", () => {
  // Worked example: p = (0.50, 0.01, 0.001, 0.69, 0.02, 0.05, 0.0025). Step-down rule of Holm, Scand. J. Stat. 6, 65 (1979):
  // sorted p(1..7) = 0.001, 0.0025, 0.01, 0.02, 0.05, 0.5, 0.69 against α/7, α/6, α/5, … The published reading "rejects only
  // 0.001 and 0.0025" at α = 0.05 needs a strict comparison at the third step, where 0.01 meets α/5 = 0.01 exactly; the
  // convention pinned here ("≤") rejects it (edge test below), so the two-rejection case is shown at α = 0.049.
  // Adjusted p̃(k) = max_{j≤k} min(1, (m − j + 1) p(j)) computed by hand.
  const p = [0.5, 0.01, 0.001, 0.69, 0.02, 0.05, 0.0025];
  const adjustedByHand = [1, 0.05, 0.007, 1, 0.08, 0.15, 0.015];

  it("gives the adjusted p-values of the worked example", () => {
    const r = holm(p, 0.05);
    r.adjusted.forEach((a, i) => expectClose(a, adjustedByHand[i], { rtol: 1e-12, source: "hand computation of Holm's adjusted p (Wright, Biometrics 48, 1005 (1992))" }));
    expect(r.smallest).toBe(2);
    expect(r.m).toBe(7);
  });

  it("rejects only 0.001 and 0.0025 when the third step misses its threshold (α = 0.049)", () => {
    // α/7 = 0.0070, α/6 = 0.0082, α/5 = 0.0098 < 0.01: stop at the third step.
    expect(holm(p, 0.049).rejected).toEqual([false, false, true, false, false, false, true]);
  });

  it("rejects at the exact boundary p(k) = α/(m − k + 1): pinned convention '≤' (IEEE: 0.01·5 === 0.05)", () => {
    expect(0.01 * 5).toBe(0.05); // the edge is exact in doubles, so the convention decides
    const r = holm([0.01, 0.5, 0.6, 0.7, 0.8], 0.05);
    expect(r.adjusted[0]).toBe(0.05);
    expect(r.rejected).toEqual([true, false, false, false, false]);
    // With α = 0.05 the worked example therefore also rejects 0.01 (p̃ = 0.05 ≤ α) and stops at 0.02 (p̃ = 0.08).
    expect(holm(p, 0.05).rejected).toEqual([false, true, true, false, false, false, true]);
  });

  it("stops at the first failure even when a later p would pass its own threshold", () => {
    // m = 3, α = 0.05: 0.02 > α/3, so 0.03 and 0.04 are retained although 0.04 ≤ α/1.
    expect(holm([0.04, 0.02, 0.03], 0.05).rejected).toEqual([false, false, false]);
  });

  it("handles an empty family and refuses p outside [0, 1]", () => {
    expect(holm([], 0.01)).toEqual({ alpha: 0.01, m: 0, adjusted: [], rejected: [], smallest: -1 });
    expect(() => holm([0.2, 1.5], 0.05)).toThrow("holm needs p-values in [0, 1]; p[1] = 1.5");
  });
});
