// The byte-level CSV path (src/ingest/fast) must give the reference reader's results exactly: the same
// doubles (IEEE 754 binary64, as ECMAScript's Number() converts decimal text: correctly rounded), the same
// line of every row, the same digest, and the same message for every problem. The reference reader is
// csv-parse with our cell rules (src/ingest/readCsv.ts); Number() is the outside reference for values.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { readNumericCsv, type ColumnRequest, type NumericTable } from "../../src/ingest/readCsv.ts";
import { scanFileRange } from "../../src/ingest/fast/scanRange.ts";
import { openSource } from "../../src/ingest/sources/index.ts";
import { readSourceTable } from "../../src/ingest/sources/readSourceTable.ts";
import type { FileLayoutSettings } from "../../src/ingest/sources/types.ts";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-fastcsv-"));
let counter = 0;
function tempCsv(content: string | Buffer): string {
  const file = path.join(dir, `t${counter++}.csv`);
  fs.writeFileSync(file, content);
  return file;
}

/** The sources' reader of text files (src/ingest/sources/text), as the ingesters call it. */
function readNumericTable(file: string, label: string, requests: ColumnRequest[], settings: FileLayoutSettings = {}): Promise<NumericTable> {
  return readSourceTable({ filePath: file, label, auditDir: dir, keyPath: "datasets[0]", columns: requests, settings }).then(
    ({ sha256, rows, columns, lineOfRow, headers }) => ({ sha256, rows, columns, lineOfRow, headers }),
  );
}

type Outcome = { table: NumericTable } | { error: string };

async function outcome(read: typeof readNumericCsv, file: string, requests: ColumnRequest[]): Promise<Outcome> {
  try {
    return { table: await read(file, "data/run.csv", requests) };
  } catch (err) {
    return { error: `${(err as Error).name}: ${(err as Error).message}` };
  }
}

/** Plain data of an outcome, with −0 kept apart from 0 (toEqual treats them as equal). */
function plain(o: Outcome): unknown {
  if ("error" in o) return o;
  const t = o.table;
  return {
    sha256: t.sha256,
    rows: t.rows,
    headers: t.headers,
    lines: Array.from(t.lineOfRow),
    columns: [...t.columns].map(([k, v]) => [k, Array.from(v, (x) => (Object.is(x, -0) ? "-0" : x))]),
  };
}

async function expectSameAsReference(content: string | Buffer, requests: ColumnRequest[], settings: FileLayoutSettings = {}): Promise<Outcome> {
  const file = tempCsv(content);
  const reference = await outcome(readNumericCsv, file, requests);
  const fast = await outcome((f, l, r) => readNumericTable(f, l, r, settings), file, requests);
  expect(plain(fast)).toEqual(plain(reference));
  return fast;
}

const QN: ColumnRequest[] = [
  { column: "q", role: "Q" },
  { column: "n", role: "dN" },
];

describe("fast numeric CSV path", () => {
  it("converts decimal text to the same doubles as Number(), including the edges of the exact fast path", async () => {
    // Edges of Clinger's fast path (PLDI 1990): 15/16/17 significant digits, 2^53 ± 1, exponents ±22/±23,
    // subnormal and overflowing literals, signed zero; each must equal Number(text) bit for bit.
    const cells = [
      "0", "-0", "+0.0", "1", "-1", "0.1", "0.3", "123456789012345", "1234567890123456", "12345678901234567",
      "9007199254740991", "9007199254740992", "9007199254740993", "9007199254740993e-5", "0.1e23", "1e22", "1e23",
      "1e-22", "1e-23", "4.9e-324", "2.2250738585072014e-308", "1.7976931348623157e308", "5.", ".5", "-.5e+3",
      "00012.50000", "3.14159265358979323846", "2.718281828459045", "1E5", "7e-0", "123.456e2",
    ];
    const content = `q,n\n${cells.map((c) => `${c},1`).join("\n")}\n`;
    const fast = await expectSameAsReference(content, QN);
    if ("error" in fast) throw new Error(fast.error);
    const q = fast.table.columns.get("q")!;
    cells.forEach((c, i) => expect(Object.is(q[i], Number(c)), `${c}`).toBe(true));
  });

  it("matches Number() on 400 000 printed doubles of every magnitude (exactness of the fast path, seeded)", async () => {
    // Outside reference: Number(String(x)) === x (ECMAScript Number::toString is shortest round-trip), and
    // toPrecision/toExponential texts that Number() converts; the fast path must agree on every one.
    const texts: string[] = [];
    let s = 0x9e3779b9;
    const next = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296);
    for (let i = 0; i < 100_000; i++) {
      const x = (next() - 0.5) * 10 ** Math.floor(next() * 60 - 30);
      texts.push(String(x), x.toPrecision(1 + Math.floor(next() * 17)), x.toExponential(Math.floor(next() * 16)), x.toFixed(Math.floor(next() * 12)));
    }
    const content = `q,n\n${texts.map((t) => `${t},0`).join("\n")}\n`;
    const file = tempCsv(content);
    const table = await readNumericTable(file, "data/run.csv", QN);
    const q = table.columns.get("q")!;
    let mismatches = 0;
    texts.forEach((t, i) => {
      if (!Object.is(q[i], Number(t))) mismatches++;
    });
    expect(mismatches).toBe(0);
  });

  it("accepts what the reference accepts, with the same lines: comments, blank lines, CRLF, a byte-order mark, spaces around cells", async () => {
    const content = "\uFEFF# run 7, cryostat B\r\nq , n,other\r\n\r\n 1.5 ,2,x\r\n# pause\r\n-0.25,\t-1 ,y\r\n3e2,4,z";
    const fast = await expectSameAsReference(content, QN);
    if ("error" in fast) throw new Error(fast.error);
    expect(Array.from(fast.table.lineOfRow)).toEqual([4, 6, 7]); // as a person counts lines, comments included
  });

  it("words bad cells exactly as the reference does, in file order, across blocks and with the cap of twenty", async () => {
    const rows: string[] = [];
    for (let i = 0; i < 200_000; i++) rows.push(i % 9001 === 5 ? "seven,1" : i % 7919 === 3 ? "1,2.5,," : `${i * 0.001},${i % 5}`);
    await expectSameAsReference(`q,n,w\n${rows.map((r) => (r.split(",").length === 2 ? `${r},0` : r.slice(0, -1))).join("\n")}\n`, QN);
    await expectSameAsReference("q,n\n1,2\nNaN,3\n4,\n5,Infinity\n6,1e999\n7,0x10\n8,1,5\n".replace("8,1,5\n", "8,1\n"), QN);
    await expectSameAsReference("q,n\n1,2\n3,4", [{ column: "q", role: "Q" }, { column: "missing", role: "dN" }]);
  });

  it("hands files outside the plain layout to the reference reader: quotes, ragged rows, lone CR, a BOM-less empty file", async () => {
    await expectSameAsReference('q,n\n"1.5",2\n"2,5",3\n', QN);
    await expectSameAsReference("q,n\n1,2\n3\n", QN);
    await expectSameAsReference("q,n\r1,2\r3,4\r", QN);
    await expectSameAsReference("", QN);
    await expectSameAsReference("q,n\n", QN);
    await expectSameAsReference("q;n\n1;2\n", QN, { format: "comma" }); // named comma-separated: refused as the reference refuses it
    await expectSameAsReference("q,n,q\n1,2,3\n", QN);
    await expectSameAsReference(Buffer.from([0x71, 0x2c, 0x6e, 0x0a, 0x31, 0x00, 0x2c, 0x32, 0x0a]), QN);
    await expectSameAsReference("  # indented\nq,n\n1,2\n   \n3,4\n", QN);
  });

  it("is the reference reader on random tables and random damage (property test, fast-check, fixed seed)", async () => {
    const cell = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
      fc.integer({ min: -1000, max: 1000 }).map(String),
      fc.double({ min: -1e6, max: 1e6, noNaN: true }).map((x) => x.toFixed(3)),
      fc.constantFrom("", " ", "NaN", "inf", "1,5", "1e", "--1", "0x1F", "1.2.3", '"3"', "\t7 ", "٣", "1e400"),
    );
    const line = fc.array(cell, { minLength: 1, maxLength: 4 }).map((cells) => cells.join(","));
    const extra = fc.constantFrom("", "# comment", "   ", "\r");
    const body = fc.array(fc.oneof({ weight: 8, arbitrary: line }, { weight: 1, arbitrary: extra }), { maxLength: 30 });
    const ending = fc.constantFrom("\n", "\r\n");
    await fc.assert(
      fc.asyncProperty(body, ending, fc.boolean(), async (lines, eol, finalEol) => {
        const content = `q,n,x\n${lines.join(eol)}${finalEol ? eol : ""}`;
        const file = tempCsv(content);
        const reference = await outcome(readNumericCsv, file, QN);
        const fast = await outcome((f, l, r) => readNumericTable(f, l, r), file, QN);
        expect(plain(fast)).toEqual(plain(reference));
      }),
      { numRuns: Number(process.env.FUZZ_RUNS ?? 300), seed: Number(process.env.FUZZ_SEED ?? 20261202) },
    );
  });

  it("digests the bytes it reads (SHA-256, FIPS 180-4, via node:crypto) even when the last line has no newline", async () => {
    const content = "q,n\n1,2\n3,4";
    const table = await readNumericTable(tempCsv(content), "data/run.csv", QN);
    expect(table.sha256).toBe(createHash("sha256").update(content).digest("hex"));
  });

  it("reads a range that starts mid-file at a line start, counting lines from the range's start", async () => {
    const content = "q,n\n1,2\n3,4\n5,6\n";
    const file = tempCsv(content);
    const opened = await openSource({ filePath: file, label: "data/run.csv", auditDir: dir, keyPath: "datasets[0]", columns: QN, settings: {} });
    const start = content.indexOf("3,4");
    const got: number[] = [];
    const plan = opened.byteRanges!;
    const state = scanFileRange(plan.fd, start, content.length, plan.layout, (chunk) => got.push(...chunk.values[0]));
    await opened.close();
    expect(got).toEqual([3, 5]);
    expect(state.line).toBe(2);
  });
});
