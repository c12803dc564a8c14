import { describe, expect, it } from "vitest";
import { expectClose } from "../helpers/expectClose.ts";
import { findLinearWindow, fitLine, pseudoResidualNoise } from "../../src/stats/changePoint.ts";
import { rngFromText } from "../../src/stats/rng.ts";

/** Delayed onset at tOn, linear growth with slope J, saturation at tEnd: exact piecewise-linear curve. */
function rampCurve(n: number, step: number, tOn: number, tEnd: number, J: number): { t: number[]; y: number[] } {
  const t = Array.from({ length: n }, (_, i) => i * step);
  const y = t.map((x) => J * (Math.min(Math.max(x, tOn), tEnd) - tOn));
  return { t, y };
}

const OPTIONS = { minPoints: 5, alpha: 0.01, relativeFloor: 1e-3 };

describe("findLinearWindow", () => {
  it("finds a linear window between a delayed onset and a saturation within one sampling step (noisy, known errors)", () => {
    const rng = rngFromText("test:changePoint:noisy-ramp");
    const step = 0.5;
    const tOn = 5.2;
    const tEnd = 15.3;
    const J = 2;
    const sd = 0.03;
    const { t, y } = rampCurve(40, step, tOn, tEnd, J);
    const noisy = y.map((v) => v + sd * rng.normal());
    const search = findLinearWindow(t, noisy, new Array(t.length).fill(sd), OPTIONS);
    const w = search.window!;
    expect(w).not.toBeNull();
    // The first sample inside the ramp is t = 5.5 and the last is t = 15.0 (exact construction).
    expect(Math.abs(t[w.start] - 5.5)).toBeLessThanOrEqual(step);
    expect(Math.abs(t[w.end] - 15.0)).toBeLessThanOrEqual(step);
    expect(Math.abs(w.onset!.time - tOn)).toBeLessThanOrEqual(step);
    expect(Math.abs(w.finish!.time - tEnd)).toBeLessThanOrEqual(step);
    // Slope: exact value 2; tolerance 4 standard errors of the weighted fit.
    expectClose(w.fit.slope, J, { atol: 4 * Math.sqrt(w.fit.varSlope), source: "exact construction, slope 2; 4 standard errors" });
    expect(w.onset!.slopeOutside).not.toBeNull();
    expect(Math.abs(w.finish!.slopeOutside!)).toBeLessThan(0.1);
  });

  it("locates the kinks of a noise-free curve exactly (Hudson's intersection of the segment lines)", () => {
    const { t, y } = rampCurve(30, 1, 6.4, 21.7, 0.8);
    const search = findLinearWindow(t, y, null, OPTIONS);
    const w = search.window!;
    expect(search.noise).toBe("estimated");
    expect([t[w.start], t[w.end]]).toEqual([7, 21]);
    // Each segment is an exact line, so the join points are the construction's kinks (rtol 1e-9: rounding only).
    expectClose(w.onset!.time, 6.4, { rtol: 1e-9, source: "exact construction, onset at 6.4" });
    expectClose(w.finish!.time, 21.7, { rtol: 1e-9, source: "exact construction, end at 21.7" });
    expectClose(w.fit.slope, 0.8, { rtol: 1e-9, source: "exact construction, slope 0.8" });
  });

  it("takes the whole range when the curve is a line throughout", () => {
    const rng = rngFromText("test:changePoint:line");
    const t = Array.from({ length: 25 }, (_, i) => 1 + i);
    const y = t.map((x) => 3 + 0.5 * x + 0.01 * rng.normal());
    const search = findLinearWindow(t, y, new Array(25).fill(0.01), OPTIONS);
    expect(search.window!.start).toBe(0);
    expect(search.window!.end).toBe(24);
    expect(search.window!.onset).toBeNull();
    expect(search.window!.finish).toBeNull();
  });

  it("finds no window on a curve that bends everywhere, and every minimal run rejects", () => {
    const t = Array.from({ length: 20 }, (_, i) => i);
    const y = t.map((x) => Math.exp(x / 3));
    const search = findLinearWindow(t, y, new Array(20).fill(0.01), OPTIONS);
    expect(search.window).toBeNull();
    expect(search.minimalRuns).toBe(16);
    expect(search.minimalRunsRejected).toBe(16);
  });
});

describe("pseudoResidualNoise", () => {
  it("estimates the noise of a line with Gaussian scatter", () => {
    const rng = rngFromText("test:changePoint:gsj");
    const t = Array.from({ length: 2000 }, (_, i) => i * 0.1 + (i % 3) * 0.01);
    const y = t.map((x) => 1 - 2 * x + 0.5 * rng.normal());
    // Gasser, Sroka & Jennen-Steinmetz (1986): pseudo-residuals of a line are pure noise with variance sigma².
    // MAD-based scale of ~2000 values has relative standard error about 1.17/sqrt(2000) ≈ 2.6 %; allow 4 of them.
    expectClose(pseudoResidualNoise(t, y), 0.5, { rtol: 0.1, source: "true noise 0.5; 4 standard errors of a MAD scale" });
  });
});

describe("fitLine", () => {
  it("gives the straight line through exact points with zero chi-square", () => {
    const f = fitLine([1, 2, 4], [3, 5, 9], [1, 1, 1], 0, 2);
    expectClose(f.slope, 2, { rtol: 1e-14, source: "exact line y = 1 + 2t" });
    expectClose(f.at(0), 1, { rtol: 1e-14, source: "exact line y = 1 + 2t" });
    expectClose(f.chiSquare, 0, { atol: 1e-24, source: "exact line: zero residuals" });
  });
});
