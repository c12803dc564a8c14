// Coefficient and cumulant tables without a header row: `header: false` and every column by its 1-based
// position, as samples datasets already allow. The files are written by NumPy's savetxt
// (scripts/fixtures/write_formats.py): the same table once with a header (by name) and once without one,
// whitespace- or tab-separated and for coefficients in another column order. Every value is a multiple of
// 1/64, so savetxt's "%.17g" text is exact and both readings must give the same doubles.
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { ConfigError, DataError } from "../../src/errors.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { CoefficientsDataset, CumulantsDataset } from "../../src/ingest/types.ts";
import { rejectedWith } from "../helpers/thrown.ts";
import { tempAudit } from "../helpers/tempAudit.ts";

const FIXTURES = path.resolve("test/ingest/fixtures/formats");

/** An audit of one dataset (its YAML lines after `file:`) over a copy of a fixture (or the given text). */
async function ingestOne<T>(kind: string, file: string, keys: string, text?: string): Promise<T> {
  const dir = tempAudit(
    `id: positions
title: Columns by position
authors: [{ name: "Test Author" }]
datasets:
  - id: table
    kind: ${kind}
    file: data/${file}
${keys}
`,
    { [`data/${file}`]: text ?? fs.readFileSync(path.join(FIXTURES, file), "utf8") },
  );
  return (await ingestAudit(dir)).datasets[0] as T;
}

const THERMO_UNITS = "    form: thermoelectric\n    units: { G: uS, S: uV/K, K: pW/K }";
const BY_NAME = `${THERMO_UNITS}\n    temperature: { column: T }\n    field: { column: B }\n    point: [Vg]`;
// thermo-no-header.dat holds G S K T B Vg (savetxt of the columns in that order).
const BY_POSITION = `${THERMO_UNITS}\n    header: false\n    columns: { G: 1, S: 2, K: 3 }\n    temperature: { column: 4 }\n    field: { column: 5 }\n    point: [6]`;

describe("coefficients by position", () => {
  it("read a headerless whitespace table as the same table with a header reads by name", async () => {
    const named = await ingestOne<CoefficientsDataset>("coefficients", "thermo.csv", BY_NAME);
    const placed = await ingestOne<CoefficientsDataset>("coefficients", "thermo-no-header.dat", BY_POSITION);
    expect(placed.rows).toBe(6);
    expect(placed.points.map((p) => ({ ...p, point: Object.values(p.point), row: p.row + 1 }))).toEqual(named.points.map((p) => ({ ...p, point: Object.values(p.point) })));
    expect(placed.pairs).toEqual(named.pairs);
    // An anchor outside the project: the first row as savetxt wrote it, G = 1.796875 µS (exact binary fraction).
    expect(placed.points[0].inputs.values[0]).toBe(1.796875e-6);
    expect(placed.points[0].point).toEqual({ 6: -0.5 });
  });

  it("refuse every column still given by name in a file without a header, naming each key", async () => {
    const keys = `${THERMO_UNITS}\n    header: false\n    columns: { G: 1, S: 2 }\n    temperature: { column: T }\n    point: [6]`;
    const err = await rejectedWith(ConfigError, () => ingestOne("coefficients", "thermo-no-header.dat", keys));
    expect(err.message).toBe(
      [
        'audit.yaml datasets[0].columns.K: the file has no header row (header: false), so columns are given by 1-based position, e.g. columns: { K: 4 }; found "K"',
        'audit.yaml datasets[0].temperature.column: the file has no header row (header: false), so columns are given by 1-based position, e.g. temperature: { column: 1 }; found "T"',
      ].join("\n"),
    );
  });

  it("name a position beyond the row, and a bad cell by line and position", async () => {
    const beyond = BY_POSITION.replace("point: [6]", "point: [7]");
    expect((await rejectedWith(DataError, () => ingestOne("coefficients", "thermo-no-header.dat", beyond))).message).toBe(
      "data/thermo-no-header.dat:1: no column 7 (needed for an operating-point coordinate): the first row has 6 cell(s)",
    );
    const text = "1.5  0.25  2  0.25  -1  0\n1.5  x  2  0.25  1  0\n";
    expect((await rejectedWith(DataError, () => ingestOne("coefficients", "thermo-no-header.dat", BY_POSITION, text))).message).toBe(
      'data/thermo-no-header.dat:2, column "2": expected a number, found "x"',
    );
  });
});

describe("cumulants by position", () => {
  it("read a headerless tab-separated table as the same table with a header reads by name", async () => {
    const named = await ingestOne<CumulantsDataset>("cumulants", "cumulants.csv", "    energy_unit: meV\n    time_unit: ns");
    const placed = await ingestOne<CumulantsDataset>("cumulants", "cumulants-no-header.dat", "    energy_unit: meV\n    time_unit: ns\n    header: false\n    columns: { tau: 1, Q: 2, dN: 3, u_Q: 4, u_dN: 5 }");
    for (const key of ["tau", "Q", "dN", "u_Q", "u_dN"] as const) expect(placed[key]).toEqual(named[key]);
    expect(placed.rows).toBe(6);
    // savetxt's third row: tau = 3 ns (3 × 1e-9 in doubles, one rounding), dN = 1.5.
    expect(placed.tau[2]).toBe(3 * 1e-9);
    expect(placed.dN![2]).toBe(1.5);
  });

  it("leave unmapped optional columns absent, and refuse a table with neither Q nor dN mapped", async () => {
    const placed = await ingestOne<CumulantsDataset>("cumulants", "cumulants-no-header.dat", "    time_unit: ns\n    header: false\n    columns: { tau: 1, dN: 3 }");
    expect(placed.Q).toBeNull();
    expect(placed.u_dN).toBeNull();
    expect(Array.from(placed.dN!)).toEqual([0.5, 1, 1.5, 2, 2.5, 3]);
    expect((await rejectedWith(ConfigError, () => ingestOne("cumulants", "cumulants-no-header.dat", "    header: false\n    columns: { tau: 1 }"))).message).toBe(
      "audit.yaml datasets[0].columns: the file has no header row (header: false), so map Q or dN (or both) to their 1-based positions, e.g. columns: { tau: 1, Q: 2 }",
    );
    expect((await rejectedWith(ConfigError, () => ingestOne("cumulants", "cumulants-no-header.dat", "    header: false\n    columns: { Q: 2 }"))).message).toBe(
      'audit.yaml datasets[0].columns.tau: the file has no header row (header: false), so columns are given by 1-based position, e.g. columns: { tau: 1 }; found "tau"',
    );
  });
});
