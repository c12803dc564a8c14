import { describe, it, expect } from "vitest";
import { engineeringScale, groupBy, sortedBy } from "../../src/checks/reciprocity/points.ts";

describe("coefficient-check helpers", () => {
  it("engineeringScale picks the SI prefix that brings the largest magnitude into [1, 1000)", () => {
    expect(engineeringScale([2.5e-14, -1e-15])).toEqual({ factor: 1e15, prefix: "f" });
    expect(engineeringScale([4.2e-5])).toEqual({ factor: 1e6, prefix: "µ" });
    expect(engineeringScale([999])).toEqual({ factor: 1, prefix: "" });
    expect(engineeringScale([0, NaN])).toEqual({ factor: 1, prefix: "" });
  });

  it("groupBy keeps first-seen order and sortedBy orders indices by abscissa", () => {
    expect([...groupBy([1, 2, 3, 4], (v) => (v % 2 ? "odd" : "even")).entries()]).toEqual([["odd", [1, 3]], ["even", [2, 4]]]);
    expect(sortedBy([3, 1, 2])).toEqual([1, 2, 0]);
  });
});
