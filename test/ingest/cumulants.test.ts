import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { parquetWriteFile } from "hyparquet-writer";
import { DataError } from "../../src/errors.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { CumulantsDataset } from "../../src/ingest/types.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { rejectedWith } from "../helpers/thrown.ts";

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
      'data/curve.csv:3, column "tau": expected a positive contact time, found "-2"\ndata/curve.csv:4, column "u_Q": expected a positive standard uncertainty, found "0"',
    );
  });

  it("refuses a repeated contact time", async () => {
    await expect(load("", "tau,Q\n1,0.1\n2,0.2\n1,0.3\n")).rejects.toThrow(
      'data/curve.csv:4, column "tau": contact time "1" repeats line 2; give one row per contact time (average repeated runs first)',
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

/**
 * A message about a cell quotes it as the file writes it: `-1.50e-3` reads as the double -0.0015 and
 * `0.00100` as 0.001, and a message printing the double would show a number the user cannot find in
 * the file. The cells below are written with trailing zeros and exponents for that reason.
 */
describe("cumulants cells in messages, as written", () => {
  const refusal = async (datasetYaml: string, csv: string) => (await rejectedWith(DataError, () => load(datasetYaml, csv))).message;

  it("quotes a negative uncertainty and one whose square underflows as written", async () => {
    // 1.0e-170 squared is 1e-340, below the smallest normal double (2.2e-308) and every subnormal one: it cannot weight a fit.
    const csv = "tau,Q,u_Q,dN,u_dN\n1.0,0.1,-1.50e-3,1,0.1\n0.00100,0.2,0.0100,2,1.0e-170\n";
    expect(await refusal("", csv)).toBe(
      'data/curve.csv:2, column "u_Q": expected a positive standard uncertainty, found "-1.50e-3"\n' +
        'data/curve.csv:3, column "u_dN": standard uncertainty "1.0e-170" cannot weight the fit: its square in SI units is below the range of double precision',
    );
  });

  it("quotes a non-positive contact time and one that is 0 s once converted as written", async () => {
    expect(await refusal("", "tau,Q\n-0.00100,0.1\n2,0.2\n")).toBe('data/curve.csv:2, column "tau": expected a positive contact time, found "-0.00100"');
    // 1.0e-320 fs = 1e-335 s, below the smallest subnormal double (4.9e-324): 0 s.
    expect(await refusal("    time_unit: fs\n", "tau,Q\n1.0e-320,0.1\n2,0.2\n")).toBe(
      'data/curve.csv:2, column "tau": contact time "1.0e-320" fs is 0 s in double precision; give it in a larger time unit',
    );
  });

  it("quotes both cells of a mean transfer too large against its uncertainty", async () => {
    // In meV, Q² ≈ 2.6e276 J² is within double precision, but (1.0e160 / 0.0100)² = 1e324 is beyond the largest double (1.8e308).
    expect(await refusal("    energy_unit: meV\n", "tau,Q,u_Q\n1,0.1,0.01\n2,1.0e160,0.0100\n")).toBe(
      'data/curve.csv:3, column "Q": mean transfer "1.0e160" is 1.00e+162 times its standard uncertainty "0.0100", beyond what a weighted fit can square in double precision; check the value and its uncertainty',
    );
  });

  it("quotes both writings of a repeated contact time", async () => {
    expect(await refusal("", "tau,Q\n1.0,0.1\n2,0.2\n1.00,0.3\n")).toBe(
      'data/curve.csv:4, column "tau": contact time "1.00" repeats line 2 (written "1.0" there); give one row per contact time (average repeated runs first)',
    );
  });

  it("quotes the cell of a whitespace-separated file without a header, at its line and position", async () => {
    const dat = "# tau Q u_Q\n1.0  0.1  0.01\n2.0  0.2  -2.50E-2\n";
    const dir = tempAudit(
      "id: cumulants-test\ntitle: Cumulants ingestion\nauthors: [{ name: \"Test Author\" }]\ndatasets:\n  - id: curve\n    kind: cumulants\n    file: data/curve.dat\n    header: false\n    columns: { tau: 1, Q: 2, u_Q: 3 }\n",
      { "data/curve.dat": dat },
    );
    expect((await rejectedWith(DataError, () => ingestAudit(dir))).message).toBe('data/curve.dat:3, column "3": expected a positive standard uncertainty, found "-2.50E-2"');
  });

  const parquetAudit = (tau: number[], Q: number[], uQ: number[]) => {
    const dir = tempAudit("id: cumulants-test\ntitle: Cumulants ingestion\nauthors: [{ name: \"Test Author\" }]\ndatasets:\n  - id: curve\n    kind: cumulants\n    file: data/curve.parquet\n");
    fs.mkdirSync(path.join(dir, "data"));
    const column = (name: string, values: number[]) => ({ name, data: Float64Array.from(values), type: "DOUBLE" as const, nullable: false });
    parquetWriteFile({
      filename: path.join(dir, "data/curve.parquet"),
      columnData: [column("tau", tau), column("Q", Q), column("dN", tau), column("u_Q", uQ), column("u_dN", tau.map(() => 0.1))],
    });
    return dir;
  };

  it("reads a Parquet file without the optional columns exactly as the same table written as CSV", async () => {
    // Only tau and Q: no dN, no uncertainties. Every source reports absent optional columns as missing, not as an
    // error; the Parquet reader once required them ("no column \"dN\""). Same doubles, so the datasets are equal.
    const tau = [1, 2, 3, 4];
    const Q = [0.11, 0.19, 0.32, 0.41];
    const dir = tempAudit("id: cumulants-test\ntitle: Cumulants ingestion\nauthors: [{ name: \"Test Author\" }]\ndatasets:\n  - id: curve\n    kind: cumulants\n    file: data/curve.parquet\n");
    fs.mkdirSync(path.join(dir, "data"));
    parquetWriteFile({
      filename: path.join(dir, "data/curve.parquet"),
      columnData: [
        { name: "tau", data: Float64Array.from(tau), type: "DOUBLE", nullable: false },
        { name: "Q", data: Float64Array.from(Q), type: "DOUBLE", nullable: false },
      ],
    });
    const fromParquet = (await ingestAudit(dir)).datasets[0] as CumulantsDataset;
    const fromCsv = await load("", `tau,Q\n${tau.map((t, i) => `${t},${Q[i]}`).join("\n")}\n`);
    expect(fromParquet.kind).toBe("cumulants");
    for (const key of ["tau", "Q", "dN", "u_Q", "u_dN"] as const) expect(fromParquet[key]).toEqual(fromCsv[key]);
    expect(fromParquet.dN).toBeNull();
  });

  it("gives a Parquet cell, which has no text, as the double it stores, at its row", async () => {
    // The shortest decimal that reads back as the stored double (ECMA-262 Number::toString), unquoted; rows counted from 1.
    expect((await rejectedWith(DataError, () => ingestAudit(parquetAudit([1, 2], [0.1, 0.2], [-1.5e-3, 0.01])))).message).toBe(
      'data/curve.parquet, row 1, column "u_Q": expected a positive standard uncertainty, found -0.0015',
    );
    expect((await rejectedWith(DataError, () => ingestAudit(parquetAudit([0.001, 2, 0.001], [0.1, 0.2, 0.3], [0.01, 0.01, 0.01])))).message).toBe(
      'data/curve.parquet, row 3, column "tau": contact time 0.001 repeats row 1; give one row per contact time (average repeated runs first)',
    );
  });
});
