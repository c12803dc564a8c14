/**
 * Issue 9, data: every unreadable or malformed data file ends in a message that
 * names the file and, where there is one, the line (as a person counts it, the
 * header being line 1) and the column; through the command line it is exit
 * status 2 with nothing on stdout, so no partial result is ever printed.
 * A byte-order mark and CRLF line ends are read as if they were absent.
 *
 * Also covered in test/ingest/readCsv.test.ts (same reader, unit level): the
 * cap on listed problems, comment lines, a decimal comma in a quoted cell.
 * test/ingest/samples.test.ts covers a histogram whose counts are all zero.
 */
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { ConfigError, DataError, InputError } from "../../src/errors.ts";
import { describeCellProblem, MAX_LINE_CHARS } from "../../src/ingest/readCsv.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { SamplesDataset } from "../../src/ingest/types.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { auditWith, cli, VALID_YAML } from "./harness.ts";
import { rejectedWith } from "../helpers/thrown.ts";

/** An audit whose data/run.csv holds exactly these bytes (or is absent for null). */
function auditWithData(content: string | Buffer | null, yaml = VALID_YAML): string {
  const dir = auditWith(yaml, {});
  fs.mkdirSync(path.join(dir, "data"), { recursive: true });
  if (content !== null) fs.writeFileSync(path.join(dir, "data", "run.csv"), content);
  return dir;
}

async function dataError(content: string | Buffer | null, yaml = VALID_YAML): Promise<string> {
  return (await rejectedWith(DataError, () => ingestAudit(auditWithData(content, yaml)))).message;
}

async function heatOf(content: string | Buffer): Promise<number[]> {
  const d = (await ingestAudit(auditWithData(content))).datasets[0] as SamplesDataset;
  return Array.from(d.Q);
}

const MEV = 1.602176634e-22; // J per meV: the elementary charge times 1e-3 (SI 2019, exact)
const HISTOGRAM_YAML = VALID_YAML.replace("columns: { Q: q, dN: n }", "columns: { Q: q, dN: n, count: c }");

describe("files that cannot be read as a table", () => {
  it("names a missing file", async () => {
    expect(await dataError(null)).toBe("data/run.csv: cannot read the file (does it exist?)");
  });

  it("names an empty folder where a file or the parts of a multi-part dataset belong", async () => {
    const dir = auditWithData(null);
    fs.mkdirSync(path.join(dir, "data", "run.csv"));
    await expect(ingestAudit(dir)).rejects.toThrow(
      new ConfigError('audit.yaml datasets[0].file: the folder "data/run.csv" holds no files; a multi-part dataset needs at least one part'),
    );
  });

  it("refuses an empty file", async () => {
    expect(await dataError("")).toBe("data/run.csv: the file is empty; expected a header row and data rows");
  });

  it("refuses a file with only comments and blank lines as empty", async () => {
    expect(await dataError("# exported by the DAQ\n\n\n")).toBe("data/run.csv: the file is empty; expected a header row and data rows");
  });

  it("refuses a header with no data rows", async () => {
    expect(await dataError("q,n\n")).toBe("data/run.csv: the file has a header but no data rows");
  });

  it("refuses a binary file (a zip archive, as a spreadsheet is), naming the first NUL byte", async () => {
    const zip = Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x06, 0x00, 0x08, 0x00, 0x00, 0x00, 0x21, 0x00]);
    expect(await dataError(zip)).toBe(
      "data/run.csv: is not a text file (it has a NUL byte at byte 6); transport-audit reads comma-separated text tables (.csv): export the data as CSV",
    );
  });

  it("refuses UTF-16 text, which spreadsheets write as 'Unicode text'", async () => {
    expect(await dataError(Buffer.from("\ufeffq,n\n1,2\n", "utf16le"))).toBe('data/run.csv: is UTF-16 text; save the file with the UTF-8 encoding (spreadsheets: "CSV UTF-8")');
  });

  it("refuses bytes that are not UTF-8 (a Latin-1 µ in a header), naming line and byte", async () => {
    expect(await dataError(Buffer.from("q,n,T_\xb5K\n1,2,3\n", "latin1"))).toBe(
      "data/run.csv:1: is not UTF-8 text (byte 0xB5 at byte 7 of the line); save the file with the UTF-8 encoding",
    );
  });

  it("ends a single 20 MB line with a clear error instead of reading it into memory", async () => {
    const huge = `q,n\n${"1".repeat(20 * 1024 * 1024)},2\n`;
    expect(await dataError(huge)).toBe(
      `data/run.csv:2: malformed CSV: a line is longer than ${MAX_LINE_CHARS.toLocaleString("en-US")} characters; a row of a numeric table is far shorter, so this is not a table transport-audit can read (are the line ends missing?)`,
    );
    expect(MAX_LINE_CHARS).toBe(1_048_576);
  });
});

describe("the header", () => {
  it("names a missing mapped column, the nearest header and every column that exists", async () => {
    expect(await dataError("q,N,t\n1,2,3\n")).toBe('data/run.csv:1: no column "n" (needed for dN); did you mean "N"?; the header has "q", "N", "t"');
  });

  it("refuses a column name given twice, naming both positions", async () => {
    expect(await dataError("q,n,q\n1,2,3\n")).toBe('data/run.csv:1: column "q" is named twice, at positions 1 and 3; give every column its own name');
  });

  it("accepts trailing unnamed columns that spreadsheet exports add", async () => {
    const q = await heatOf("q,n,,\n1,2,,\n");
    expect(q).toHaveLength(1);
    // Tolerance: two roundings in the unit conversion (meV → J via 1e-3 · e).
    expectClose(q[0], 1 * MEV, { rtol: 1e-15, source: "1 meV = 1.602176634e-22 J (SI 2019, exact)" });
  });

  it("reads a semicolon-separated file, and points a decimal comma to the decimal key", async () => {
    expect(await dataError("q;n\n1,5;2\n")).toBe('data/run.csv:2, column "q": expected a number, found "1,5" (use a decimal point, or declare decimal: comma for this file)');
    const d = (await ingestAudit(auditWithData("q;n\n1.5;2\n"))).datasets[0];
    expect(d.format).toBe("semicolon-separated text (detected)");
  });

  it("reads a tab-separated file and states the separator it found", async () => {
    const d = (await ingestAudit(auditWithData("q\tn\n1\t2\n"))).datasets[0];
    expect(d.format).toBe("tab-separated text (detected)");
    expect(d.rows).toBe(1);
  });

  it("still refuses a header separated by semicolons when format: comma is stated", async () => {
    const yaml = VALID_YAML.replace("columns: { Q: q, dN: n }", "format: comma\n    columns: { Q: q, dN: n }");
    expect(await dataError("q;n\n1;2\n", yaml)).toBe(
      'data/run.csv:1: the header is separated by semicolons; transport-audit reads comma-separated files: save the table with commas between cells and a decimal point in numbers (header found: "q;n")',
    );
  });
});

describe("cells", () => {
  it("names every non-numeric, empty, NaN and infinite cell with line and column", async () => {
    expect(await dataError("q,n\n1,2\nseven,3\n4,\nNaN,1\n5,-Infinity\n6,inf\n7,1e999\n")).toBe(
      [
        'data/run.csv:3, column "q": expected a number, found "seven"',
        'data/run.csv:4, column "n": expected a number, found an empty cell',
        'data/run.csv:5, column "q": expected a number, found "NaN"',
        'data/run.csv:6, column "n": expected a finite number, found "-Infinity"',
        'data/run.csv:7, column "n": expected a finite number, found "inf"',
        'data/run.csv:8, column "n": expected a finite number, found "1e999"',
      ].join("\n"),
    );
  });

  it("refuses a decimal comma in a quoted cell, naming the cell", async () => {
    expect(await dataError('q,n\n"0,25",1\n')).toBe('data/run.csv:2, column "q": expected a number, found "0,25" (use a decimal point, not a comma)');
  });

  it("refuses an unquoted decimal comma, which splits a row, naming the line", async () => {
    expect(await dataError("q,n\n0,25,1\n")).toBe(
      "data/run.csv:2: malformed CSV: this row has 3 cell(s) but the header has 2; every row needs one cell per column (a decimal comma, or a comma inside an unquoted text, splits a cell in two)",
    );
  });

  it("refuses hexadecimal numbers, which no instrument means as a measured value", async () => {
    expect(await dataError("q,n\n0x10,1\n")).toBe('data/run.csv:2, column "q": expected a number in decimal notation, found "0x10"');
  });

  it("names a quote that is never closed", async () => {
    expect(await dataError('q,n\n1,2\n"3,4\n')).toBe('data/run.csv:3: malformed CSV: the file ends inside a quoted cell; a quote (") opened on or before this line is never closed');
  });

  it("names a quote inside a cell that does not start with one", async () => {
    expect(await dataError('q,n\n1,2\n3,4"5\n')).toBe('data/run.csv:3: malformed CSV: a quote (") stands inside a cell that does not start with one; quote whole cells only, or remove the quote');
  });

  it("refuses a negative and a fractional count, every bad row at once", async () => {
    expect(await dataError("q,n,c\n0.1,1,3\n0.2,0,-2\n0.3,1,2.5\n", HISTOGRAM_YAML)).toBe(
      ['data/run.csv:3, column "c": expected a count (a whole number from 0 to 9007199254740991), found "-2"', 'data/run.csv:4, column "c": expected a count (a whole number from 0 to 9007199254740991), found "2.5"'].join("\n"),
    );
  });

  it("describes single cells the same way for every reader (describeCellProblem)", () => {
    expect(describeCellProblem(" 2.5e-3 ")).toBe(0.0025);
    expect(describeCellProblem("-.5")).toBe(-0.5);
    expect(describeCellProblem("7.")).toBe(7);
    expect(describeCellProblem("")).toBe("expected a number, found an empty cell");
    expect(describeCellProblem("1,5e3")).toBe('expected a number, found "1,5e3" (use a decimal point, not a comma)');
    expect(describeCellProblem("1.2.3")).toBe('expected a number, found "1.2.3"');
    expect(describeCellProblem("0b101")).toBe('expected a number in decimal notation, found "0b101"');
    expect(describeCellProblem("-1e400")).toBe('expected a finite number, found "-1e400"');
  });
});

describe("encodings and line ends that are read as if absent", () => {
  it("reads a file with a UTF-8 byte-order mark exactly like one without", async () => {
    const plain = "q,n\n0.5,1\n-0.25,0\n";
    expect(await heatOf(`\ufeff${plain}`)).toEqual(await heatOf(plain));
    expectClose((await heatOf(plain))[0], 0.5 * MEV, { rtol: 1e-15, source: "1 meV = 1.602176634e-22 J (SI 2019, exact); tolerance: two roundings" });
  });

  it("reads CRLF line ends like LF, and counts lines the same in messages", async () => {
    expect(await heatOf("q,n\r\n0.5,1\r\n-0.25,0\r\n")).toEqual(await heatOf("q,n\n0.5,1\n-0.25,0\n"));
    expect(await dataError("q,n\r\n0.5,1\r\nx,0\r\n")).toBe('data/run.csv:3, column "q": expected a number, found "x"');
  });
});

describe("through the command line", () => {
  it("exits with status 2, names file, line and column on stderr and prints no partial result", async () => {
    const dir = auditWithData("q,n\n0.5,1\n0.25,oops\n");
    const r = await cli(["run", dir, "--json"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toBe('error: data/run.csv:3, column "n": expected a number, found "oops"\n');
  });

  it("exits with status 2 for a binary file", async () => {
    const r = await cli(["run", auditWithData(Buffer.from([0, 1, 2, 3, 0xff])), "--json"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toBe("error: data/run.csv: is not a text file (it has a NUL byte at byte 1); transport-audit reads comma-separated text tables (.csv): export the data as CSV\n");
  });

  it("reports every dataset error as an input error, never as an internal one", async () => {
    for (const content of ["", "q,n\n", "q;n\n1;2;3\n", "q,q\n1,1\n"]) {
      const r = await cli(["run", auditWithData(content)]);
      expect(r.code, JSON.stringify(content)).toBe(2);
      expect(r.stderr.startsWith("error: data/run.csv"), r.stderr).toBe(true);
    }
    await expect(ingestAudit(auditWithData("q,n\n1,x\n"))).rejects.toBeInstanceOf(InputError);
  });
});
