import { describe, it, expect } from "vitest";
import { freedmanDiaconisBins, histogram, linearEdges } from "../../src/stats/histogram.ts";

describe("histogram", () => {
  it("counts values into half-open bins, closing the last bin at its upper edge", () => {
    const h = histogram([0, 0.5, 1, 1.5, 2, 2.5, 3], [0, 1, 2, 3]);
    expect(h.counts).toEqual([2, 2, 3]);
    expect(h.total).toBe(7);
  });

  it("adds weights and counts values outside the edges only in the total", () => {
    const h = histogram([-1, 0.2, 0.7, 5], [0, 0.5, 1], [10, 2, 3, 4]);
    expect(h.counts).toEqual([2, 3]);
    expect(h.total).toBe(19);
  });

  it("respects uneven edges exactly", () => {
    expect(histogram([0.1, 0.11, 0.5, 9], [0, 0.1, 1, 10]).counts).toEqual([0, 3, 1]);
  });
});

describe("linearEdges", () => {
  it("spaces edges evenly and widens a degenerate range around its value", () => {
    expect(linearEdges(0, 1, 4)).toEqual([0, 0.25, 0.5, 0.75, 1]);
    expect(linearEdges(2, 2, 2)).toEqual([1, 2, 3]);
  });
});

describe("freedmanDiaconisBins", () => {
  it("uses width 2·IQR·n^(−1/3) (Freedman & Diaconis 1981)", () => {
    // 0..999: IQR = 749 − 250 = 499 (nearest-rank quartiles), n = 1000 → width 99.8, range 999 → ceil(10.01) = 11 bins.
    const sorted = Float64Array.from({ length: 1000 }, (_, i) => i);
    expect(freedmanDiaconisBins(sorted, 1000)).toBe(11);
    expect(freedmanDiaconisBins(Float64Array.from([1, 1, 1]), 3)).toBe(10);
  });
});
