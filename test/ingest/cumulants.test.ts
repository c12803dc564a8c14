import { describe, expect, it } from "vitest";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { CumulantsDataset } from "../../src/ingest/types.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { tempAudit } from "../helpers/tempAudit.ts";

function audit(datasetYaml: string, csv: string): string {
  return tempAudit(
    `id: cumulants-test
title: Cumulants ingestion
authors: [{ name: "Test Author" }]
datasets:
  - id: curve
    kind: cumulants
    file: data/curve.csv
${datasetYaml}
`,
    { "data/curve.csv": csv },
  );
}

async function load(datasetYaml: string, csv: string): Promise<CumulantsDataset> {
  const a = await ingestAudit(audit(datasetYaml, csv));
  return a.datasets[0] as CumulantsDataset;
}

describe("loadCumulants", () => {
  it("reads tau, mean Q, mean dN and uncertainties, converts to SI and sorts by contact time", async () => {
    const d = await load(
      "    energy_unit: meV\n    time_unit: ns\n",
      "tau,Q,dN,u_Q,u_dN\n2,0.4,3,0.01,0.1\n1,0.2,1.5,0.01,0.1\n3,0.6,4.5,0.02,0.2\n",
    );
    const meV = 1e-3 * 1.602176634e-19; // e exact (SI 2019)
    expect(d.rows).toBe(3);
    [1e-9, 2e-9, 3e-9].forEach((t, i) => expectClose(d.tau[i], t, { rtol: 1e-15, source: "1 ns = 1e-9 s; rtol 1e-15, one rounding" }));
    const src = "unit conversion with the exact elementary charge (SI 2019); rtol 1e-15, one rounding";
    expectClose(d.Q![0], 0.2 * meV, { rtol: 1e-15, source: src });
    expectClose(d.Q![2], 0.6 * meV, { rtol: 1e-15, source: src });
    expectClose(d.u_Q![2], 0.02 * meV, { rtol: 1e-15, source: src });
    expect(Array.from(d.dN!)).toEqual([1.5, 3, 4.5]);
    expect(Array.from(d.u_dN!)).toEqual([0.1, 0.1, 0.2]);
  });

  it("maps roles to other headers and leaves absent channels null", async () => {
    const d = await load("    columns: { tau: t_ps, Q: heat_J }\n    time_unit: ps\n", "t_ps,heat_J\n10,1e-22\n20,2e-22\n");
    expect(Array.from(d.tau)).toEqual([10e-12, 20e-12]);
    expect(Array.from(d.Q!)).toEqual([1e-22, 2e-22]);
    expect(d.dN).toBeNull();
    expect(d.u_Q).toBeNull();
  });

  it("converts lattice time in units of ħ/J with the stated hopping energy", async () => {
    const d = await load("    energy_unit: meV\n    time_unit: hbar/J\n    hopping: 2\n", "tau,dN\n1,0.5\n4,2\n");
    // ħ = h/2π with h exact (SI 2019); one unit of time is ħ/(2 meV).
    const hbar = 6.62607015e-34 / (2 * Math.PI);
    expectClose(d.tau[1], (4 * hbar) / (2e-3 * 1.602176634e-19), { rtol: 1e-14, source: "ħ/J with exact SI constants; rtol 1e-14" });
  });

  it("refuses a non-positive contact time and a non-positive uncertainty, naming line and column", async () => {
    await expect(load("", "tau,Q,u_Q\n1,0.1,0.01\n-2,0.2,0.01\n3,0.3,0\n")).rejects.toThrow(
      'data/curve.csv:3, column "tau": expected a positive contact time, found -2\ndata/curve.csv:4, column "u_Q": expected a positive standard uncertainty, found 0',
    );
  });

  it("refuses a repeated contact time", async () => {
    await expect(load("", "tau,Q\n1,0.1\n2,0.2\n1,0.3\n")).rejects.toThrow(
      'data/curve.csv:4, column "tau": contact time 1 repeats line 2; give one row per contact time (average repeated runs first)',
    );
  });

  it("refuses a table with no mean-transfer column", async () => {
    await expect(load("", "tau,heat\n1,0.1\n")).rejects.toThrow(
      'data/curve.csv: no column for Q or dN; the header has "tau", "heat"; name a mean-transfer column Q or dN, or map one under datasets[0].columns',
    );
  });

  it("refuses ħ/J time without the hopping energy", async () => {
    await expect(load("    time_unit: hbar/J\n", "tau,Q\n1,0.1\n")).rejects.toThrow(
      "audit.yaml datasets[0].hopping: is required when time_unit is hbar/J; give the hopping energy J in J",
    );
  });

  it("refuses a mapped column that is missing from the file", async () => {
    await expect(load("    columns: { dN: electrons }\n", "tau,dN\n1,0.1\n")).rejects.toThrow(
      'data/curve.csv:1: no column "electrons" (needed for dN, the mean particles gained by B); the header has "tau", "dN"',
    );
  });

  it("refuses an unknown role and an unknown time unit in audit.yaml, naming line and key", async () => {
    await expect(load("    columns: { time: t }\n    time_unit: min\n", "tau,Q\n1,2\n")).rejects.toThrow(
      'audit.yaml:8 datasets[0].columns.time: is not a role; roles are tau, Q, dN, u_Q, u_dN, found "t"\naudit.yaml:9 datasets[0].time_unit: must be one of s, ms, us, µs, ns, ps, fs, hbar/J, found "min"',
    );
  });
});
