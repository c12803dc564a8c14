import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { parquetWriteFile } from "hyparquet-writer";
import { detectTransitions } from "../../../src/ingest/trace/hysteresis.ts";
import { integratedAutocorrelationTime } from "../../../src/ingest/trace/blockLength.ts";
import { cutWindows } from "../../../src/ingest/trace/cutWindows.ts";
import { ingestAudit } from "../../../src/ingest/loadAudit.ts";
import type { SamplesDataset } from "../../../src/ingest/types.ts";
import { DataError } from "../../../src/errors.ts";
import { rngFromText } from "../../../src/stats/rng.ts";
import { tempAudit } from "../../helpers/tempAudit.ts";
import { rejectedWith } from "../../helpers/thrown.ts";
import { expectClose } from "../../helpers/expectClose.ts";

describe("two-threshold detection with hysteresis", () => {
  it("switches only when a threshold is crossed, keeps the state inside the band, and waits for the first crossing", () => {
    const time = Float64Array.from([0, 1, 2, 3, 4, 5, 6, 7]);
    const level = Float64Array.from([0.5, 0.9, 0.5, 0.35, 0.1, 0.6, 0.45, 0.95]);
    const d = detectTransitions(time, level, 0.3, 0.7, 0, 1);
    // 0.5 is in the band (unknown), 0.9 → state 1, 0.5 and 0.35 stay 1, 0.1 → 0, 0.6 and 0.45 stay 0, 0.95 → 1.
    expect(Array.from(d.times)).toEqual([1, 4, 7]);
    expect(Array.from(d.states)).toEqual([1, 0, 1]);
  });
});

describe("integrated autocorrelation time", () => {
  it("gives (1 + φ)/(1 − φ) for an AR(1) series (Sokal 1997; Priestley, Spectral Analysis and Time Series (1981), §5.3)", () => {
    const rng = rngFromText("ar1");
    const phi = 0.6;
    const x = new Float64Array(200000);
    for (let i = 1; i < x.length; i++) x[i] = phi * x[i - 1] + rng.normal();
    // Exact value 4; the windowed estimator's statistical error at N = 2e5 is about √(2(2M+1)/N)·τ ≈ 3 %, so 10 %.
    expectClose(integratedAutocorrelationTime(x), (1 + phi) / (1 - phi), { rtol: 0.1, source: "AR(1): τ_int = (1 + φ)/(1 − φ)" });
  });
});

describe("windows cut from a trace", () => {
  it("counts the jumps inside each window and records the states at both ends", () => {
    const times = Float64Array.from([0, 0.5, 1.5, 2.2, 3.9]);
    const states = Int32Array.from([0, 1, 0, 1, 0]);
    const inA = { dN_A: -1, dN_B: 0, dE_A: -1, dE_B: 0 };
    const outB = { dN_A: 0, dN_B: 1, dE_A: 0, dE_B: 1 };
    const w = cutWindows(times, states, [null, inA, outB, inA, outB], 1);
    // Windows [0,1), [1,2), [2,3) (the incomplete [3, 3.9] is dropped).
    expect(Array.from(w.dN_A)).toEqual([-1, 0, -1]);
    expect(Array.from(w.dN_B)).toEqual([0, 1, 0]);
    expect(Array.from(w.start)).toEqual([0, 1, 0]);
    expect(Array.from(w.end)).toEqual([1, 0, 1]);
  });
});

const TRACE_YAML = `id: trace-test
title: Trace
authors: [{ name: "Test Author" }]
datasets:
  - id: dd
    kind: trace
    file: data/trace.csv
    signal: transitions
    columns: { time: t, state: s }
    time_unit: ns
    windows: [1, 2]
    energy_unit: meV
    reservoirs: { A: { T: 1, mu: 0.1 }, B: { T: 1, mu: 0 } }
    transitions:
      - { from: 0, to: 1, dN_A: -1, dE_A: -0.1 }
      - { from: 1, to: 0, dN_A: 1, dE_A: 0.1 }
      - { from: 1, to: 2 }
      - { from: 2, to: 0, dN_B: 1, dE_B: 0.1 }
`;

describe("kind: trace", () => {
  it("builds one samples dataset per window length, with states, per-lead counts and blocks", async () => {
    const dir = tempAudit(TRACE_YAML, { "data/trace.csv": "t,s\n0,0\n0.3,1\n0.7,2\n1.2,0\n1.5,1\n2.5,2\n2.6,0\n3.1,0\n4.2,1\n" });
    const datasets = (await ingestAudit(dir)).datasets as SamplesDataset[];
    expect(datasets.map((d) => d.id)).toEqual(["dd-tau-1ns", "dd-tau-2ns"]);
    const one = datasets[0];
    expect(one.tau).toBe(1e-9);
    expect(one.config.series).toBe("dd");
    expect(Array.from(one.leadParticles!.B)).toEqual([0, 1, 1, 0]);
    expect(Array.from(one.leadParticles!.A)).toEqual([-1, -1, 0, 0]);
    expect(one.windows!.blockLength).toBeGreaterThanOrEqual(2);
  });

  it("refuses a jump that audit.yaml does not map, naming its first line", async () => {
    const dir = tempAudit(TRACE_YAML, { "data/trace.csv": "t,s\n0,0\n0.3,1\n0.7,2\n1.2,1\n" });
    const e = await rejectedWith(DataError, () => ingestAudit(dir));
    expect(e.message).toBe(
      'data/trace.csv: the trace jumps "2" → "1" (first at line 5, column "s"), which audit.yaml datasets[0].transitions does not map; add what each such jump moves into lead A and lead B (dN_A, dN_B, dE_A, dE_B)',
    );
  });

  it("refuses time going backwards with file, line and column", async () => {
    const dir = tempAudit(TRACE_YAML, { "data/trace.csv": "t,s\n0,0\n0.3,1\n0.2,2\n" });
    const e = await rejectedWith(DataError, () => ingestAudit(dir));
    expect(e.message).toBe('data/trace.csv, line 4, column "t": time "0.2" comes before the previous row\'s "0.3"; a trace lists its rows in time order');
  });
});

/**
 * A message about a cell of a trace quotes it as the file writes it: `1.0` and `1` are the same
 * state, `0.20` reads as 0.2, and a label printed from its double would not be found in the file.
 */
describe("trace cells in messages, as written", () => {
  const refusal = async (csv: string, yaml = TRACE_YAML) => (await rejectedWith(DataError, () => ingestAudit(tempAudit(yaml, { "data/trace.csv": csv })))).message;
  const UNMAPPED = "which audit.yaml datasets[0].transitions does not map; add what each such jump moves into lead A and lead B (dN_A, dN_B, dE_A, dE_B)";

  it("quotes both labels of an unmapped jump as written, with the line and column of the first", async () => {
    // 2 → 1 and 0 → 2 are not declared in TRACE_YAML; "1.0" is label 1, "+2" and "2.00" are label 2.
    expect(await refusal("t,s\n0,0\n0.3,1\n0.7,+2\n1.2,1.0\n1.5,0\n1.8,2.00\n")).toBe(
      `data/trace.csv: the trace jumps "+2" → "1.0" (first at line 5, column "s"), "0" → "2.00" (first at line 7, column "s"), ${UNMAPPED}`,
    );
  });

  it("quotes labels that are not integers, or too large for a state, every one at once", async () => {
    // 5.0e9 is a whole number beyond 2^31 − 1: held as a 32-bit state it would wrap onto another label.
    expect(await refusal("t,s\n0,0\n0.3,0.50\n0.7,5.0e9\n1.2,-1.25E0\n")).toBe(
      [
        'data/trace.csv:3, column "s": expected an integer state label, found "0.50"',
        'data/trace.csv:4, column "s": expected a state label of magnitude at most 1e9, found "5.0e9"',
        'data/trace.csv:5, column "s": expected an integer state label, found "-1.25E0"',
      ].join("\n"),
    );
  });

  it("quotes both times of rows out of order as written", async () => {
    expect(await refusal("t,s\n0,0\n0.30,1\n2.0e-1,2\n")).toBe(
      'data/trace.csv, line 4, column "t": time "2.0e-1" comes before the previous row\'s "0.30"; a trace lists its rows in time order',
    );
  });

  it("names where the trace first shows a state the declared distribution leaves out, as written", async () => {
    // Windows of 1 ns start at 0, 1, 2 and 3 ns; at 1 ns the dot is in state 2 (since 0.7 ns), which is not declared.
    const yaml = TRACE_YAML.replace("    windows: [1, 2]\n", "    windows: [1, 2]\n    state_distribution: { 0: 0.5, 1: 0.5 }\n");
    expect(await refusal("t,s\n0,0\n0.3,1\n0.7,2.0\n1.2,0\n1.5,1\n2.5,2\n2.6,0\n3.1,0\n4.2,1\n", yaml)).toBe(
      'audit.yaml datasets[0].state_distribution: gives no probability for state 2 (first at line 4, column "s": "2.0"), which data/trace.csv shows; declare the stationary probability of every state',
    );
  });

  it("gives Parquet cells, which have no text, as the doubles they store, at their rows", async () => {
    const parquet = (s: number[]) => {
      const dir = tempAudit(TRACE_YAML.replace("data/trace.csv", "data/trace.parquet"));
      fs.mkdirSync(path.join(dir, "data"));
      parquetWriteFile({
        filename: path.join(dir, "data/trace.parquet"),
        columnData: [
          { name: "t", data: Float64Array.from(s, (_, i) => 0.3 * i), type: "DOUBLE", nullable: false },
          { name: "s", data: Float64Array.from(s), type: "DOUBLE", nullable: false },
        ],
      });
      return dir;
    };
    expect((await rejectedWith(DataError, () => ingestAudit(parquet([0, 1, 0.5, 1])))).message).toBe('data/trace.parquet, row 3, column "s": expected an integer state label, found 0.5');
    expect((await rejectedWith(DataError, () => ingestAudit(parquet([0, 1, 2, 1])))).message).toBe(
      `data/trace.parquet: the trace jumps 2 → 1 (first at row 4, column "s"), ${UNMAPPED}`,
    );
  });
});

describe("windows of a trace against the same windows as independent samples", () => {
  it("give the same verdicts when neighbouring windows are nearly independent (long windows of a fast double dot)", async () => {
    const { synthDoubleDot } = await import("../../../src/synth/index.ts");
    const { runAudit } = await import("../../../src/report/runAudit.ts");
    const sim = synthDoubleDot({ samples: "4000", tau: "10", seed: "trace vs samples" });
    const header = `id: trace-vs-samples
title: Trace against samples
authors: [{ name: "Test Author" }]
datasets:
`;
    const leads = `    energy_unit: meV
    reservoirs: { A: { T: 1, mu: 0.08 }, B: { T: 1, mu: 0 } }`;
    const traceDir = tempAudit(
      `${header}  - id: dd
    kind: trace
    file: data/trace.csv
    signal: transitions
    columns: { time: time, state: state }
    time_unit: ns
    windows: [10]
${leads}
    transitions:
      - { from: 0, to: 1, dN_A: -1, dE_A: -0.1 }
      - { from: 1, to: 0, dN_A: 1, dE_A: 0.1 }
      - { from: 1, to: 2 }
      - { from: 2, to: 1 }
      - { from: 2, to: 0, dN_B: 1, dE_B: 0.1 }
      - { from: 0, to: 2, dN_B: -1, dE_B: -0.1 }
checks: [exchange-fluctuation, integral-fluctuation, second-law, weighted-identity]
`,
      { "data/trace.csv": sim.files["data/trace.csv"] },
    );
    // The same windows written as rows of a samples file (the trace's own cut, so the numbers are identical).
    const d = (await ingestAudit(traceDir)).datasets[0] as SamplesDataset;
    const rows = ["dE_A,dE_B,dN_A,dN_B,x0,x1"];
    for (let i = 0; i < d.realisations; i++) {
      rows.push([d.leadParticles!.A[i] * 0.1, d.leadParticles!.B[i] * 0.1, d.leadParticles!.A[i], d.leadParticles!.B[i], d.states!.labels[d.states!.start[i]], d.states!.labels[d.states!.end[i]]].map((x) => Number(x.toPrecision(12))).join(","));
    }
    const samplesDir = tempAudit(
      `${header}  - id: dd
    kind: samples
    file: data/windows.csv
    columns: { dE_A: dE_A, dE_B: dE_B, dN_A: dN_A, dN_B: dN_B, state_start: x0, state_end: x1 }
${leads}
    tau: 1e-8
    work: measured
checks: [exchange-fluctuation, integral-fluctuation, second-law, weighted-identity]
`,
      { "data/windows.csv": `${rows.join("\n")}\n` },
    );
    const statuses = async (dir: string) => (await runAudit(dir)).result.checks.map((c) => `${c.check}: ${c.status}`);
    const fromTrace = await statuses(traceDir);
    expect(fromTrace).toEqual(await statuses(samplesDir));
    expect(d.windows!.correlationWindows).toBeLessThan(1.5);
  }, 120000);
});
