import { parse as parseSync } from "csv-parse/sync";
import { ConfigError, DataError } from "../../../errors.ts";
import { nearest } from "../../../config/nearest.ts";
import { describeBinaryContent, describeHeaderProblem } from "../../readCsv.ts";
import { WHITESPACE_RUNS, type ScanLayout } from "../../fast/scanLines.ts";
import type { ColumnWant } from "../types.ts";
import { detectTextFormat, dialectOf, type TextDialect, type TextFormat } from "./dialect.ts";
import type { FileLayoutSettings } from "../types.ts";

/** Where a text file's table starts, and how its cells map to the requested columns. */
export interface TextTableStart {
  dialect: TextDialect;
  detected: boolean;
  /** Text offset of the first data line. */
  dataStart: number;
  /** Lines before it (preamble, comments, header). */
  headerLines: number;
  layout: ScanLayout;
  /** Every column the file has: header names, or positions "1", "2", … without a header. */
  available: string[];
  /** The byte scanner cannot read the header: the general reader reads the file from `dataStart` (the header included, then passed over). */
  general: boolean;
}

const NL = 10;
const CR = 13;
const decoder = new TextDecoder("utf-8");

/** Whether a line (its text) is empty or a comment (`#`, `%` or `!` first, after any blanks, as csv-parse's trimming reads it). */
function isSkippable(text: string, runs: boolean): boolean {
  const t = runs ? text.trimStart() : text;
  return t === "" || t[0] === "#" || t[0] === "%" || t[0] === "!";
}

/** The cells of a line under a dialect (header names: trimmed, surrounding quotes removed). */
export function splitCells(text: string, dialect: TextDialect): string[] {
  if (dialect.delimiter === WHITESPACE_RUNS) return text.trim().split(/[ \t]+/);
  return text.split(String.fromCharCode(dialect.delimiter)).map((h) => h.trim().replace(/^"(.*)"$/, "$1"));
}

/**
 * Find the table in the first block of a text file (`head`, `whole` when it
 * is the entire file): skip `skip_lines` preamble lines, then empty and
 * comment lines, read the header (or, without one, count the first row's
 * cells), and map each requested column (by name or 1-based position) to a
 * field. Returns null when the header needs the general reader (quotes inside
 * names, a lone CR, a first line beyond the block). Throws the user's errors:
 * not text, no table, preamble longer than the file, columns not found.
 */
export function findTextTable(
  head: Uint8Array,
  whole: boolean,
  named: TextFormat | null,
  settings: FileLayoutSettings,
  wants: ColumnWant[],
  label: string,
  keyPath: string,
): TextTableStart | null {
  const binary = describeBinaryContent(label, Buffer.from(head.buffer, head.byteOffset, head.byteLength));
  if (binary) throw new DataError(binary);
  let pos = head[0] === 0xef && head[1] === 0xbb && head[2] === 0xbf ? 3 : 0;
  let line = 0;
  const skipLines = settings.skip_lines ?? 0;
  for (; line < skipLines; line++) {
    const nl = head.indexOf(NL, pos);
    if (nl < 0) {
      if (!whole) return null;
      throw new DataError(`${label}: has ${line + (pos < head.length ? 1 : 0)} line(s), fewer than the ${skipLines} preamble line(s) that audit.yaml ${keyPath}.skip_lines skips`);
    }
    pos = nl + 1;
  }
  while (pos < head.length) {
    let nl = head.indexOf(NL, pos);
    if (nl < 0) {
      if (!whole) return null;
      nl = head.length;
    }
    let end = nl;
    const crlf = end > pos && head[end - 1] === CR;
    if (crlf) end--;
    const text = decoder.decode(head.subarray(pos, end));
    const format = named ?? detectTextFormat(isSkippable(text, true) ? "," : text);
    const dialect = dialectOf(format, settings, keyPath);
    const runs = dialect.delimiter === WHITESPACE_RUNS;
    if (isSkippable(text, true)) {
      line++;
      pos = nl + 1;
      continue;
    }
    if (text.includes("\r") || (!runs && (text.match(/"/g)?.length ?? 0) % 2 === 1)) return null;
    const cells = splitCells(text, dialect);
    if (!runs && cells.some((c) => c.includes('"'))) return null;
    const noun = format === "comma" ? "CSV" : "table";
    const start = dialect.header ? nl + 1 : pos;
    const headerLines = dialect.header ? line + 1 : line;
    const available = dialect.header ? cells : cells.map((_, i) => String(i + 1));
    if (dialect.header) {
      const problem = describeHeaderProblem(label, line + 1, cells);
      if (problem) throw new DataError(problem);
    }
    const layout = layoutFor(cells.length, available, wants, dialect, crlf, noun, label, line + 1, keyPath);
    return { dialect, detected: named === null, dataStart: start, headerLines, layout, available, general: false };
  }
  if (line === 0 || whole) {
    throw new DataError(dialectHeader(settings) ? `${label}: the file is empty; expected a header row and data rows` : `${label}: the file is empty; expected rows of numbers`);
  }
  return null;
}

/**
 * The table's start for the general reader, when the header line is beyond
 * the byte scanner (quoted names with delimiters inside, a lone CR as line
 * end): csv-parse reads the first record of the block after the preamble.
 */
export function findGeneralTable(
  head: Uint8Array,
  named: TextFormat | null,
  settings: FileLayoutSettings,
  wants: ColumnWant[],
  label: string,
  keyPath: string,
): TextTableStart {
  let pos = 0;
  for (let k = 0; k < (settings.skip_lines ?? 0); k++) pos = head.indexOf(NL, pos) + 1;
  const text = decoder.decode(head.subarray(pos));
  const firstLine = text.replace(/^\uFEFF/, "").split(/\r\n|\n|\r/).find((l) => !isSkippable(l, true)) ?? "";
  const dialect = dialectOf(named ?? detectTextFormat(firstLine), settings, keyPath);
  let record: string[];
  let line: number;
  try {
    const [first] = parseSync(text, {
      delimiter: String.fromCharCode(dialect.delimiter),
      comment: "#",
      comment_no_infix: true,
      skip_empty_lines: true,
      trim: true,
      bom: true,
      info: true,
      relax_column_count: true,
      to: 1,
    }) as unknown as { record: string[]; info: { lines: number } }[];
    if (!first) throw new DataError(`${label}: the file is empty; expected a header row and data rows`);
    record = first.record;
    line = first.info.lines + (settings.skip_lines ?? 0);
  } catch (err) {
    if (err instanceof DataError) throw err;
    throw new DataError(`${label}: the first line of the table cannot be read (${(err as Error).message}); give columns plain names on one line`);
  }
  const noun = dialect.format === "comma" ? "CSV" : "table";
  const names = dialect.header ? record.map((h) => h.trim()) : record.map((_, i) => String(i + 1));
  if (dialect.header) {
    const problem = describeHeaderProblem(label, line, names);
    if (problem) throw new DataError(problem);
  }
  const layout = layoutFor(record.length, names, wants, dialect, false, noun, label, line, keyPath);
  return { dialect, detected: named === null, dataStart: pos, headerLines: settings.skip_lines ?? 0, layout, available: names, general: true };
}

function dialectHeader(settings: FileLayoutSettings): boolean {
  return settings.header ?? true;
}

/**
 * Slots in request order (each column once): a name is looked up among the
 * header's, a position counts fields from 1. Throws the reference reader's
 * message for a missing name, and one for a position beyond the row.
 */
export function layoutFor(
  fields: number,
  names: string[],
  wants: ColumnWant[],
  dialect: TextDialect,
  crlf: boolean,
  noun: string,
  label: string,
  line: number,
  keyPath: string,
): ScanLayout {
  const slotOfField = new Int32Array(fields).fill(-1);
  const slotNames: string[] = [];
  const missing: string[] = [];
  for (const want of wants) {
    let field: number;
    if (typeof want.column === "number") {
      field = want.column - 1;
      if (field >= fields) {
        if (want.optional) continue;
        missing.push(`${label}:${line}: no column ${want.column} (needed for ${want.role}): the ${dialect.header ? "header" : "first row"} has ${fields} cell(s)`);
        continue;
      }
    } else {
      if (!dialect.header) {
        // An optional column by name (one a dataset reads when the file has it) is absent from a file without a header.
        if (want.optional) continue;
        throw new ConfigError(
          `audit.yaml ${keyPath}.columns.${want.role}: the file has no header row (header: false), so columns are given by 1-based position, e.g. ${want.role}: 2; found ${JSON.stringify(want.column)}`,
        );
      }
      field = names.indexOf(want.column);
      if (field < 0) {
        if (!want.optional) {
          const hint = nearest(want.column, names);
          missing.push(
            `${label}:${line}: no column "${want.column}" (needed for ${want.role})${hint ? `; did you mean "${hint}"?` : ""}; the header has ${names.map((h) => `"${h}"`).join(", ")}`,
          );
        }
        continue;
      }
    }
    if (slotOfField[field] >= 0) continue; // the same field for two roles: one slot serves both
    slotOfField[field] = slotNames.length;
    slotNames.push(dialect.header ? names[field] : String(field + 1));
  }
  if (missing.length) throw new DataError(missing.join("\n"));
  return {
    fieldCount: fields,
    slotOfField,
    slotNames,
    crlf,
    delimiter: dialect.delimiter,
    decimal: dialect.decimal === "comma" ? 44 : 46,
    countedBy: dialect.header ? "header" : "first row",
    noun,
  };
}
