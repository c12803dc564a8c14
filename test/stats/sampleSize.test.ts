import { describe, expect, it } from "vitest";
import { realisationsToResolve, resolveSentence } from "../../src/stats/sampleSize.ts";

describe("realisationsToResolve", () => {
  it("scales the sample by the square of the half-width over the room left inside the margin", () => {
    // Half-width ∝ 1/√n (central limit theorem): halving it needs four times the sample (exact algebra).
    expect(realisationsToResolve(100, 0.1, 0, 0.05)).toBe(400);
    expect(realisationsToResolve(100, 0.1, -0.03, 0.05)).toBe(2500);
    expect(realisationsToResolve(100, 0.1, 0.05, 0.05)).toBeNull();
  });

  it("says so when more data cannot give a pass", () => {
    expect(resolveSentence(100, 0.1, 0.2, 0.05)).toBe("The estimate lies at or beyond the margin of 0.05; more realisations would decide between a violation and a pass.");
    expect(resolveSentence(1000, 0.1, 0, 0.05)).toBe("About 4,000 realisations at this spread would resolve the margin of 0.05.");
  });
});
