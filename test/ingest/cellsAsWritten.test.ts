import fs from "node:fs";
import zlib from "node:zlib";
import { describe, expect, it } from "vitest";
import { parquetWriteFile } from "hyparquet-writer";
import type { SamplesReadOptions } from "../../src/ingest/samples.ts";
import { DataError } from "../../src/errors.ts";
import { PARTICLE_NUMBER_EXPECTED } from "../../src/ingest/wholeNumber.ts";
import { loadSamplesFile } from "../helpers/loadSamplesFile.ts";
import { rejectedWith } from "../helpers/thrown.ts";

/**
 * A message about a number in a data file quotes the cell as the file writes it, not the double
 * it was read as: 9007199254740993 has no double (IEEE 754 binary64 holds every whole number only
 * up to 2^53 = 9007199254740992, and …993 reads as …992), and 1.50 reads as 1.5. Text files are
 * quoted as written on every reading path; binary files give the stored number exactly.
 */

const KEYS = ["energy_unit: meV", "reservoirs: { A: { T: 1.3 }, B: { T: 1.0 } }", "work: zero"];
const COUNT = "expected a count (a whole number from 0 to 9007199254740991)";

async function messageOf(file: string, write: (target: string) => void, columns: string, options: SamplesReadOptions = {}, keys: string[] = []): Promise<string> {
  return (await rejectedWith(DataError, () => loadSamplesFile(file, write, [`columns: ${columns}`, ...keys, ...KEYS], options))).message;
}

const TEXT = "q,n,c\n0.12,1,1\n-0.05,9007199254740993,1\n0.31,1.50,1\n0.08,0,2.50\n0.1,-1,9007199254740993\n";
const TEXT_EXPECTED = [
  `data/runs.csv:3, column "n": ${PARTICLE_NUMBER_EXPECTED}, found "9007199254740993"`,
  `data/runs.csv:4, column "n": ${PARTICLE_NUMBER_EXPECTED}, found "1.50"`,
  `data/runs.csv:5, column "c": ${COUNT}, found "2.50"`,
  `data/runs.csv:6, column "c": ${COUNT}, found "9007199254740993"`,
].join("\n");

describe("numbers in messages are quoted as the text file writes them", () => {
  const paths: [string, SamplesReadOptions][] = [
    ["read whole", { reduceAboveBytes: Infinity }],
    ["summarised while read", { reduceAboveBytes: 0, threads: false }],
  ];
  for (const [name, options] of paths) {
    it(`quotes particle numbers and counts as written, ${name} (byte scanner)`, async () => {
      expect(await messageOf("runs.csv", (t) => fs.writeFileSync(t, TEXT), "{ Q: q, dN: n, count: c }", options)).toBe(TEXT_EXPECTED);
    });

    it(`quotes them as written when a quoted cell sends the file to the general reader, ${name}`, async () => {
      const text = TEXT.replace("0.12,1,1", '"0.12",1,1');
      expect(await messageOf("runs.csv", (t) => fs.writeFileSync(t, text), "{ Q: q, dN: n, count: c }", options)).toBe(TEXT_EXPECTED);
    });
  }

  it("quotes them as written in a gzip-compressed file with semicolons and decimal commas", async () => {
    const text = "q;n\n0,12;1\n-0,05;1,50\n0,31;9007199254740993\n";
    const message = await messageOf("runs.csv.gz", (t) => fs.writeFileSync(t, zlib.gzipSync(text)), "{ Q: q, dN: n }", {}, ["format: semicolon", "decimal: comma"]);
    expect(message).toBe(
      [`data/runs.csv.gz:3, column "n": ${PARTICLE_NUMBER_EXPECTED}, found "1,50"`, `data/runs.csv.gz:4, column "n": ${PARTICLE_NUMBER_EXPECTED}, found "9007199254740993"`].join("\n"),
    );
  });

  it("quotes them as written in a whitespace-separated table after a preamble and comments", async () => {
    const text = "instrument A7\nrun 12\n# Q n\nq   n\n0.12  1\n% pause\n-0.05  +1.0e0\n0.31  2.0000000000000001\n0.4   1.25e0\n";
    const message = await messageOf("runs.dat", (t) => fs.writeFileSync(t, text), "{ Q: q, dN: n }", {}, ["skip_lines: 2"]);
    // +1.0e0 is the whole number 1; 2.0000000000000001 reads as the double 2 (the nearest), a whole number too.
    expect(message).toBe(`data/runs.dat:9, column "n": ${PARTICLE_NUMBER_EXPECTED}, found "1.25e0"`);
  });
});

describe("numbers in messages about binary files are the stored values, exactly", () => {
  it("gives a Parquet DOUBLE and an INT64 at 2^53 as stored, and an INT64 beyond 2^53 as its decimal digits", async () => {
    const write = (t: string) =>
      parquetWriteFile({
        filename: t,
        columnData: [
          { name: "q", data: Float64Array.from([0.1, 0.2, 0.3]), type: "DOUBLE", nullable: false },
          { name: "n", data: Float64Array.from([1, 1.5, 9007199254740994]), type: "DOUBLE", nullable: false },
          { name: "c", data: BigInt64Array.from([1n, 9007199254740992n, 1n]), type: "INT64", nullable: false },
        ],
      });
    expect(await messageOf("runs.parquet", write, "{ Q: q, dN: n, count: c }")).toBe(
      [
        // Problems are listed column by column, as the checks find them.
        `data/runs.parquet, row 2, column "n": ${PARTICLE_NUMBER_EXPECTED}, found 1.5`,
        `data/runs.parquet, row 3, column "n": ${PARTICLE_NUMBER_EXPECTED}, found 9007199254740994`,
        `data/runs.parquet, row 2, column "c": ${COUNT}, found 9007199254740992`,
      ].join("\n"),
    );
    const beyond = (t: string) =>
      parquetWriteFile({
        filename: t,
        columnData: [
          { name: "q", data: Float64Array.from([0.1, 0.2]), type: "DOUBLE", nullable: false },
          { name: "n", data: BigInt64Array.from([1n, -9007199254740993n]), type: "INT64", nullable: false },
        ],
      });
    expect(await messageOf("runs.parquet", beyond, "{ Q: q, dN: n }")).toBe(
      'data/runs.parquet, row 2, column "n": expected an integer of magnitude at most 2^53 = 9007199254740992 (beyond it not every integer has an exact double), found -9007199254740993',
    );
  });
});
