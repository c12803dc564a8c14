import { describe, expect, it } from "vitest";
import { traceOccupancy } from "../../../src/ingest/trace/traceOccupancy.ts";
import { detectionStatistics } from "../../../src/ingest/trace/detectionStatistics.ts";

describe("time in each state and the jumps out of it", () => {
  it("counts censored first and last stays in the time but not among complete stays, and skips repeated rows", () => {
    // 0 from t = 0 (censored start) to 2; 1 from 2 to 5 (a repeated row at 3 is no jump); 0 from 5 to 6;
    // 1 from 6 to the end of the record at 10 (censored). Worked by hand.
    const times = Float64Array.from([0, 2, 3, 5, 6, 10]);
    const states = Int32Array.from([0, 1, 1, 0, 1, 1]);
    const o = traceOccupancy(times, states);
    expect(o.duration).toBe(10);
    expect(o.states).toEqual([
      { label: 0, time: 3, exits: [{ to: 1, count: 2 }], dwells: [1] },
      { label: 1, time: 7, exits: [{ to: 0, count: 1 }], dwells: [3] },
    ]);
    // The detector's dwell statistics use the same complete stays: the stay in 1 lasted 3, not 1 (to the repeated row).
    const d = detectionStatistics(times, states, null, "test");
    expect(d.states.map((s) => [s.label, s.stays, s.meanDwell])).toEqual([[0, 1, 1], [1, 1, 3]]);
  });
});
