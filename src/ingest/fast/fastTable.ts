import fs from "node:fs";
import { createHash, type Hash } from "node:crypto";
import { DataError, formatCellProblems, MAX_REPORTED_PROBLEMS, type CellProblem } from "../../errors.ts";
import { readNumericCsv, type ColumnRequest, type NumericTable } from "../readCsv.ts";
import { plainHeader, type PlainHeader } from "./header.ts";
import type { RowChunk } from "./scanLines.ts";
import { scanFileRange } from "./scanRange.ts";

/**
 * `readNumericCsv` at parse speed: the same table (same doubles, same line of
 * every row, same digest) and the same messages, read by the byte scanner when
 * the file has the plain layout, and by the reference reader otherwise. Tests
 * hold the two readers to identical results on generated and fuzzed files.
 */
export async function readNumericTable(
  filePath: string,
  label: string,
  requests: ColumnRequest[],
  options: { onBytes?: (bytes: number, total: number) => void } = {},
): Promise<NumericTable> {
  const opened = openPlain(filePath, label, requests);
  if (opened === null) return readNumericCsv(filePath, label, requests);
  const { fd, size, header } = opened;
  try {
    const hash = createHash("sha256");
    hashPrefix(fd, header.dataStart, hash);
    const slots = header.layout.slotNames.length;
    const columns = Array.from({ length: slots }, () => new GrowingArray((n) => new Float64Array(n)));
    const lines = new GrowingArray((n) => new Uint32Array(n));
    let done = header.dataStart;
    const state = scanFileRange(
      fd,
      header.dataStart,
      size,
      header.layout,
      (chunk: RowChunk) => {
        for (let s = 0; s < slots; s++) columns[s].append(chunk.values[s]);
        lines.append(chunk.lines, header.headerLines);
      },
      {
        hash,
        onBytes: (n) => {
          done += n;
          options.onBytes?.(done, size);
        },
      },
    );
    if (state.structural !== null || state.rows === 0) return readNumericCsv(filePath, label, requests);
    throwRangeProblems(label, header.headerLines, [{ problems: state.problems, count: state.problemCount, lines: state.line }]);
    const table = new Map<string, Float64Array>();
    header.layout.slotNames.forEach((name, s) => table.set(name, columns[s].toArray()));
    return { sha256: hash.digest("hex"), rows: state.rows, columns: table, lineOfRow: lines.toArray(), headers: header.names };
  } finally {
    fs.closeSync(fd);
  }
}

/** An open file with a plain header, or null when the reference reader must take the file. */
export function openPlain(filePath: string, label: string, requests: ColumnRequest[]): { fd: number; size: number; header: PlainHeader } | null {
  let fd: number;
  let size: number;
  try {
    const stat = fs.statSync(filePath);
    if (!stat.isFile()) return null;
    size = stat.size;
    fd = fs.openSync(filePath, "r");
  } catch {
    return null;
  }
  try {
    const header = plainHeader(fd, size, label, requests);
    if (header !== null) return { fd, size, header };
  } catch {
    // Any trouble reading the head: the reference reader words it.
  }
  fs.closeSync(fd);
  return null;
}

/** Feed bytes [0, end) of a file into a hash. */
function hashPrefix(fd: number, end: number, hash: Hash): void {
  const buffer = Buffer.allocUnsafe(end);
  let read = 0;
  while (read < end) {
    const got = fs.readSync(fd, buffer, read, end - read, read);
    if (got === 0) break;
    read += got;
  }
  hash.update(buffer.subarray(0, read));
}

/** Problems found in one range of a file, their lines counted from the range's start. */
export interface RangeProblems {
  problems: CellProblem[];
  count: number;
  /** Lines in the range. */
  lines: number;
}

/**
 * Problems of consecutive ranges of a file (the data after `headerLines`
 * lines), in file order with absolute lines, thrown as the reference reader
 * words them; nothing when there are none.
 */
export function throwRangeProblems(label: string, headerLines: number, ranges: RangeProblems[]): void {
  const total = ranges.reduce((a, r) => a + r.count, 0);
  if (total === 0) return;
  const located: CellProblem[] = [];
  let offset = headerLines;
  for (const range of ranges) {
    for (const p of range.problems) located.push({ ...p, row: p.row + offset });
    offset += range.lines;
  }
  throw new DataError(formatCellProblems(label, located.slice(0, MAX_REPORTED_PROBLEMS), MAX_REPORTED_PROBLEMS, total));
}

/** A typed array that doubles its room as values are appended. */
class GrowingArray<A extends Float64Array | Uint32Array> {
  private data: A;
  private length = 0;
  constructor(private readonly make: (length: number) => A) {
    this.data = make(1 << 16);
  }
  /** Append `values`, each plus `add` (copied as they are when `add` is 0, so −0 stays −0). */
  append(values: ArrayLike<number>, add = 0): void {
    if (this.length + values.length > this.data.length) {
      const next = this.make(Math.max(this.data.length * 2, this.length + values.length));
      next.set(this.data.subarray(0, this.length));
      this.data = next;
    }
    if (add === 0) this.data.set(values, this.length);
    else for (let i = 0; i < values.length; i++) this.data[this.length + i] = values[i] + add;
    this.length += values.length;
  }
  toArray(): A {
    return this.data.slice(0, this.length) as A;
  }
}
