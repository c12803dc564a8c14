import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import zlib from "node:zlib";
import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { parquetMetadata } from "hyparquet";
import { parquetWriteFile } from "hyparquet-writer";
import { parquetInfo, readParquetColumns, readParquetTable, type ParquetColumnBatch } from "../../src/ingest/parquet/index.ts";
import { planReads } from "../../src/ingest/parquet/planReads.ts";
import { readNumericCsv } from "../../src/ingest/readCsv.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { writeSamplesParquet } from "../helpers/writeSamplesParquet.ts";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-parquet-"));
let fileCount = 0;
function tempPath(ext = "parquet"): string {
  return path.join(dir, `f${++fileCount}.${ext}`);
}

/** Seeded normal deviates scaled to span many decades, for round-trip tests. */
function samples(seed: string, n: number): Float64Array {
  const rng = rngFromText(seed);
  return Float64Array.from({ length: n }, () => rng.normal() * 10 ** (rng.int(41) - 20));
}

/**
 * Bit-for-bit equality of two double arrays (so −0 differs from +0 and every NaN payload
 * counts): Parquet stores the IEEE 754 binary64 bytes as they are (Apache Parquet format,
 * PLAIN encoding of DOUBLE), so a round trip must give the very same bits.
 */
function expectSameDoubles(actual: Float64Array | undefined, expected: Float64Array): void {
  expect(actual, "column missing").toBeDefined();
  const a = new BigUint64Array(actual!.buffer, actual!.byteOffset, actual!.length);
  const e = new BigUint64Array(expected.buffer, expected.byteOffset, expected.length);
  expect(actual!.length).toBe(expected.length);
  const first = a.findIndex((bits, i) => bits !== e[i]);
  expect(first, first >= 0 ? `first difference at index ${first}: ${actual![first]} vs ${expected[first]}` : "").toBe(-1);
}

/** The footer of a file, parsed by hyparquet (a fresh ArrayBuffer: small Buffers share a pool). */
function footerOf(file: string) {
  const bytes = fs.readFileSync(file);
  return parquetMetadata(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
}

async function collect(file: string, columns: string[], batchRows?: number): Promise<ParquetColumnBatch[]> {
  const batches: ParquetColumnBatch[] = [];
  for await (const batch of readParquetColumns(file, "data/samples.parquet", columns, batchRows ? { batchRows } : {})) batches.push(batch);
  return batches;
}

function concatColumn(batches: ParquetColumnBatch[], column: string): Float64Array {
  const out = new Float64Array(batches.reduce((n, b) => n + b.rows, 0));
  let at = 0;
  for (const b of batches) {
    out.set(b.values.get(column)!, at);
    at += b.rows;
  }
  return out;
}

describe("readParquetTable", () => {
  it("reads back exactly the doubles written, edge values included, and digests the bytes", async () => {
    // Edge values of IEEE 754 binary64: signed zero, the smallest subnormal, the largest finite.
    const edges = [0, -0, 5e-324, -5e-324, 2.2250738585072014e-308, 1.7976931348623157e308, -1.7976931348623157e308, 0.1, 1 / 3];
    const Q = Float64Array.from([...edges, ...samples("parquet-Q", 491)]);
    const W = samples("parquet-W", 500);
    const dN = Float64Array.from({ length: 500 }, (_, i) => i - 250);
    const file = tempPath();
    writeSamplesParquet(file, { Q, W, dN }, { rowGroupRows: 128 });
    const table = await readParquetTable(file, "data/samples.parquet", ["dN", "Q", "W"]);
    expect(table.rows).toBe(500);
    expect([...table.columns.keys()]).toEqual(["dN", "Q", "W"]);
    expectSameDoubles(table.columns.get("Q"), Q);
    expectSameDoubles(table.columns.get("W"), W);
    expectSameDoubles(table.columns.get("dN"), dN);
    // SHA-256 of the file's bytes (FIPS 180-4), computed independently by node:crypto.
    expect(table.sha256).toBe(createHash("sha256").update(fs.readFileSync(file)).digest("hex"));
  });

  it("converts INT32, INT64 (BigInt) and FLOAT columns to doubles exactly", async () => {
    const i32 = Int32Array.from([-2147483648, -1, 0, 1, 2147483647]);
    // ±2^53 is the largest magnitude up to which every integer is a double (IEEE 754 binary64).
    const i64 = BigInt64Array.from([-(2n ** 53n), -7n, 0n, 123456789012345n, 2n ** 53n]);
    const f32 = Float32Array.from([0.1, -3.5, 1e-40, 3.4028234663852886e38, 0]);
    const file = tempPath();
    parquetWriteFile({
      filename: file,
      columnData: [
        { name: "i32", data: i32, type: "INT32", nullable: false },
        { name: "i64", data: i64, type: "INT64", nullable: false },
        { name: "f32", data: f32, type: "FLOAT", nullable: false },
      ],
    });
    const table = await readParquetTable(file, "data/samples.parquet", ["i32", "i64", "f32"]);
    expectSameDoubles(table.columns.get("i32"), Float64Array.from(i32));
    expectSameDoubles(table.columns.get("i64"), Float64Array.from([-9007199254740992, -7, 0, 123456789012345, 9007199254740992]));
    // A binary32 value widens to binary64 exactly (IEEE 754-2019 §5.4.2: widening is exact).
    expectSameDoubles(table.columns.get("f32"), Float64Array.from(f32));
  });

  it("reads a nullable (OPTIONAL) double column that holds no nulls", async () => {
    const values = samples("parquet-optional", 300);
    const file = tempPath();
    parquetWriteFile({ filename: file, columnData: [{ name: "Q", data: Array.from(values), type: "DOUBLE", nullable: true }] });
    expect(footerOf(file).schema[1].repetition_type).toBe("OPTIONAL");
    expectSameDoubles((await readParquetTable(file, "data/samples.parquet", ["Q"])).columns.get("Q"), values);
  });

  it("reads only the requested columns and leaves a text column alone", async () => {
    const Q = samples("parquet-mixed", 40);
    const file = tempPath();
    parquetWriteFile({
      filename: file,
      columnData: [
        { name: "note", data: Array.from({ length: 40 }, (_, i) => `run ${i}`), type: "STRING" },
        { name: "Q", data: Q, type: "DOUBLE", nullable: false },
      ],
    });
    const table = await readParquetTable(file, "data/samples.parquet", ["Q", "Q"]);
    expect([...table.columns.keys()]).toEqual(["Q"]);
    expectSameDoubles(table.columns.get("Q"), Q);
  });

  it("gives the same Float64Arrays as readNumericCsv on the same data written as CSV", async () => {
    const Q = samples("parquet-csv-Q", 2000);
    const W = samples("parquet-csv-W", 2000);
    const parquetFile = tempPath();
    writeSamplesParquet(parquetFile, { Q, W }, { rowGroupRows: 700 });
    // ECMAScript Number::toString gives the shortest decimal that reads back as the same
    // double (ECMA-262, Number::toString; common practice to rely on it for round trips).
    const csvFile = tempPath("csv");
    fs.writeFileSync(csvFile, `Q,W\n${Array.from(Q, (q, i) => `${String(q)},${String(W[i])}`).join("\n")}\n`);
    const fromCsv = await readNumericCsv(csvFile, "data/samples.csv", [
      { column: "Q", role: "Q" },
      { column: "W", role: "W" },
    ]);
    const fromParquet = await readParquetTable(parquetFile, "data/samples.parquet", ["Q", "W"]);
    expect(fromParquet.rows).toBe(fromCsv.rows);
    expectSameDoubles(fromParquet.columns.get("Q"), fromCsv.columns.get("Q")!);
    expectSameDoubles(fromParquet.columns.get("W"), fromCsv.columns.get("W")!);
  });
});

describe("compressed Parquet files", () => {
  const Q = samples("parquet-codec", 3000);
  // Compressors from node:zlib, independent of the decompressors that read them
  // (hyparquet-compressors): GZIP is RFC 1952, BROTLI is RFC 7932, as the Parquet
  // format's Compression.md specifies. SNAPPY is hyparquet-writer's own.
  const codecs = {
    UNCOMPRESSED: undefined,
    SNAPPY: undefined,
    GZIP: { GZIP: (input: Uint8Array) => new Uint8Array(zlib.gzipSync(input)) },
    BROTLI: { BROTLI: (input: Uint8Array) => new Uint8Array(zlib.brotliCompressSync(input)) },
  } as const;
  for (const [codec, compressors] of Object.entries(codecs)) {
    it(`reads a ${codec} file exactly`, async () => {
      const file = tempPath();
      // Repeated values so that compression has something to do.
      const repeated = Float64Array.from({ length: 3000 }, (_, i) => Q[i % 50]);
      writeSamplesParquet(file, { Q: repeated }, { rowGroupRows: 1000, codec: codec as keyof typeof codecs, compressors });
      const meta = footerOf(file);
      expect(meta.row_groups.map((g) => g.columns[0].meta_data?.codec)).toEqual([codec, codec, codec]);
      expectSameDoubles((await readParquetTable(file, "data/samples.parquet", ["Q"])).columns.get("Q"), repeated);
    });
  }

  it("reads a ZSTD file (committed fixture written with the zstd program)", async () => {
    // test/ingest/fixtures/parquet/makeZstdFixture.ts wrote 1000 values of i / 8 − 60
    // (exact in binary) in two row groups, compressed by the zstd command-line program.
    const file = path.join(import.meta.dirname, "fixtures", "parquet", "zstd-samples.parquet");
    const meta = footerOf(file);
    expect(meta.row_groups.map((g) => g.columns[0].meta_data?.codec)).toEqual(["ZSTD", "ZSTD"]);
    const table = await readParquetTable(file, "data/zstd-samples.parquet", ["x"]);
    expectSameDoubles(table.columns.get("x"), Float64Array.from({ length: 1000 }, (_, i) => i / 8 - 60));
  });
});

describe("readParquetColumns", () => {
  const n = 10_000;
  const Q = samples("parquet-stream-Q", n);
  const W = samples("parquet-stream-W", n);
  // Ten row groups of 1000 rows, one page each.
  const manyGroups = tempPath();
  writeSamplesParquet(manyGroups, { Q, W }, { rowGroupRows: 1000 });
  // Row groups of 4000 rows in pages of 4 KiB (512 doubles), with and without an
  // offset index (page locations), as large files written by other programs have.
  function paged(offsetIndex: boolean): string {
    const file = tempPath();
    parquetWriteFile({
      filename: file,
      rowGroupSize: 4000,
      pageSize: 4096,
      columnData: [
        { name: "Q", data: Q, type: "DOUBLE", nullable: false, offsetIndex },
        { name: "W", data: W, type: "DOUBLE", nullable: false, offsetIndex },
      ],
    });
    return file;
  }
  const indexed = paged(true);
  const unindexed = paged(false);

  it("writes the test files with the layouts intended", () => {
    const chunks = (file: string) => footerOf(file).row_groups.map((g) => g.columns.map((c) => c.offset_index_offset !== undefined));
    expect(footerOf(manyGroups).row_groups.map((g) => Number(g.num_rows))).toEqual(Array(10).fill(1000));
    expect(chunks(indexed)).toEqual(Array(3).fill([true, true]));
    expect(chunks(unindexed)).toEqual(Array(3).fill([false, false]));
  });

  it("streams a file in consecutive batches of at most batchRows that reassemble the columns", async () => {
    for (const file of [manyGroups, indexed, unindexed]) {
      for (const batchRows of [1000, 2500, 300, 97, n, 3 * n]) {
        const batches = await collect(file, ["W", "Q"], batchRows);
        let next = 0;
        for (const b of batches) {
          expect(b.firstRow).toBe(next);
          expect(b.rows).toBeGreaterThan(0);
          expect(b.rows).toBeLessThanOrEqual(batchRows);
          expect(b.values.get("Q")!.length).toBe(b.rows);
          expect(b.values.get("W")!.length).toBe(b.rows);
          next += b.rows;
        }
        expect(next).toBe(n);
        expectSameDoubles(concatColumn(batches, "Q"), Q);
        expectSameDoubles(concatColumn(batches, "W"), W);
      }
    }
  });

  it("gives the same values as readParquetTable", async () => {
    for (const file of [manyGroups, indexed, unindexed]) {
      const table = await readParquetTable(file, "data/samples.parquet", ["Q", "W"]);
      const batches = await collect(file, ["Q", "W"], 333);
      expectSameDoubles(concatColumn(batches, "Q"), table.columns.get("Q")!);
      expectSameDoubles(concatColumn(batches, "W"), table.columns.get("W")!);
    }
  });

  it("stops reading and closes the file when the consumer stops early", async () => {
    const openFiles = () => fs.readdirSync("/proc/self/fd").length;
    const before = openFiles();
    let seen = 0;
    for await (const batch of readParquetColumns(manyGroups, "data/samples.parquet", ["Q"], { batchRows: 1000 })) {
      seen += batch.rows;
      if (seen >= 2000) break;
    }
    expect(seen).toBe(2000);
    expect(openFiles()).toBe(before);
  });

  it("refuses a batch size that is not a positive integer, and closes the file it opened", async () => {
    const openFiles = () => fs.readdirSync("/proc/self/fd").length;
    const before = openFiles();
    await expect(collect(manyGroups, ["Q"], 0.5)).rejects.toThrow(new RangeError("batchRows must be a positive integer, got 0.5"));
    // A handle left to the garbage collector ends the process on Node 26 (ERR_INVALID_STATE).
    expect(openFiles()).toBe(before);
  });
});

describe("planReads", () => {
  const values = Float64Array.from({ length: 10 }, (_, i) => i);
  function metadataOf(rowGroupSize: number | number[], offsetIndex: boolean) {
    const file = tempPath();
    // Pages of 16 bytes (two doubles) so that a row group has several pages: hyparquet-writer
    // writes an offset index only then.
    parquetWriteFile({ filename: file, rowGroupSize, pageSize: 16, columnData: [{ name: "x", data: values, type: "DOUBLE", nullable: false, offsetIndex }] });
    return footerOf(file);
  }

  it("joins small row groups up to the batch size", () => {
    expect(planReads(metadataOf(2, true), ["x"], 5)).toEqual([
      { start: 0, end: 4 },
      { start: 4, end: 8 },
      { start: 8, end: 10 },
    ]);
  });

  it("slices a large row group through its offset index, and reads it whole without one", () => {
    expect(planReads(metadataOf([1, 9], true), ["x"], 4)).toEqual([
      { start: 0, end: 1 },
      { start: 1, end: 5 },
      { start: 5, end: 9 },
      { start: 9, end: 10 },
    ]);
    expect(planReads(metadataOf([1, 9], false), ["x"], 4)).toEqual([
      { start: 0, end: 1 },
      { start: 1, end: 10 },
    ]);
  });
});

describe("parquetInfo", () => {
  it("gives rows, columns in schema order and the SHA-256 without reading data pages", async () => {
    const file = tempPath();
    writeSamplesParquet(file, { W: samples("info-W", 77), Q: samples("info-Q", 77), dN: samples("info-dN", 77) }, { rowGroupRows: 10 });
    const info = await parquetInfo(file, "data/samples.parquet");
    expect(info).toEqual({
      rows: 77,
      columns: ["W", "Q", "dN"],
      // SHA-256 (FIPS 180-4) computed independently by node:crypto.
      sha256: createHash("sha256").update(fs.readFileSync(file)).digest("hex"),
    });
  });
});
