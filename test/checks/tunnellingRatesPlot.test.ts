/**
 * The dwell-time plot of tunnelling-rates: the fraction of stays in a state
 * longer than t beside e^{−Γ t}, Γ the estimated total rate out of the state.
 * For a Markov jump process the time spent in a state is exponential with the
 * total exit rate (memoryless property; J. R. Norris, Markov Chains (1997),
 * Thm 2.3.3, from memory), which is what the markers are compared with.
 */
import { describe, expect, it } from "vitest";
import { dwellSurvivalPlot } from "../../src/checks/tunnelling-rates/dwellPlot.ts";
import { jumpRates } from "../../src/checks/tunnelling-rates/tunnellingRates.ts";
import { rngFromText } from "../../src/stats/rng.ts";

type Points = { type: "points"; x: number[]; y: number[] };
type Line = { type: "line"; x: number[]; y: number[] };

describe("the dwell-time survival plot", () => {
  it("counts the stays longer than each t exactly (a hand-made record)", () => {
    // Stays of 1, 2, …, 100 s in state 0, 100 jumps to state 1 over 5050 s: Γ = 100/5050 per s.
    const dwells = Array.from({ length: 100 }, (_, i) => i + 1);
    const states = [
      { label: 0, time: 5050, exits: [{ to: 1, count: 100 }], dwells },
      { label: 1, time: 0, exits: [], dwells: [] },
    ];
    const plot = dwellSurvivalPlot({ states }, jumpRates({ states }, 0.95))!;
    expect(plot.y.scale).toBe("log");
    const [points, line] = plot.series as unknown as [Points, Line];
    // The grid ends at the stay that 1 % outlast: index floor(0.99 · 99) = 98, 99 s; 30 points from 0.
    expect(points.x[0]).toBe(0);
    expect(points.x[29]).toBe(99);
    points.x.forEach((t, k) => {
      // Stays longer than t among 1 … 100: 100 − floor(t) (counting, exact).
      expect(points.y[k]).toBe((100 - Math.floor(t)) / 100);
      expect(line.y[k]).toBeCloseTo(Math.exp((-100 / 5050) * t), 14);
    });
  });

  it("puts exponential stays on the line within their binomial spread", () => {
    // 4000 stays drawn from the exponential law of rate 2 per ns (inverse transform, common practice).
    const rng = rngFromText("dwell plot: exponential");
    const rate = 2e9;
    const dwells = Array.from({ length: 4000 }, () => -Math.log(1 - rng.uniform()) / rate);
    const time = dwells.reduce((a, b) => a + b, 0);
    const states = [
      { label: 1, time, exits: [{ to: 0, count: 4000 }], dwells },
      { label: 0, time: 0, exits: [], dwells: [] },
    ];
    const plot = dwellSurvivalPlot({ states }, jumpRates({ states }, 0.95))!;
    const [points, line] = plot.series as unknown as [Points, Line];
    points.y.forEach((fraction, k) => {
      const p = line.y[k];
      // Four binomial standard deviations of a fraction of 4000, plus the estimated rate's own spread
      // (relative 1/√4000 on Γ, so t·Γ/√4000 on ln p): a loose bound that still fails for another rate.
      const sd = Math.sqrt((p * (1 - p)) / 4000) + (p * rate * points.x[k]) / Math.sqrt(4000);
      expect(Math.abs(fraction - p)).toBeLessThan(4 * sd + 1e-12);
    });
    // Stays of twice the length, against the rate of the original record, sit far above the line
    // (at Γt = 1.4: e^−0.7 − e^−1.4 = 0.25), far outside that spread.
    const slow = dwellSurvivalPlot({ states: [{ ...states[0], dwells: dwells.map((x) => 2 * x) }] }, jumpRates({ states }, 0.95))!;
    const [slowPoints, slowLine] = slow.series as unknown as [Points, Line];
    expect(Math.max(...slowPoints.y.map((y, k) => y - slowLine.y[k]))).toBeGreaterThan(0.2);
  });
});
