import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import zlib from "node:zlib";
import { afterAll, describe, expect, it } from "vitest";
import { readParquetColumns, readParquetTable } from "../../src/ingest/parquet/index.ts";
import { PageChecksumMismatch } from "../../src/ingest/parquet/pageChecksums.ts";
import { crc32 } from "../../src/ingest/sources/crc32.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { rejectedWith } from "../helpers/thrown.ts";
import { writeChecksummedParquet, type WrittenPage } from "../helpers/writeChecksummedParquet.ts";

/**
 * Page CRCs (Apache Parquet format specification, PageHeader.crc): a writer may record the
 * CRC-32 of each page's bytes as written (compressed, header excluded); a reader that finds
 * one must refuse a page whose bytes do not match it. hyparquet-writer, our only writer
 * here, records none, so test/helpers/writeChecksummedParquet.ts lays out pages with CRCs
 * computed by a table-driven CRC-32 that is not the one the reader uses (node:zlib's).
 */

const LABEL = "data/samples.parquet";
const work = fs.mkdtempSync(path.join(os.tmpdir(), "ta-parquet-crc-"));
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

const ROWS = 1000;
const Q = Float64Array.from({ length: ROWS }, (_, i) => (i % 17) * 0.25 - 2);
const N = Float64Array.from({ length: ROWS }, (_, i) => (i % 5) - 2);

/** A checksummed file: row groups of 400 rows, pages of 64 rows (7 data pages per chunk). */
function checksummedFile(name: string, offsetIndex: boolean): { file: string; pages: WrittenPage[] } {
  const file = path.join(work, name);
  const pages = writeChecksummedParquet(file, { Q, dN: N }, { rowGroupRows: 400, pageRows: 64, offsetIndex });
  return { file, pages };
}

/** Flip the high bits of the exponent byte of the first double of a page: 1.75 becomes about 3e-308, -2 about 1e308. */
function damage(file: string, page: WrittenPage): void {
  const bytes = fs.readFileSync(file);
  bytes[page.dataStart + 7] ^= 0x7f;
  fs.writeFileSync(file, bytes);
}

function pageOf(pages: WrittenPage[], rowGroup: number, column: string, page: number): WrittenPage {
  return pages.find((p) => p.rowGroup === rowGroup && p.column === column && p.page === page)!;
}

async function readAll(file: string, batchRows?: number): Promise<Map<string, number[]>> {
  const out = new Map<string, number[]>([["Q", []], ["dN", []]]);
  for await (const batch of readParquetColumns(file, LABEL, ["Q", "dN"], batchRows ? { batchRows } : {})) {
    for (const [column, values] of batch.values) out.get(column)!.push(...values);
  }
  return out;
}

describe("the CRC-32 that Parquet pages record", () => {
  it("is CRC-32/ISO-HDLC: node:zlib's crc32 gives the check value 0xCBF43926 for the ASCII digits 1–9", () => {
    // The catalogue of parametrised CRC algorithms (Greg Cook, "CRC RevEng"), entry CRC-32/ISO-HDLC
    // (the CRC of gzip, zip and PNG): check = 0xCBF43926, the CRC of "123456789" (from memory; the
    // same value is printed in ITU-T V.42 implementations and in RFC 1952's sample code's tests).
    expect(zlib.crc32(Buffer.from("123456789", "ascii"))).toBe(0xcbf43926);
    expect(crc32(new TextEncoder().encode("123456789"))).toBe(0xcbf43926);
  });

  it("agrees between node:zlib and the table-driven CRC-32 on 200 random byte strings of 0–3000 bytes", () => {
    const rng = rngFromText("page crc");
    for (let k = 0; k < 200; k++) {
      const bytes = Uint8Array.from({ length: rng.int(3001) }, () => rng.int(256));
      expect(zlib.crc32(bytes)).toBe(crc32(bytes));
    }
  });
});

describe("Parquet page checksums", () => {
  it("reads a file whose every page carries a correct CRC, whole chunks and page-index slices alike", async () => {
    for (const offsetIndex of [false, true]) {
      const { file } = checksummedFile(`good-${offsetIndex}.parquet`, offsetIndex);
      for (const batchRows of [undefined, 100]) {
        const read = await readAll(file, batchRows);
        expect(read.get("Q")).toEqual(Array.from(Q));
        expect(read.get("dN")).toEqual(Array.from(N));
      }
    }
  });

  it("refuses a damaged page read with its whole column chunk, naming file, row group, column and page", async () => {
    const { file, pages } = checksummedFile("damaged-chunk.parquet", false);
    const page = pageOf(pages, 1, "dN", 2); // row group 2, the third data page of "dN"
    damage(file, page);
    const err = await rejectedWith(PageChecksumMismatch, () => readParquetTable(file, LABEL, ["Q", "dN"]));
    // The recorded CRC is that of the page as written; the actual one that of the damaged bytes.
    const bytes = fs.readFileSync(file);
    const actual = crc32(bytes.subarray(page.dataStart, page.dataEnd));
    bytes[page.dataStart + 7] ^= 0x7f; // undone: the page as written
    const recorded = crc32(bytes.subarray(page.dataStart, page.dataEnd));
    const hex = (v: number) => `0x${v.toString(16).toUpperCase().padStart(8, "0")}`;
    expect(err.message).toBe(
      `data/samples.parquet: row group 2, column "dN", data page 3 (file bytes ${page.dataStart}–${page.dataEnd}): the page's CRC-32 is ${hex(actual)} but its header records ${hex(recorded)}; the file is damaged (its bytes changed after it was written), so none of its values can be trusted`,
    );
  });

  it("refuses a damaged page that a batched read fetches through the offset index, numbering it as the index does", async () => {
    const { file, pages } = checksummedFile("damaged-slice.parquet", true);
    // Batches of 100 rows: the row group's pages are fetched a few at a time, the damaged
    // sixth page (rows 321–384 of the file) on its own from its offset in the index.
    damage(file, pageOf(pages, 0, "Q", 5));
    const err = await rejectedWith(PageChecksumMismatch, () => readAll(file, 100));
    expect(err.message).toMatch(/^data\/samples\.parquet: row group 1, column "Q", data page 6 \(file bytes \d+–\d+\): the page's CRC-32 is 0x[0-9A-F]{8} but its header records 0x[0-9A-F]{8}; /);
  });

  it("reads a file without page CRCs (hyparquet-writer's) as before: nothing to check", async () => {
    // hyparquet-writer 0.17 leaves PageHeader.crc unset (src/datapage.js writes header.crc only
    // when given, and its page writers never give one); such files are read unchecked.
    const { writeSamplesParquet } = await import("../helpers/writeSamplesParquet.ts");
    const file = path.join(work, "plain.parquet");
    writeSamplesParquet(file, { Q, dN: N });
    expect((await readAll(file)).get("Q")).toEqual(Array.from(Q));
  });
});
