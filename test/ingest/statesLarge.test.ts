import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { loadSamples } from "../../src/ingest/samples.ts";
import { loadAuditDefinition } from "../../src/config/loadAudit.ts";
import type { SamplesDatasetConfig } from "../../src/config/types.ts";
import type { SamplesDataset } from "../../src/ingest/types.ts";
import type { SamplesReadOptions } from "../../src/ingest/reduce/samplesSource.ts";
import { runChecks } from "../../src/report/runAudit.ts";
import { synthDot } from "../../src/synth/index.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { expectClose } from "../helpers/expectClose.ts";

/**
 * Samples with the conductor's states (state_start, state_end, dN_A, dN_B) read three ways: one small file
 * kept row by row, the same file forced down the summarising path (reduceAboveBytes: 0; cells keyed by the
 * states and each lead's count as well), and the same rows split into parts. The windows come from `synth dot`
 * (single level 0.1 meV, Γ_A = Γ_B = 1/ns, μ_A = 0.05 meV, windows of 5 ns), one row per window, shuffled.
 */
const REDUCE: SamplesReadOptions = { reduceAboveBytes: 0, threads: false };
const EXACT: SamplesReadOptions = { reduceAboveBytes: Infinity };

function windowRows(): string[] {
  const histogram = synthDot({ samples: "20000", tau: "5", seed: "states large" }).files["data/dot.csv"].trim().split("\n");
  const header = histogram[0].split(",");
  const count = header.indexOf("count");
  const rows: string[] = [];
  for (const line of histogram.slice(1)) {
    const cells = line.split(",");
    const row = cells.filter((_, c) => c !== count).join(",");
    for (let k = 0; k < Number(cells[count]); k++) rows.push(row);
  }
  // A fixed shuffle (Fisher–Yates), so that parts hold mixed windows.
  const rng = rngFromText("states large shuffle");
  for (let i = rows.length - 1; i > 0; i--) {
    const j = Math.floor(rng.uniform() * (i + 1));
    [rows[i], rows[j]] = [rows[j], rows[i]];
  }
  return rows;
}

const HEADER = "dE_A,dE_B,dN_A,dN_B,state_start,state_end";

function yaml(file: string): string {
  return `id: states-three-ways
title: States read whole, summarised and in parts
authors: [{ name: "Test Author" }]
settings: { seed: 11 }
datasets:
  - id: dot
    kind: samples
    file: ${file}
    columns: { dE_A: dE_A, dE_B: dE_B, dN_A: dN_A, dN_B: dN_B, state_start: state_start, state_end: state_end }
    energy_unit: meV
    reservoirs: { A: { T: 1, mu: 0.05 }, B: { T: 1, mu: 0 } }
    tau: 5e-9
    work: measured
`;
}

async function load(dir: string, options: SamplesReadOptions): Promise<{ d: SamplesDataset; definition: ReturnType<typeof loadAuditDefinition> }> {
  const definition = loadAuditDefinition(dir);
  const config = definition.datasets[0] as SamplesDatasetConfig;
  return { d: await loadSamples(config, path.join(dir, config.file), "datasets[0]", { ...options, auditDir: dir }), definition };
}

function results(dir: string, definition: ReturnType<typeof loadAuditDefinition>, d: SamplesDataset) {
  return runChecks({ dir, definition, datasets: [d] });
}

describe("samples with conductor states, whole, summarised and in parts", () => {
  const rows = windowRows();
  const oneFile = tempAudit(yaml("data/windows.csv"), { "data/windows.csv": `${HEADER}\n${rows.join("\n")}\n` });
  const third = Math.ceil(rows.length / 3);
  const parts: Record<string, string> = {};
  for (let k = 0; k < 3; k++) parts[`data/windows/part-${k}.csv`] = `${HEADER}\n${rows.slice(k * third, (k + 1) * third).join("\n")}\n`;
  const inParts = tempAudit(yaml("data/windows"), parts);

  it("estimate the same stationary distribution p(x) from the start states, to the last bit", async () => {
    // p(x) = (windows starting in x)/(windows): sums of whole numbers, exact in any order (IEEE 754 below 2^53).
    const whole = (await load(oneFile, EXACT)).d;
    const summarised = (await load(oneFile, REDUCE)).d;
    const summarisedThreads = (await load(oneFile, { reduceAboveBytes: 0, threads: true })).d;
    const partsWhole = (await load(inParts, EXACT)).d;
    const partsSummarised = (await load(inParts, REDUCE)).d;
    expect(summarised.reduction).not.toBeNull();
    expect(partsSummarised.reduction).not.toBeNull();
    expect(partsWhole.reduction).toBeNull();
    for (const d of [summarised, summarisedThreads, partsWhole, partsSummarised]) {
      expect(d.realisations).toBe(20000);
      expect(d.states!.labels).toEqual(whole.states!.labels);
      expect(d.states!.probability).toEqual(whole.states!.probability);
      expect(d.states!.source).toBe("estimated");
    }
    // Count from the rows themselves (an independent tally): the fraction of windows starting empty.
    const startsEmpty = rows.filter((r) => r.split(",")[4] === "0").length;
    expect(whole.states!.probability[0]).toBe(startsEmpty / rows.length);
  }, 120_000);

  it("in parts kept row by row: the same arrays and every check's values to the last digit as one file", async () => {
    const a = await load(oneFile, EXACT);
    const b = await load(inParts, EXACT);
    // Rows concatenated in part order are the file's rows; p from all parts together; the same arithmetic.
    expect(Array.from(b.d.sigma)).toEqual(Array.from(a.d.sigma));
    expect(Array.from(b.d.leadParticles!.B)).toEqual(Array.from(a.d.leadParticles!.B));
    expect(Array.from(b.d.states!.start)).toEqual(Array.from(a.d.states!.start));
    // The seed is fixed in audit.yaml, so the bootstraps draw the same numbers although the digests differ.
    const strip = (r: ReturnType<typeof results>) => r.map((x) => ({ check: x.check, status: x.status, values: x.values }));
    expect(strip(results(inParts, b.definition, b.d))).toEqual(strip(results(oneFile, a.definition, a.d)));
  }, 120_000);

  it("summarised (one file or parts): the same verdict from every check, and the same point values to rounding", async () => {
    const whole = await load(oneFile, EXACT);
    const fromRows = results(oneFile, whole.definition, whole.d);
    for (const [dir, options] of [[oneFile, REDUCE], [inParts, REDUCE]] as const) {
      const s = await load(dir, options);
      // Cells hold only identical windows here (a single level: the counts and states fix the energies), so
      // pooling changes nothing but the order of additions.
      expect(s.d.reduction!.maxSigmaSpread).toBeLessThan(1e-12);
      const fromCells = results(dir, s.definition, s.d);
      expect(fromCells.map((r) => `${r.check}: ${r.status}`)).toEqual(fromRows.map((r) => `${r.check}: ${r.status}`));
      const value = (rs: typeof fromRows, check: string, key: string) => rs.find((r) => r.check === check)!.values[key] as number;
      // Means over 20 000 windows summed per cell instead of per row: the same numbers up to the rounding of
      // 2·10^4 additions (relative 1e-12 is ample; found about 1e-15).
      for (const [check, key] of [["integral-fluctuation", "mean"], ["second-law", "mean_sigma"], ["exchange-fluctuation", "slope"]] as const) {
        expectClose(value(fromCells, check, key), value(fromRows, check, key), { rtol: 1e-12, source: "the same realisations, summed per cell" });
      }
      // Intervals from moments (second-law's normal interval) agree as closely; bootstrap intervals do not: the
      // summary resamples cells by Poisson counts, which draws other random numbers than resampling rows, so
      // integral-fluctuation's and weighted-identity's intervals agree only to Monte Carlo precision (a few per
      // cent of their width) and are not compared here.
      const ci = (rs: typeof fromRows) => rs.find((r) => r.check === "second-law")!.values.ci as [number, number];
      for (const k of [0, 1]) expectClose(ci(fromCells)[k], ci(fromRows)[k], { rtol: 1e-12, source: "second-law's interval from the mean and variance of Σ" });
      // Σ_tot of every cell equals Σ_tot of each window in it: Σ_res is the windows' own (one value per cell)
      // and the boundary term is one number per pair of states, from the same p.
      const byKey = new Map<string, number>();
      whole.d.states!.start.forEach((x0, i) => byKey.set(`${whole.d.leadParticles!.A[i]},${whole.d.leadParticles!.B[i]},${x0},${whole.d.states!.end[i]}`, whole.d.sigma[i]));
      s.d.states!.start.forEach((x0, i) => {
        const key = `${s.d.leadParticles!.A[i]},${s.d.leadParticles!.B[i]},${x0},${s.d.states!.end[i]}`;
        expectClose(s.d.sigma[i], byKey.get(key)!, { atol: 1e-12, source: `Σ_tot of the windows with (dN_A, dN_B, x₀, x_τ) = (${key})` });
      });
    }
  }, 240_000);

  it("per-lead counts without states: summarised, the same totals of each lead's count and the same verdicts", async () => {
    const noStates = yaml("data/windows.csv").replace(", state_start: state_start, state_end: state_end", "");
    const dir = tempAudit(noStates, { "data/windows.csv": `${HEADER}\n${rows.join("\n")}\n` });
    const whole = await load(dir, EXACT);
    const summarised = await load(dir, REDUCE);
    expect(summarised.d.states).toBeNull();
    const total = (d: SamplesDataset, x: Float64Array) => x.reduce((a, v, i) => a + v * (d.weight ? d.weight[i] : 1), 0);
    // Whole counts keyed exactly: their totals are sums of whole numbers, exact in any order.
    expect(total(summarised.d, summarised.d.leadParticles!.A)).toBe(total(whole.d, whole.d.leadParticles!.A));
    expect(total(summarised.d, summarised.d.leadParticles!.B)).toBe(total(whole.d, whole.d.leadParticles!.B));
    const statusOf = (dirOf: string, x: Awaited<ReturnType<typeof load>>) => results(dirOf, x.definition, x.d).map((r) => `${r.check}: ${r.status}`);
    expect(statusOf(dir, summarised)).toEqual(statusOf(dir, whole));
  }, 120_000);
});
