import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { readNumericCsv } from "../../src/ingest/readCsv.ts";
import { DataError } from "../../src/errors.ts";
import { rejectedWith } from "../helpers/thrown.ts";

function tempCsv(content: string): string {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ta-csv-")), "run.csv");
  fs.writeFileSync(file, content);
  return file;
}

async function errorOf(content: string, columns = ["q", "n"]): Promise<string> {
  const requests = columns.map((c) => ({ column: c, role: c === "q" ? "Q" : "dN" }));
  return (await rejectedWith(DataError, () => readNumericCsv(tempCsv(content), "data/run.csv", requests))).message;
}

describe("readNumericCsv", () => {
  it("reads requested columns as Float64Array and digests the bytes", async () => {
    const content = "q,n,ignored\n1.5,2,x\n-0.25,-1,y\n";
    const table = await readNumericCsv(tempCsv(content), "data/run.csv", [
      { column: "q", role: "Q" },
      { column: "n", role: "dN" },
    ]);
    expect(table.rows).toBe(2);
    expect(Array.from(table.columns.get("q")!)).toEqual([1.5, -0.25]);
    expect(Array.from(table.columns.get("n")!)).toEqual([2, -1]);
    // The digest is SHA-256 of the file's bytes (FIPS 180-4), computed independently here by node:crypto.
    expect(table.sha256).toBe(createHash("sha256").update(content).digest("hex"));
  });

  it("names file, line and column of every bad cell, counting lines as a person does", async () => {
    const message = await errorOf("q,n\n1,2\nseven,3\n4,\n5,NaN\n6,Infinity\n7,1,5\n".replace("7,1,5\n", "7,1\n"));
    expect(message).toBe(
      [
        'data/run.csv:3, column "q": expected a number, found "seven"',
        'data/run.csv:4, column "n": expected a number, found an empty cell',
        'data/run.csv:5, column "n": expected a number, found "NaN"',
        'data/run.csv:6, column "n": expected a finite number, found "Infinity"',
      ].join("\n"),
    );
  });

  it("suggests a decimal point when a decimal comma is used", async () => {
    const message = await errorOf('q,n\n"1,5",2\n');
    expect(message).toBe('data/run.csv:2, column "q": expected a number, found "1,5" (use a decimal point, not a comma)');
  });

  it("skips comment lines but keeps counting them as lines", async () => {
    const message = await errorOf("# made by a simulator\nq,n\n1,2\n# note\nx,3\n");
    expect(message).toBe('data/run.csv:5, column "q": expected a number, found "x"');
  });

  it("names a missing column and the nearest header", async () => {
    const message = await errorOf("Q,n\n1,2\n");
    expect(message).toBe('data/run.csv:1: no column "q" (needed for Q); did you mean "Q"?; the header has "Q", "n"');
  });

  it("refuses a file with a header and no data", async () => {
    expect(await errorOf("q,n\n")).toBe("data/run.csv: the file has a header but no data rows");
  });

  it("reports ragged rows as malformed CSV with their line", async () => {
    expect(await errorOf("q,n\n1,2\n3,4,5\n")).toMatch(/^data\/run\.csv:3: malformed CSV: /);
  });

  it("caps the list of problems and says how many more there are", async () => {
    const rows = Array.from({ length: 25 }, () => "x,1").join("\n");
    const message = await errorOf(`q,n\n${rows}\n`);
    expect(message.split("\n")).toHaveLength(21);
    expect(message.split("\n")[20]).toBe("… and 5 more problem(s) in data/run.csv");
  });
});
