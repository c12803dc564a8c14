/**
 * Issue 22, smaller items: particle numbers are whole; numbers in messages are
 * not quoted as a double the file does not hold; a huge cell is quoted
 * shortened with its length.
 */
import { describe, expect, it } from "vitest";
import { describeStoredNumber, quoteForMessage, shortenQuotes } from "../../src/messageText.ts";
import { isExactWholeNumber } from "../../src/ingest/wholeNumber.ts";
import { auditWith, cli, VALID_YAML } from "./harness.ts";

const PARTICLES =
  "expected a whole number of particles (dN counts the particles one realisation moved, and has no unit that makes it fractional: " +
  "divide a charge by e, and give averages over realisations as a cumulants dataset)";

describe("particle numbers are whole", () => {
  it("refuses dN = 1.5 with file, line and column, quoting the cell as written", async () => {
    const dir = auditWith(VALID_YAML, { "data/run.csv": "q,n\n0.12,1\n-0.05,1.50\n0.31,1\n-0.02,-1\n0.08,-.25\n" });
    const r = await cli(["run", dir]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`error: data/run.csv:3, column "n": ${PARTICLES}, found "1.50"\ndata/run.csv:6, column "n": ${PARTICLES}, found "-.25"\n`);
  });

  it("refuses a particle number beyond 2^53 − 1, quoting the cell, not the double it was rounded to", async () => {
    const dir = auditWith(VALID_YAML, { "data/run.csv": "q,n\n0.12,1\n-0.05,9007199254740993\n0.31,1\n-0.02,-1\n0.08,0\n" });
    const r = await cli(["run", dir]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      `error: data/run.csv:3, column "n": ${PARTICLES}, found "9007199254740993"\n`,
    );
    expect(r.stderr).not.toContain("9007199254740992");
  });

  it("accepts whole numbers of either sign, zero included, and the largest exact one", () => {
    for (const n of [0, -0, 1, -3, 2 ** 40, Number.MAX_SAFE_INTEGER, -Number.MAX_SAFE_INTEGER]) expect(isExactWholeNumber(n)).toBe(true);
    // 2^53 is a double, but so is the reading of 2^53 + 1: beyond 2^53 − 1 (IEEE 754 binary64) the count is not known exactly.
    for (const n of [0.5, -1e-300, 2 ** 53, -(2 ** 53), Infinity, Number.NaN]) expect(isExactWholeNumber(n)).toBe(false);
  });

  it("counts of a histogram: the same rule for the number quoted", () => {
    expect(describeStoredNumber(9007199254740992)).toBe("a number beyond ±9007199254740991 (2^53 − 1), where a double cannot hold every whole number");
    expect(describeStoredNumber(12.25)).toBe("12.25");
  });
});

describe("long cells are quoted shortened, with their length", () => {
  it("quotes a 900 kB cell by its first 60 and last 12 characters and states its length", async () => {
    // Below the 1 MiB line limit, so that the cell itself is what the message is about.
    const cell = `${"a".repeat(450_000)}MIDDLE${"z".repeat(449_994)}`;
    const dir = auditWith(VALID_YAML, { "data/run.csv": `q,n\n0.12,1\n${cell},0\n0.31,1\n` });
    const r = await cli(["run", dir]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`error: data/run.csv:3, column "q": expected a number, found "${"a".repeat(60)}…${"z".repeat(12)}" (900000 characters, shortened)\n`);
  });

  it("keeps a cell of 80 characters whole and shortens one of 81; counts characters, not UTF-16 units", () => {
    expect(quoteForMessage("x".repeat(80))).toBe(`"${"x".repeat(80)}"`);
    expect(quoteForMessage("x".repeat(81))).toBe(`"${"x".repeat(60)}…${"x".repeat(12)}" (81 characters, shortened)`);
    // 80 emoji are 160 UTF-16 units but 80 characters: whole.
    expect(quoteForMessage("😀".repeat(80))).toBe(`"${"😀".repeat(80)}"`);
    // Never cut inside a surrogate pair.
    expect(quoteForMessage(`${"x".repeat(59)}${"😀".repeat(30)}`)).toBe(`"${"x".repeat(59)}…${"😀".repeat(6)}" (89 characters, shortened)`);
  });

  it("escapes characters a terminal would act on or hide", () => {
    expect(quoteForMessage("a\u202Eb\u0007c")).toBe('"a\\u202eb\\u0007c"');
    expect(shortenQuotes(`expected a number, found "${"q".repeat(100)}" in column "n"`)).toBe(
      `expected a number, found "${"q".repeat(60)}…${"q".repeat(12)}" (100 characters, shortened) in column "n"`,
    );
  });
});
