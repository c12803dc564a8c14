import fs from "node:fs";
import { createHash } from "node:crypto";
import { CsvError, parse, type Options as ParseOptions } from "csv-parse";
import { DataError, formatCellProblems, MAX_REPORTED_PROBLEMS, newProblemLog, recordProblem, type CellProblem } from "../errors.ts";
import { nearest } from "../config/nearest.ts";

/** A column of a CSV file that a dataset needs, and whether it may be missing. */
export interface ColumnRequest {
  column: string | number; // header name in the file, or its 1-based position (files without a header; the sources read positions)
  role: string; // what it is used for (shown in messages)
  optional?: boolean;
}

/**
 * Reads the requested columns of a dataset's file (the ingesters take one, so that every format
 * reaches them). `cellTexts`, for text files, gives problems about numbers their cells as written
 * (src/ingest/cellTexts.ts) before an ingester words its message.
 */
export type TableReader = (requests: ColumnRequest[]) => Promise<NumericTable & { format?: string; cellTexts?: (problems: CellProblem[]) => Promise<void> }>;

export interface NumericTable {
  sha256: string;
  rows: number;
  /** Values by header name, for every requested column that is present. */
  columns: Map<string, Float64Array>;
  /** The line on which each data row ends (1-based, as a person counts; header is a line too). */
  lineOfRow: Uint32Array;
  headers: string[];
}

/**
 * The longest line (in characters) a table may have. A row of numbers, even
 * 81 Onsager entries with uncertainties, is a few kilobytes; a longer line means
 * the file is not a table of numbers (or has lost its line ends), and reading it
 * on would only fill memory.
 */
export const MAX_LINE_CHARS = 1 << 20;

/**
 * csv-parse's options for a table as the text readers read it: `#` comments, blank lines
 * skipped, cells trimmed, each record's line reported, rows of any length (each reader checks
 * them against the header), a byte-order mark dropped, lines of at most MAX_LINE_CHARS.
 */
export function tableParseOptions(delimiter?: string): ParseOptions {
  return {
    ...(delimiter === undefined ? {} : { delimiter }),
    comment: "#",
    comment_no_infix: true,
    skip_empty_lines: true,
    trim: true,
    info: true,
    relax_column_count: true,
    bom: true,
    max_record_size: MAX_LINE_CHARS,
  };
}

/** How much of the start of a file is examined for signs that it is not text. */
export const SNIFF_BYTES = 64 * 1024;

/**
 * A number as instruments, simulation codes and spreadsheets write it: optional
 * sign, digits with an optional decimal point, optional exponent. Hexadecimal,
 * binary and octal literals, which JavaScript's Number() would also accept, are
 * not data a person means as a measured value.
 */
const DECIMAL_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
/** The same with a decimal comma (European spreadsheets, `decimal: comma`). */
const DECIMAL_COMMA_NUMBER = /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$/;

/**
 * One cell of a numeric column: its value when it is a finite decimal number,
 * else a message that says what was expected and what was found (the caller
 * adds file, line and column). Shared by every CSV reader of the tool.
 */
export function describeCellProblem(raw: string, decimal: "point" | "comma" = "point"): string | number {
  const text = raw.trim();
  if (text === "") return "expected a number, found an empty cell";
  if (decimal === "comma") {
    // A decimal comma (declared with decimal: comma): the same grammar with "," where the point stands.
    if (DECIMAL_COMMA_NUMBER.test(text)) {
      const value = Number(text.replace(",", "."));
      return Number.isFinite(value) ? value : `expected a finite number, found ${JSON.stringify(raw)}`;
    }
    if (DECIMAL_NUMBER.test(text) && text.includes(".")) return `expected a number with a decimal comma (decimal: comma), found ${JSON.stringify(raw)}`;
  }
  if (DECIMAL_NUMBER.test(text)) {
    const value = Number(text);
    // Beyond ±1.8e308 a decimal literal rounds to an infinity (IEEE 754 binary64).
    return Number.isFinite(value) ? value : `expected a finite number, found ${JSON.stringify(raw)}`;
  }
  if (/^[+-]?(?:inf|infinity)$/i.test(text)) return `expected a finite number, found ${JSON.stringify(raw)}`;
  if (/^[+-]?(?:\d+,\d*|,\d+)(?:[eE][+-]?\d+)?$/.test(text)) {
    return `expected a number, found ${JSON.stringify(raw)} (use a decimal point, not a comma)`;
  }
  if (/^[+-]?0[xXbBoO][0-9a-fA-F]+$/.test(text)) return `expected a number in decimal notation, found ${JSON.stringify(raw)}`;
  return `expected a number, found ${JSON.stringify(raw)}`;
}

/** 1-based line and column (in bytes) of a byte offset. */
function positionOf(head: Buffer, offset: number): { line: number; column: number } {
  let line = 1;
  let start = 0;
  for (let i = 0; i < offset; i++) {
    if (head[i] === 0x0a) {
      line++;
      start = i + 1;
    }
  }
  return { line, column: offset - start + 1 };
}

/**
 * Offset of the first byte that is not part of a well-formed UTF-8 sequence
 * (The Unicode Standard, §3.9, table 3-7: no overlong forms, no surrogates,
 * nothing above U+10FFFF), or -1. A sequence cut off by the end of the block
 * is not counted as an error: the block is only the start of the file.
 */
export function firstInvalidUtf8(bytes: Uint8Array): number {
  let i = 0;
  const n = bytes.length;
  while (i < n) {
    const b = bytes[i];
    if (b < 0x80) {
      i++;
      continue;
    }
    let need: number;
    let lo = 0x80;
    let hi = 0xbf;
    if (b >= 0xc2 && b <= 0xdf) need = 1;
    else if (b >= 0xe0 && b <= 0xef) {
      need = 2;
      if (b === 0xe0) lo = 0xa0;
      if (b === 0xed) hi = 0x9f;
    } else if (b >= 0xf0 && b <= 0xf4) {
      need = 3;
      if (b === 0xf0) lo = 0x90;
      if (b === 0xf4) hi = 0x8f;
    } else return i;
    for (let k = 1; k <= need; k++) {
      if (i + k >= n) return -1;
      const c = bytes[i + k];
      const [min, max] = k === 1 ? [lo, hi] : [0x80, 0xbf];
      if (c < min || c > max) return i;
    }
    i += need + 1;
  }
  return -1;
}

/**
 * Why the first block of a file shows that it is not a UTF-8 text table, or
 * null. NUL bytes never occur in text (spreadsheets, HDF5, NumPy and zip
 * archives are full of them); bytes that are not UTF-8 mean a legacy encoding
 * whose letters would be misread.
 */
export function describeBinaryContent(label: string, head: Buffer): string | null {
  // UTF-16 byte-order marks (Unicode Standard §23.8): text, but in an encoding this reader does not take.
  if ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff)) {
    return `${label}: is UTF-16 text; save the file with the UTF-8 encoding (spreadsheets: "CSV UTF-8")`;
  }
  const nul = head.indexOf(0);
  if (nul >= 0) {
    return `${label}: is not a text file (it has a NUL byte at byte ${nul + 1}); transport-audit reads comma-separated text tables (.csv): export the data as CSV`;
  }
  const bad = firstInvalidUtf8(head);
  if (bad >= 0) {
    const at = positionOf(head, bad);
    const byte = head[bad].toString(16).toUpperCase().padStart(2, "0");
    return `${label}:${at.line}: is not UTF-8 text (byte 0x${byte} at byte ${at.column} of the line); save the file with the UTF-8 encoding`;
  }
  return null;
}

/**
 * Problems of a header row that make the table ambiguous or show that it is
 * not comma-separated, or null: a single header cell holding semicolons or
 * tabs (the other common delimiters), and a column name given twice.
 */
export function describeHeaderProblem(label: string, line: number, headers: readonly string[]): string | null {
  if (headers.length === 1) {
    const only = headers[0];
    const delimiter = only.includes(";") ? "semicolons" : only.includes("\t") ? "tabs" : null;
    if (delimiter) {
      return `${label}:${line}: the header is separated by ${delimiter}; transport-audit reads comma-separated files: save the table with commas between cells and a decimal point in numbers (header found: ${JSON.stringify(only)})`;
    }
  }
  const firstAt = new Map<string, number>();
  const repeats: string[] = [];
  headers.forEach((h, i) => {
    if (h === "") return; // trailing empty columns of spreadsheet exports carry no name to confuse
    const first = firstAt.get(h);
    if (first === undefined) firstAt.set(h, i);
    else repeats.push(`column ${JSON.stringify(h)} is named twice, at positions ${first + 1} and ${i + 1}`);
  });
  if (repeats.length) return `${label}:${line}: ${repeats.join("; ")}; give every column its own name`;
  return null;
}

/** A csv-parse error in words a person reads, with the line (`noun`: "CSV", or "table" for other delimiters). */
export function describeCsvError(
  label: string,
  e: { code: string; lines?: number; message?: string; record?: unknown[] },
  columns: number | null,
  noun = "CSV",
  countedBy = "header",
): string {
  const at = `${label}:${e.lines ?? "?"}: malformed ${noun}`;
  switch (e.code) {
    case "CSV_RECORD_INCONSISTENT_FIELDS_LENGTH":
      return `${at}: this row has ${e.record?.length ?? "a different number of"} cell(s) but the ${countedBy} has ${columns ?? "another number"}; every row needs one cell per column (a decimal comma, or a comma inside an unquoted text, splits a cell in two)`;
    case "CSV_QUOTE_NOT_CLOSED":
      return `${at}: the file ends inside a quoted cell; a quote (") opened on or before this line is never closed`;
    case "CSV_MAX_RECORD_SIZE":
      return `${at}: a line is longer than ${MAX_LINE_CHARS.toLocaleString("en-US")} characters; a row of a numeric table is far shorter, so this is not a table transport-audit can read (are the line ends missing?)`;
    case "INVALID_OPENING_QUOTE":
      return `${at}: a quote (") stands inside a cell that does not start with one; quote whole cells only, or remove the quote`;
    case "CSV_INVALID_CLOSING_QUOTE":
    case "CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE":
      return `${at}: a quoted cell is followed by other characters before the next comma; quote whole cells only`;
    default:
      return `${at}: ${e.message}`;
  }
}

class GrowableColumn {
  data = new Float64Array(1024);
  length = 0;
  push(v: number) {
    if (this.length === this.data.length) {
      const next = new Float64Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
  toArray(): Float64Array {
    return this.data.slice(0, this.length);
  }
}

/** The first block of a regular file; a DataError naming the file when it cannot be read. */
function readHead(filePath: string, label: string): Buffer {
  let stat: fs.Stats;
  try {
    stat = fs.statSync(filePath);
  } catch {
    throw new DataError(`${label}: cannot read the file (does it exist?)`);
  }
  if (stat.isDirectory()) throw new DataError(`${label}: is a folder; expected a CSV file`);
  if (!stat.isFile()) throw new DataError(`${label}: is not a regular file; expected a CSV file`);
  try {
    const fd = fs.openSync(filePath, "r");
    try {
      const head = Buffer.alloc(Math.min(SNIFF_BYTES, stat.size));
      const n = fs.readSync(fd, head, 0, head.length, 0);
      return head.subarray(0, n);
    } finally {
      fs.closeSync(fd);
    }
  } catch (err) {
    throw new DataError(`${label}: cannot read the file (${(err as NodeJS.ErrnoException).code ?? "read error"})`);
  }
}

/**
 * Stream a CSV file with a header row, keep the requested numeric columns as
 * Float64Array and compute the SHA-256 of the bytes on the way. Every cell of
 * every requested column is checked; problems are gathered (up to a cap) and
 * reported together, each naming file, line and column. Lines starting with `#`
 * are comments. A UTF-8 byte-order mark and CRLF line ends are accepted; files
 * that are not text, not comma-separated, or have a line longer than
 * MAX_LINE_CHARS are refused with a message that says so.
 */
export async function readNumericCsv(filePath: string, label: string, requests: ColumnRequest[]): Promise<NumericTable> {
  const head = readHead(filePath, label);
  const binary = describeBinaryContent(label, head);
  if (binary) throw new DataError(binary);

  const stream = fs.createReadStream(filePath);
  const hash = createHash("sha256");
  stream.on("data", (chunk) => hash.update(chunk));
  // Row lengths are checked below against the header once it is read (csv-parse, reading ahead, could report a row before the header reached this loop).
  const parser = parse(tableParseOptions());
  // A read error (the file vanished or became unreadable mid-way) reaches the parser, and so the loop below.
  stream.on("error", (err) => parser.destroy(err));
  stream.pipe(parser);

  let headers: string[] | null = null;
  let indices: { request: ColumnRequest; index: number; column: GrowableColumn }[] = [];
  const problems = newProblemLog();
  const lines = new GrowableColumn();
  let rows = 0;
  try {
    for await (const item of parser as AsyncIterable<{ record: string[]; info: { lines: number } }>) {
      const { record, info } = item;
      if (headers === null) {
        headers = record.map((h) => h.trim());
        const headerProblem = describeHeaderProblem(label, info.lines, headers);
        if (headerProblem) throw new DataError(headerProblem);
        const missing: string[] = [];
        indices = [];
        for (const request of requests) {
          const index = headers.indexOf(String(request.column)); // a position reads as a name here: this reader takes headers only
          if (index < 0) {
            if (!request.optional) {
              const hint = nearest(String(request.column), headers);
              missing.push(
                `${label}:${info.lines}: no column "${request.column}" (needed for ${request.role})${hint ? `; did you mean "${hint}"?` : ""}; the header has ${headers.map((h) => `"${h}"`).join(", ")}`,
              );
            }
            continue;
          }
          indices.push({ request, index, column: new GrowableColumn() });
        }
        if (missing.length) throw new DataError(missing.join("\n"));
        continue;
      }
      if (record.length !== headers.length) {
        throw new DataError(describeCsvError(label, { code: "CSV_RECORD_INCONSISTENT_FIELDS_LENGTH", lines: info.lines, record }, headers.length));
      }
      rows++;
      lines.push(info.lines);
      for (const entry of indices) {
        const parsed = describeCellProblem(record[entry.index] ?? "");
        if (typeof parsed === "string") {
          recordProblem(problems, info.lines, String(entry.request.column), parsed);
          entry.column.push(Number.NaN);
        } else entry.column.push(parsed);
      }
    }
  } catch (err) {
    if (err instanceof DataError) throw err;
    const e = err as { code?: string; lines?: number; message?: string; record?: unknown[] };
    if (err instanceof CsvError) throw new DataError(describeCsvError(label, e as { code: string }, headers?.length ?? null));
    // A read error of the file system (it vanished, or a disk error) while streaming.
    if (e.code) throw new DataError(`${label}: cannot read the file (${e.code})`);
    throw err;
  } finally {
    stream.destroy();
  }
  if (headers === null) throw new DataError(`${label}: the file is empty; expected a header row and data rows`);
  if (problems.count > 0) throw new DataError(formatCellProblems(label, problems.problems, MAX_REPORTED_PROBLEMS, problems.count));
  if (rows === 0) throw new DataError(`${label}: the file has a header but no data rows`);
  const columns = new Map<string, Float64Array>();
  for (const entry of indices) columns.set(String(entry.request.column), entry.column.toArray());
  const lineOfRow = Uint32Array.from(lines.toArray());
  return { sha256: hash.digest("hex"), rows, columns, lineOfRow, headers };
}
