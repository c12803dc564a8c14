import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { parquetWriteFile } from "hyparquet-writer";
import { DataError } from "../../src/errors.ts";
import { parquetInfo, readParquetColumns, readParquetTable } from "../../src/ingest/parquet/index.ts";
import { writeSamplesParquet } from "../helpers/writeSamplesParquet.ts";
import { rejectedWith } from "../helpers/thrown.ts";

const LABEL = "data/samples.parquet";
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-parquet-err-"));
let fileCount = 0;
function tempPath(): string {
  return path.join(dir, `f${++fileCount}.parquet`);
}

type Columns = Parameters<typeof parquetWriteFile>[0]["columnData"];
function writeColumns(columnData: Columns, rowGroupSize?: number): string {
  const file = tempPath();
  parquetWriteFile({ filename: file, columnData, ...(rowGroupSize ? { rowGroupSize } : {}) });
  return file;
}

/** The message of the DataError that `run` must throw. */
async function dataErrorOf(run: () => Promise<unknown>): Promise<string> {
  return (await rejectedWith(DataError, run)).message;
}

const table = (file: string, columns: string[]) => () => readParquetTable(file, LABEL, columns);

describe("Parquet column checks", () => {
  const file = writeColumns([
    { name: "heat_J", data: Float64Array.from([1, 2, 3]), type: "DOUBLE", nullable: false },
    { name: "label", data: ["a", "b", "c"], type: "STRING" },
    { name: "ok", data: [true, false, true], type: "BOOLEAN" },
    { name: "when", data: [new Date(0), new Date(1), new Date(2)], type: "TIMESTAMP" },
    { name: "raw", data: [Uint8Array.of(1), Uint8Array.of(2), Uint8Array.of(3)], type: "BYTE_ARRAY" },
  ]);

  it("names the columns that exist and the nearest one when a requested column is missing", async () => {
    expect(await dataErrorOf(table(file, ["heat_j", "work_J"]))).toBe(
      [
        'data/samples.parquet: no column "heat_j"; did you mean "heat_J"?; the file has columns "heat_J", "label", "ok", "when", "raw"',
        'data/samples.parquet: no column "work_J"; the file has columns "heat_J", "label", "ok", "when", "raw"',
      ].join("\n"),
    );
  });

  it("refuses text, boolean, timestamp and binary columns, naming each column and its type", async () => {
    // hyparquet-writer marks text and timestamps with the (older) converted types UTF8 and
    // TIMESTAMP_MILLIS; the message names the annotation the file carries.
    expect(await dataErrorOf(table(file, ["heat_J", "label", "ok", "when", "raw"]))).toBe(
      [
        'data/samples.parquet, column "label": expected numbers (a DOUBLE, FLOAT, INT32 or INT64 column), found BYTE_ARRAY (UTF8)',
        'data/samples.parquet, column "ok": expected numbers (a DOUBLE, FLOAT, INT32 or INT64 column), found BOOLEAN',
        'data/samples.parquet, column "when": expected numbers (a DOUBLE, FLOAT, INT32 or INT64 column), found INT64 (TIMESTAMP_MILLIS)',
        'data/samples.parquet, column "raw": expected numbers (a DOUBLE, FLOAT, INT32 or INT64 column), found BYTE_ARRAY',
      ].join("\n"),
    );
  });

  it("refuses nested columns (a group, a list) and reads a plain column beside them", async () => {
    const nested = tempPath();
    // Apache Parquet LogicalTypes.md, "Lists": an annotated group holding a repeated group
    // holding the element; "pos" is a plain group (a struct) of two doubles.
    parquetWriteFile({
      filename: nested,
      schema: [
        { name: "root", num_children: 3 },
        { name: "Q", type: "DOUBLE", repetition_type: "REQUIRED" },
        { name: "pos", num_children: 2, repetition_type: "REQUIRED" },
        { name: "x", type: "DOUBLE", repetition_type: "REQUIRED" },
        { name: "y", type: "DOUBLE", repetition_type: "REQUIRED" },
        { name: "hist", num_children: 1, repetition_type: "OPTIONAL", converted_type: "LIST" },
        { name: "list", num_children: 1, repetition_type: "REPEATED" },
        { name: "element", type: "DOUBLE", repetition_type: "REQUIRED" },
      ],
      columnData: [
        { name: "Q", data: Float64Array.from([1.5, -2]) },
        { name: "pos", data: [{ x: 1, y: 2 }, { x: 3, y: 4 }] },
        { name: "hist", data: [[1, 2], [3]] },
      ],
    });
    expect(await dataErrorOf(table(nested, ["Q", "pos", "hist"]))).toBe(
      [
        'data/samples.parquet, column "pos": expected numbers (a DOUBLE, FLOAT, INT32 or INT64 column), found a nested column (a group of 2 field(s))',
        'data/samples.parquet, column "hist": expected numbers (a DOUBLE, FLOAT, INT32 or INT64 column), found a nested column (LIST)',
      ].join("\n"),
    );
    expect(Array.from((await readParquetTable(nested, LABEL, ["Q"])).columns.get("Q")!)).toEqual([1.5, -2]);
  });

  it("checks the columns before yielding any batch when streaming", async () => {
    const batches: number[] = [];
    const message = await dataErrorOf(async () => {
      for await (const batch of readParquetColumns(file, LABEL, ["heat_J", "ok"])) batches.push(batch.rows);
    });
    expect(message).toBe('data/samples.parquet, column "ok": expected numbers (a DOUBLE, FLOAT, INT32 or INT64 column), found BOOLEAN');
    expect(batches).toEqual([]);
  });
});

describe("Parquet cell checks", () => {
  it("refuses an INT64 beyond 2^53, naming row and column, and accepts ±2^53", async () => {
    // 2^53 = 9007199254740992 is the largest magnitude up to which every integer is an
    // exact binary64 double (IEEE 754: 53-bit significand); 2^53 + 1 is not representable.
    const file = writeColumns([{ name: "n", data: BigInt64Array.from([2n ** 53n, -(2n ** 53n), 2n ** 53n + 1n, -(2n ** 63n)]), type: "INT64", nullable: false }]);
    expect(await dataErrorOf(table(file, ["n"]))).toBe(
      [
        'data/samples.parquet, row 3, column "n": expected an integer of magnitude at most 2^53 = 9007199254740992 (beyond it not every integer has an exact double), found 9007199254740993',
        'data/samples.parquet, row 4, column "n": expected an integer of magnitude at most 2^53 = 9007199254740992 (beyond it not every integer has an exact double), found -9223372036854775808',
      ].join("\n"),
    );
  });

  it("refuses NaN and ±Infinity, naming row and column, in row order across columns", async () => {
    const file = writeColumns([
      { name: "Q", data: Float64Array.from([0, NaN, 2, 3, -Infinity]), type: "DOUBLE", nullable: false },
      { name: "W", data: Float32Array.from([0, 1, Infinity, 3, NaN]), type: "FLOAT", nullable: false },
    ]);
    expect(await dataErrorOf(table(file, ["W", "Q"]))).toBe(
      [
        'data/samples.parquet, row 2, column "Q": expected a finite number, found NaN',
        'data/samples.parquet, row 3, column "W": expected a finite number, found Infinity',
        'data/samples.parquet, row 5, column "W": expected a finite number, found NaN',
        'data/samples.parquet, row 5, column "Q": expected a finite number, found -Infinity',
      ].join("\n"),
    );
  });

  it("refuses null values, naming the first 20 and counting the rest", async () => {
    // 25 nulls in rows 3, 7, 11, … (every fourth row from the third), spread over row groups of 10.
    const data = Array.from({ length: 100 }, (_, i) => (i % 4 === 2 ? null : i));
    const file = writeColumns([{ name: "Q", data, type: "DOUBLE", nullable: true }], 10);
    const expected = Array.from({ length: 20 }, (_, k) => `data/samples.parquet, row ${3 + 4 * k}, column "Q": expected a number, found a missing (null) value`);
    expected.push("… and 5 more problem(s) in data/samples.parquet");
    expect(await dataErrorOf(table(file, ["Q"]))).toBe(expected.join("\n"));
  });

  it("yields the batches before the first bad cell, then reports every bad cell of the file", async () => {
    const values = Float64Array.from({ length: 3000 }, (_, i) => i);
    values[2500] = NaN;
    values[2999] = Infinity;
    const file = tempPath();
    writeSamplesParquet(file, { Q: values }, { rowGroupRows: 1000 });
    const firstRows: number[] = [];
    const message = await dataErrorOf(async () => {
      for await (const batch of readParquetColumns(file, LABEL, ["Q"], { batchRows: 500 })) firstRows.push(batch.firstRow);
    });
    expect(firstRows).toEqual([0, 500, 1000, 1500]);
    expect(message).toBe(
      [
        'data/samples.parquet, row 2501, column "Q": expected a finite number, found NaN',
        'data/samples.parquet, row 3000, column "Q": expected a finite number, found Infinity',
      ].join("\n"),
    );
  });
});

describe("Parquet file checks", () => {
  const good = tempPath();
  writeSamplesParquet(good, { Q: Float64Array.from({ length: 200 }, (_, i) => i / 7) });
  const bytes = fs.readFileSync(good);

  function withBytes(content: Uint8Array | string): string {
    const file = tempPath();
    fs.writeFileSync(file, content);
    return file;
  }

  it("refuses a file that does not exist", async () => {
    expect(await dataErrorOf(() => parquetInfo(path.join(dir, "absent.parquet"), LABEL))).toBe("data/samples.parquet: cannot read the file (does it exist?)");
  });

  it("refuses an empty file", async () => {
    expect(await dataErrorOf(() => parquetInfo(withBytes(""), LABEL))).toBe("data/samples.parquet: the file is empty (0 bytes); expected a Parquet file");
  });

  it("refuses a file that is not Parquet (a CSV file)", async () => {
    expect(await dataErrorOf(() => parquetInfo(withBytes("Q,W\n1,2\n"), LABEL))).toBe(
      'data/samples.parquet: not a Parquet file (it does not start with the 4-byte marker "PAR1")',
    );
  });

  it("refuses a truncated file", async () => {
    const half = Math.floor(bytes.length / 2);
    const cut = withBytes(bytes.subarray(0, half));
    expect(await dataErrorOf(() => parquetInfo(cut, LABEL))).toBe(
      `data/samples.parquet: the Parquet file is truncated: it starts with "PAR1" but does not end with the footer marker "PAR1" (${half} bytes); expected a complete file (was it copied while still being written?)`,
    );
    expect(await dataErrorOf(table(withBytes(bytes.subarray(0, 6)), ["Q"]))).toBe(
      'data/samples.parquet: the Parquet file is truncated: it starts with "PAR1" but does not end with the footer marker "PAR1" (6 bytes); expected a complete file (was it copied while still being written?)',
    );
  });

  it("refuses a file whose footer length points outside the file", async () => {
    const damaged = Buffer.from(bytes);
    // The 4 bytes before the final "PAR1" hold the footer length, little-endian (Parquet format spec).
    damaged.writeUInt32LE(1_000_000, damaged.length - 8);
    expect(await dataErrorOf(() => parquetInfo(withBytes(damaged), LABEL))).toBe(
      `data/samples.parquet: the Parquet file is damaged: its footer claims 1000000 bytes of metadata but the file has only ${bytes.length} bytes`,
    );
  });

  it("refuses a file whose footer or data pages cannot be decoded", async () => {
    // The parenthesised reason is hyparquet's own wording (version pinned in package-lock.json).
    const footerBytes = bytes.readUInt32LE(bytes.length - 8);
    const badFooter = Buffer.from(bytes);
    badFooter.fill(0xff, bytes.length - 8 - footerBytes, bytes.length - 8);
    expect(await dataErrorOf(() => parquetInfo(withBytes(badFooter), LABEL))).toBe(
      "data/samples.parquet: the Parquet footer cannot be decoded (thrift unhandled type: 15); the file is damaged or was written by a program this reader does not understand",
    );
    const badPage = Buffer.from(bytes);
    badPage.fill(0xff, 4, 60); // the first data page's header starts right after "PAR1"
    expect(await dataErrorOf(table(withBytes(badPage), ["Q"]))).toBe(
      "data/samples.parquet: cannot decode rows 1–200 of the Parquet file (thrift unhandled type: 15); the file may be damaged",
    );
  });

  it("refuses a file without rows", async () => {
    const empty = writeColumns([{ name: "Q", data: new Float64Array(0), type: "DOUBLE", nullable: false }]);
    expect(await dataErrorOf(() => parquetInfo(empty, LABEL))).toBe("data/samples.parquet: the file has no rows; expected at least one row of samples");
    expect(await dataErrorOf(table(empty, ["Q"]))).toBe("data/samples.parquet: the file has no rows; expected at least one row of samples");
  });
});
