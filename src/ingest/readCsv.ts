import fs from "node:fs";
import { createHash } from "node:crypto";
import { parse } from "csv-parse";
import { DataError, formatCellProblems, type CellProblem } from "../errors.ts";
import { nearest } from "../config/nearest.ts";

/** A column of a CSV file that a dataset needs, and whether it may be missing. */
export interface ColumnRequest {
  column: string; // header name in the file
  role: string; // what it is used for (shown in messages)
  optional?: boolean;
}

export interface NumericTable {
  sha256: string;
  rows: number;
  /** Values by header name, for every requested column that is present. */
  columns: Map<string, Float64Array>;
  /** The line on which each data row ends (1-based, as a person counts; header is a line too). */
  lineOfRow: Uint32Array;
  headers: string[];
}

const MAX_REPORTED = 20;

/** Parse one cell as a finite number; describe the problem otherwise. */
function parseCell(raw: string): number | string {
  const text = raw.trim();
  if (text === "") return "expected a number, found an empty cell";
  const value = Number(text);
  if (Number.isNaN(value) || /^[+-]?nan$/i.test(text)) {
    if (/^[+-]?\d+,\d+$/.test(text)) return `expected a number, found ${JSON.stringify(raw)} (use a decimal point, not a comma)`;
    return `expected a number, found ${JSON.stringify(raw)}`;
  }
  if (!Number.isFinite(value)) return `expected a finite number, found ${JSON.stringify(raw)}`;
  return value;
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

/**
 * Stream a CSV file with a header row, keep the requested numeric columns as
 * Float64Array and compute the SHA-256 of the bytes on the way. Every cell of
 * every requested column is checked; problems are gathered (up to a cap) and
 * reported together, each naming file, line and column. Lines starting with `#`
 * are comments.
 */
export async function readNumericCsv(filePath: string, label: string, requests: ColumnRequest[]): Promise<NumericTable> {
  let stream: fs.ReadStream;
  try {
    fs.accessSync(filePath, fs.constants.R_OK);
    stream = fs.createReadStream(filePath);
  } catch {
    throw new DataError(`${label}: cannot read the file (does it exist?)`);
  }
  const hash = createHash("sha256");
  stream.on("data", (chunk) => hash.update(chunk));
  const parser = stream.pipe(
    parse({ comment: "#", comment_no_infix: true, skip_empty_lines: true, trim: true, info: true, relax_column_count: false, bom: true }),
  );

  let headers: string[] | null = null;
  let indices: { request: ColumnRequest; index: number; column: GrowableColumn }[] = [];
  const problems: CellProblem[] = [];
  let problemCount = 0;
  const lines = new GrowableColumn();
  let rows = 0;
  try {
    for await (const item of parser as AsyncIterable<{ record: string[]; info: { lines: number } }>) {
      const { record, info } = item;
      if (headers === null) {
        headers = record.map((h) => h.trim());
        const missing: string[] = [];
        indices = [];
        for (const request of requests) {
          const index = headers.indexOf(request.column);
          if (index < 0) {
            if (!request.optional) {
              const hint = nearest(request.column, headers);
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
      rows++;
      lines.push(info.lines);
      for (const entry of indices) {
        const parsed = parseCell(record[entry.index] ?? "");
        if (typeof parsed === "string") {
          problemCount++;
          if (problems.length < MAX_REPORTED) problems.push({ row: info.lines, column: entry.request.column, message: parsed });
          entry.column.push(Number.NaN);
        } else entry.column.push(parsed);
      }
    }
  } catch (err) {
    if (err instanceof DataError) throw err;
    const e = err as { code?: string; lines?: number; message?: string };
    if (e.code && e.code.startsWith("CSV_")) {
      throw new DataError(`${label}:${e.lines ?? "?"}: malformed CSV: ${e.message}`);
    }
    throw err;
  }
  if (headers === null) throw new DataError(`${label}: the file is empty; expected a header row and data rows`);
  if (problemCount > 0) throw new DataError(formatCellProblems(label, problems, MAX_REPORTED, problemCount));
  if (rows === 0) throw new DataError(`${label}: the file has a header but no data rows`);
  const columns = new Map<string, Float64Array>();
  for (const entry of indices) columns.set(entry.request.column, entry.column.toArray());
  const lineOfRow = Uint32Array.from(lines.toArray());
  return { sha256: hash.digest("hex"), rows, columns, lineOfRow, headers };
}
