// Delimited text of every common shape, plain and compressed, read through the sources
// (src/ingest/sources): the same numbers whatever the shape, and whole messages naming file, line and
// column when the input is wrong. Compressed files are written by the gzip and zstd programs (Debian's
// gzip and zstd packages), independent writers whose output carries their own check values (gzip CRC-32,
// RFC 1952; Zstandard XXH64 content checksums, RFC 8878).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { execFileSync } from "node:child_process";
import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { ConfigError, DataError } from "../../src/errors.ts";
import { readSourceTable } from "../../src/ingest/sources/readSourceTable.ts";
import { openSource } from "../../src/ingest/sources/index.ts";
import { scanFileRange } from "../../src/ingest/fast/scanRange.ts";
import type { ColumnWant, FileLayoutSettings } from "../../src/ingest/sources/types.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { Xxh64 } from "../../src/ingest/sources/xxh64.ts";
import { rejectedWith } from "../helpers/thrown.ts";
import { auditWith, cli, VALID_YAML } from "../robustness/harness.ts";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-textformats-"));
let counter = 0;

/** A file in the test folder holding these bytes; returns its path. */
function write(name: string, content: string | Buffer): string {
  const file = path.join(dir, `${counter++}-${name}`);
  fs.writeFileSync(file, content);
  return file;
}

/** The same bytes compressed by the gzip or zstd program. */
function compressed(tool: "gzip" | "zstd", name: string, content: string): string {
  const plain = write(name, content);
  const out = tool === "gzip" ? `${plain}.gz` : `${plain}.zst`;
  execFileSync(tool, tool === "gzip" ? ["-kn", plain] : ["-q", plain, "-o", out]);
  return out;
}

const QN: ColumnWant[] = [
  { role: "Q", column: "q" },
  { role: "dN", column: "n" },
];

async function read(file: string, columns: ColumnWant[] = QN, settings: FileLayoutSettings = {}, label = "data/run.csv") {
  return readSourceTable({ filePath: file, label, auditDir: dir, keyPath: "datasets[0]", columns, settings });
}

async function failure(file: string, columns: ColumnWant[] = QN, settings: FileLayoutSettings = {}, label = "data/run.csv"): Promise<string> {
  return (await rejectedWith(DataError, () => read(file, columns, settings, label))).message;
}

// One small table (heat, particles); each shape below writes these numbers.
const Q_TEXT = ["0.125", "-2.5e-3", "3", "1e-21", "-0.0"];
const N_TEXT = ["1", "0", "-2", "5", "7"];
const EXPECTED_Q = Q_TEXT.map(Number);
const EXPECTED_N = N_TEXT.map(Number);

const COMMA = `q,n\n${Q_TEXT.map((q, i) => `${q},${N_TEXT[i]}`).join("\n")}\n`;

describe("delimited text of every shape gives the same columns", () => {
  const shapes: { name: string; file: () => string; columns?: ColumnWant[]; settings?: FileLayoutSettings; format: string; lines: number[] }[] = [
    { name: "comma", file: () => write("run.csv", COMMA), format: "comma-separated text (detected)", lines: [2, 3, 4, 5, 6] },
    {
      name: "tab",
      file: () => write("run.tsv", `q\tn\n${Q_TEXT.map((q, i) => `${q}\t${N_TEXT[i]}`).join("\n")}\n`),
      format: "tab-separated text (detected)",
      lines: [2, 3, 4, 5, 6],
    },
    {
      name: "semicolon with decimal commas",
      file: () => write("run.csv", `q;n\n${Q_TEXT.map((q, i) => `${q.replace(".", ",")};${N_TEXT[i]}`).join("\n")}\n`),
      settings: { decimal: "comma" },
      format: "semicolon-separated text (detected), decimal comma",
      lines: [2, 3, 4, 5, 6],
    },
    {
      name: "fixed-width columns",
      file: () => write("run.dat", `      q      n\n${Q_TEXT.map((q, i) => `${q.padStart(8)} ${N_TEXT[i].padStart(6)}`).join("\n")}\n`),
      format: "whitespace-separated text (detected)",
      lines: [2, 3, 4, 5, 6],
    },
    {
      name: "no header, columns by position, comments of three kinds",
      file: () => write("run.txt", `% written by a Fortran code\n! units: meV\n# run 7\n${Q_TEXT.map((q, i) => `${N_TEXT[i]}  ${q}`).join("\n")}\n`),
      columns: [
        { role: "Q", column: 2 },
        { role: "dN", column: 1 },
      ],
      settings: { header: false, format: "whitespace" },
      format: "whitespace-separated text, no header row",
      lines: [4, 5, 6, 7, 8],
    },
    {
      name: "an instrument's preamble",
      file: () => write("run.csv", `Keithley 2400, serial 4711\nDate: 2026-11-30, operator: A. Person\n${COMMA}`),
      settings: { skip_lines: 2 },
      format: "comma-separated text (detected), 2 preamble line(s) skipped",
      lines: [4, 5, 6, 7, 8],
    },
    { name: "gzip", file: () => compressed("gzip", "run.csv", COMMA), format: "comma-separated text (detected), gzip-compressed", lines: [2, 3, 4, 5, 6] },
    { name: "zstd", file: () => compressed("zstd", "run.csv", COMMA), format: "comma-separated text (detected), Zstandard-compressed", lines: [2, 3, 4, 5, 6] },
    {
      name: "gzip, semicolons, preamble and decimal commas",
      file: () => compressed("gzip", "run.csv", `exported 2026-11-30\nq;n\n${Q_TEXT.map((q, i) => `${q.replace(".", ",")};${N_TEXT[i]}`).join("\r\n")}\r\n`.replace("q;n\n", "q;n\r\n").replace("30\n", "30\r\n")),
      settings: { decimal: "comma", skip_lines: 1 },
      format: "semicolon-separated text (detected), decimal comma, 1 preamble line(s) skipped, gzip-compressed",
      lines: [3, 4, 5, 6, 7],
    },
  ];
  for (const shape of shapes) {
    it(`${shape.name}: the doubles Number() gives for the printed values, the lines an editor shows, the digest of the bytes on disk`, async () => {
      const file = shape.file();
      const t = await read(file, shape.columns ?? QN, shape.settings ?? {});
      const q = Array.from(t.columns.get(String((shape.columns ?? QN)[0].column))!);
      const n = Array.from(t.columns.get(String((shape.columns ?? QN)[1].column))!);
      // Object.is keeps −0 apart from 0: "-0.0" must stay a negative zero.
      q.forEach((v, i) => expect(Object.is(v, EXPECTED_Q[i]), `${Q_TEXT[i]} → ${v}`).toBe(true));
      expect(n).toEqual(EXPECTED_N);
      expect(Array.from(t.lineOfRow)).toEqual(shape.lines);
      expect(t.format).toBe(shape.format);
      expect(t.sha256).toBe(createHash("sha256").update(fs.readFileSync(file)).digest("hex"));
    });
  }
});

describe("the byte scanner for every delimiter and a decimal comma", () => {
  it("converts every printed double as Number() does (property test, fast-check, fixed seed)", async () => {
    // Outside reference: ECMAScript Number() on the same text with a decimal point (correctly rounded).
    const printed = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
      fc.double({ min: -1e6, max: 1e6, noNaN: true }).map((x) => x.toFixed(4)),
      fc.tuple(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 16 })).map(([x, d]) => x.toExponential(d)),
      fc.integer({ min: -1e9, max: 1e9 }).map(String),
    ).filter((t) => Number.isFinite(Number(t))); // a literal beyond 1.8e308 is refused, not converted
    const dialects = [
      { format: "comma", sep: ",", decimal: "point" },
      { format: "tab", sep: "\t", decimal: "point" },
      { format: "semicolon", sep: ";", decimal: "point" },
      { format: "semicolon", sep: ";", decimal: "comma" },
      { format: "tab", sep: "\t", decimal: "comma" },
      { format: "whitespace", sep: "   ", decimal: "point" },
      { format: "whitespace", sep: " \t ", decimal: "comma" },
    ] as const;
    await fc.assert(
      fc.asyncProperty(fc.array(fc.tuple(printed, printed), { minLength: 1, maxLength: 40 }), fc.constantFrom(...dialects), fc.constantFrom("\n", "\r\n"), async (rows, d, eol) => {
        const cell = (t: string) => (d.decimal === "comma" ? t.replace(".", ",") : t);
        const body = rows.map(([a, b]) => `${cell(a)}${d.sep}${cell(b)}`).join(eol);
        const file = write("prop.txt", `q${d.sep}n${eol}${body}${eol}`);
        const t = await read(file, QN, { format: d.format, decimal: d.decimal });
        const q = t.columns.get("q")!;
        const n = t.columns.get("n")!;
        rows.forEach(([a, b], i) => {
          expect(Object.is(q[i], Number(a)), `${a} → ${q[i]}`).toBe(true);
          expect(Object.is(n[i], Number(b)), `${b} → ${n[i]}`).toBe(true);
        });
      }),
      { numRuns: Number(process.env.FUZZ_RUNS ?? 200), seed: Number(process.env.FUZZ_SEED ?? 20261202) },
    );
  });

  it("reads quoted cells on the fast path: one quoted cell does not send a file to the general reader", async () => {
    const content = `q,n\n1.5,2\n"2.5",3\n" 3.5 ",4\n`;
    const file = write("quoted.csv", content);
    const source = await openSource({ filePath: file, label: "data/run.csv", auditDir: dir, keyPath: "datasets[0]", columns: QN, settings: {} });
    const plan = source.byteRanges!;
    const got: number[] = [];
    const state = scanFileRange(plan.fd, plan.dataStart, plan.size, plan.layout, (chunk) => got.push(...chunk.values[0]));
    await source.close();
    expect(state.structural).toBeNull();
    expect(got).toEqual([1.5, 2.5, 3.5]);
  });
});

describe("when a text file is wrong", () => {
  it("refuses a decimal comma with comma-separated cells, naming the key", async () => {
    const err = await rejectedWith(ConfigError, () => read(write("run.csv", "q,n\n1,2\n"), QN, { format: "comma", decimal: "comma" }));
    expect(err.message).toBe(
      'audit.yaml datasets[0].decimal: a decimal comma needs a delimiter other than the comma (format: semicolon, tab or whitespace); with comma-separated cells "1,5" would be two cells',
    );
  });

  it("names a ragged row of a whitespace table by its line, preamble and comments counted", async () => {
    const file = write("run.dat", "preamble\n# q in meV\nq n\n1 2\n\n3\n");
    expect(await failure(file, QN, { skip_lines: 1 }, "data/run.dat")).toBe(
      "data/run.dat:6: malformed table: this row has 1 cell(s) but the header has 2; every row needs one cell per column (is a cell empty, or do two columns touch?)",
    );
  });

  it("names a bad cell of a file without a header by line and position", async () => {
    const file = write("run.txt", "% header-less output\n0.5 1\nx 2\n");
    const columns: ColumnWant[] = [
      { role: "Q", column: 1 },
      { role: "dN", column: 2 },
    ];
    expect(await failure(file, columns, { header: false }, "data/run.txt")).toBe('data/run.txt:3, column "1": expected a number, found "x"');
  });

  it("refuses names for columns of a file without a header, naming the key", async () => {
    const err = await rejectedWith(ConfigError, () => read(write("run.txt", "0.5 1\n"), QN, { header: false }));
    expect(err.message).toBe(
      'audit.yaml datasets[0].columns.Q: the file has no header row (header: false), so columns are given by 1-based position, e.g. Q: 2; found "q"',
    );
  });

  it("names a decimal point in a file declared with decimal commas", async () => {
    expect(await failure(write("run.csv", "q;n\n0,5;1\n0.5;1\n"), QN, { decimal: "comma" })).toBe(
      'data/run.csv:3, column "q": expected a number with a decimal comma (decimal: comma), found "0.5"',
    );
  });

  it("refuses a preamble longer than the file", async () => {
    expect(await failure(write("run.csv", "a\nb\n"), QN, { skip_lines: 5 })).toBe(
      "data/run.csv: has 2 line(s), fewer than the 5 preamble line(s) that audit.yaml datasets[0].skip_lines skips",
    );
  });

  it("speaks of line ends when a CR LF header is followed by LF rows", async () => {
    expect(await failure(write("run.csv", "q,n\r\n1,2\n3,4\n"))).toBe(
      "data/run.csv:2: this line ends with a line feed alone (LF) while the lines before it end with CR LF; a file with mixed line ends was pieced together by different programs and its lines cannot be counted reliably: save it with one kind of line end",
    );
  });

  it("holds the 1 MiB line limit for a line in the middle of a small block", async () => {
    const file = write("run.csv", `q,n\n1,2\n${"7".repeat((1 << 20) + 5)},1\n3,4\n`);
    expect(await failure(file)).toBe(
      "data/run.csv:3: malformed CSV: a line is longer than 1,048,576 characters; a row of a numeric table is far shorter, so this is not a table transport-audit can read (are the line ends missing?)",
    );
  });

  it("counts lines the same in a compressed file", async () => {
    expect(await failure(compressed("zstd", "run.csv", "# run 3\nq,n\n1,2\n3,seven\n"), QN, {}, "data/run.csv.zst")).toBe(
      'data/run.csv.zst:4, column "n": expected a number, found "seven"',
    );
  });

  it("refuses a damaged gzip member, naming the file", async () => {
    const file = compressed("gzip", "run.csv", COMMA.repeat(50));
    const bytes = fs.readFileSync(file);
    bytes[bytes.length - 6] ^= 0xff; // inside the CRC-32 / length trailer (RFC 1952 §2.3.1)
    fs.writeFileSync(file, bytes);
    expect(await failure(file, QN, {}, "data/run.csv.gz")).toBe(
      "data/run.csv.gz: the gzip data is damaged (zlib: Z_DATA_ERROR, a damaged block or a check value that does not match); the file cannot be decompressed: copy it again from its source",
    );
  });

  it("refuses a truncated gzip file", async () => {
    const file = compressed("gzip", "run.csv", COMMA.repeat(50));
    const bytes = fs.readFileSync(file);
    fs.writeFileSync(file, bytes.subarray(0, bytes.length - 10));
    expect(await failure(file, QN, {}, "data/run.csv.gz")).toBe(
      "data/run.csv.gz: the gzip data is damaged (it ends before the compressed stream does: the file is truncated); the file cannot be decompressed: copy it again from its source",
    );
  });

  it("refuses a zstd frame whose stored digit was changed, by its content checksum", async () => {
    // Small inputs are stored as raw blocks: without the checksum a changed digit would pass as data.
    const file = compressed("zstd", "run.csv", COMMA);
    const bytes = fs.readFileSync(file);
    const at = bytes.indexOf(Buffer.from("0.125"));
    bytes[at + 2] = "9".charCodeAt(0);
    fs.writeFileSync(file, bytes);
    expect(await failure(file, QN, {}, "data/run.csv.zst")).toBe(
      "data/run.csv.zst: the Zstandard data is damaged (a frame's content checksum (XXH64) does not match its decompressed bytes); the file cannot be decompressed: copy it again from its source",
    );
  });

  it("refuses a truncated zstd file", async () => {
    const file = compressed("zstd", "run.csv", COMMA);
    const bytes = fs.readFileSync(file);
    fs.writeFileSync(file, bytes.subarray(0, bytes.length - 3));
    expect(await failure(file, QN, {}, "data/run.csv.zst")).toBe(
      `data/run.csv.zst: the Zstandard data is damaged (the file ends inside a frame (after byte ${bytes.length - 3}): it is truncated); the file cannot be decompressed: copy it again from its source`,
    );
  });

  it("refuses a .gz name on bytes that are not gzip", async () => {
    expect(await failure(write("run.csv.gz", COMMA), QN, {}, "data/run.csv.gz")).toBe(
      "data/run.csv.gz: the name ends in .gz but the file is not gzip-compressed (its first bytes say uncompressed); rename it or compress it",
    );
  });

  it("ends a run with exit status 2 naming a damaged compressed file", async () => {
    const audit = auditWith(VALID_YAML.replace("file: data/run.csv", "file: data/run.csv.gz"), {});
    fs.mkdirSync(path.join(audit, "data"), { recursive: true });
    fs.writeFileSync(path.join(audit, "data", "run.csv.gz"), Buffer.from([0x1f, 0x8b, 8, 0, 0, 0, 0, 0, 0, 3, 0xff, 0xff, 0xff]));
    const r = await cli(["run", audit]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      "error: data/run.csv.gz: the gzip data is damaged (zlib: Z_DATA_ERROR, a damaged block or a check value that does not match); the file cannot be decompressed: copy it again from its source\n",
    );
  });
});

describe("the data file is read from the descriptor that was checked", () => {
  it("refuses a link swapped to a file outside the audit after the path was checked", async () => {
    const audit = auditWith(VALID_YAML, {});
    const outside = write("secret.csv", COMMA);
    fs.mkdirSync(path.join(audit, "data"), { recursive: true });
    fs.writeFileSync(path.join(audit, "data", "real.csv"), COMMA);
    const link = path.join(audit, "data", "run.csv");
    fs.symlinkSync(path.join(audit, "data", "real.csv"), link);
    // As if the link were swapped between confinePath's check and the open: the open must see it.
    const { loadSamples } = await import("../../src/ingest/samples.ts");
    const { loadAuditDefinition } = await import("../../src/config/loadAudit.ts");
    const config = loadAuditDefinition(audit).datasets[0];
    fs.unlinkSync(link);
    fs.symlinkSync(outside, link);
    const err = await rejectedWith(DataError, () => loadSamples(config as never, link, "datasets[0]", { auditDir: audit }));
    expect(err.message).toBe(`data/run.csv: the file opened is not inside the audit folder (${fs.realpathSync(outside)}); data files must stay inside the audit`);
  });

  it("reads an audit whose data file is a link inside the audit", async () => {
    const audit = auditWith(VALID_YAML, {});
    fs.mkdirSync(path.join(audit, "data"), { recursive: true });
    fs.writeFileSync(path.join(audit, "data", "real.csv"), COMMA);
    fs.symlinkSync(path.join(audit, "data", "real.csv"), path.join(audit, "data", "run.csv"));
    const ingested = await ingestAudit(audit);
    expect(ingested.datasets[0].rows).toBe(5);
  });
});

describe("XXH64, the Zstandard content checksum", () => {
  it("gives the published values of the empty input and of \"abc\" (xxHash reference, seed 0; quoted from memory, and confirmed by every zstd-written file above)", () => {
    const hex = (s: string) => {
      const h = new Xxh64();
      h.update(new TextEncoder().encode(s));
      return h.digest().map((x) => x.toString(16).padStart(8, "0")).join("");
    };
    expect(hex("")).toBe("ef46db3751d8e999");
    expect(hex("abc")).toBe("44bc2cf5ad770999");
  });

  it("gives the same digest however the input is cut into pieces", () => {
    const bytes = Uint8Array.from({ length: 1000 }, (_, i) => (i * 37) & 255);
    const whole = new Xxh64();
    whole.update(bytes);
    const pieces = new Xxh64();
    for (let i = 0; i < bytes.length; i += 13) pieces.update(bytes.subarray(i, i + 13));
    expect(pieces.digest()).toEqual(whole.digest());
  });
});
