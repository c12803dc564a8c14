import { DataError, formatRowNumberedProblems, MAX_REPORTED_PROBLEMS } from "../../errors.ts";


// Integers of magnitude up to 2^53 are exactly representable as IEEE 754 doubles; above
// it not every integer is (IEEE 754-2019, binary64 has a 53-bit significand).
const MAX_EXACT_INTEGER = 2n ** 53n;

interface RowProblem {
  row: number; // 0-based row in the file
  columnIndex: number; // position among the requested columns, to order problems in a row
  column: string;
  value: unknown;
}

/** What is wrong with one cell, in the words a user needs to fix it. */
function describeBadValue(value: unknown): string {
  if (value === null || value === undefined) return "expected a number, found a missing (null) value";
  if (typeof value === "number") return `expected a finite number, found ${String(value)}`;
  if (typeof value === "bigint") {
    return `expected an integer of magnitude at most 2^53 = 9007199254740992 (beyond it not every integer has an exact double), found ${value.toString()}`;
  }
  return `expected a number, found a value of type ${typeof value}`;
}

function before(a: RowProblem, b: RowProblem): boolean {
  return a.row < b.row || (a.row === b.row && a.columnIndex < b.columnIndex);
}

/**
 * Bad cells of a file, gathered so that a user can fix them in one go. Keeps the
 * MAX_REPORTED_PROBLEMS earliest (by row, then column) whatever order the column chunks are
 * decoded in, and counts the others, so memory stays bounded on a file full of nulls.
 */
export class RowProblems {
  total = 0;
  private readonly kept: RowProblem[] = [];

  constructor(private readonly label: string) {}

  add(row: number, columnIndex: number, column: string, value: unknown): void {
    this.total++;
    const problem = { row, columnIndex, column, value };
    if (this.kept.length < MAX_REPORTED_PROBLEMS) {
      this.kept.push(problem);
      return;
    }
    let latest = 0;
    for (let i = 1; i < this.kept.length; i++) if (before(this.kept[latest], this.kept[i])) latest = i;
    if (before(problem, this.kept[latest])) this.kept[latest] = problem;
  }

  /** One line per kept problem, `file, row N, column "c": …`, rows counted from 1. */
  toError(): DataError {
    const kept = [...this.kept]
      .sort((a, b) => a.row - b.row || a.columnIndex - b.columnIndex)
      .map((p) => ({ row: p.row + 1, column: p.column, message: describeBadValue(p.value) }));
    return new DataError(formatRowNumberedProblems(this.label, kept, this.total));
  }
}

/** Where a run of cells goes and where it came from, for copying and for messages. */
export interface CopyTarget {
  target: Float64Array;
  at: number; // index in target of source[from]
  firstRow: number; // file row (0-based) of source[from]
  columnIndex: number;
  column: string;
  problems: RowProblems;
}

// One loop per source array type keeps each loop's element access monomorphic, which
// matters at 10^8 cells.
function copyFloat64(source: Float64Array, from: number, to: number, c: CopyTarget): void {
  c.target.set(source.subarray(from, to), c.at);
  for (let i = from; i < to; i++) {
    const v = source[i];
    // v − v is 0 for every finite v and NaN for NaN and ±Infinity.
    if (v - v !== 0) c.problems.add(c.firstRow + (i - from), c.columnIndex, c.column, v);
  }
}

function copyFloat32(source: Float32Array, from: number, to: number, c: CopyTarget): void {
  c.target.set(source.subarray(from, to), c.at); // binary32 → binary64 widening is exact
  for (let i = from; i < to; i++) {
    const v = source[i];
    if (v - v !== 0) c.problems.add(c.firstRow + (i - from), c.columnIndex, c.column, v);
  }
}

function copyBigInts(source: BigInt64Array | BigUint64Array, from: number, to: number, c: CopyTarget): void {
  for (let i = from, j = c.at; i < to; i++, j++) {
    const v = source[i];
    if (v > MAX_EXACT_INTEGER || v < -MAX_EXACT_INTEGER) c.problems.add(c.firstRow + (i - from), c.columnIndex, c.column, v);
    c.target[j] = Number(v);
  }
}

/** A plain array: what hyparquet gives for nullable columns, with null for a missing value. */
function copyMixed(source: ArrayLike<unknown>, from: number, to: number, c: CopyTarget): void {
  for (let i = from, j = c.at; i < to; i++, j++) {
    const v = source[i];
    if (typeof v === "number") {
      if (v - v !== 0) c.problems.add(c.firstRow + (i - from), c.columnIndex, c.column, v);
      c.target[j] = v;
    } else if (typeof v === "bigint") {
      if (v > MAX_EXACT_INTEGER || v < -MAX_EXACT_INTEGER) c.problems.add(c.firstRow + (i - from), c.columnIndex, c.column, v);
      c.target[j] = Number(v);
    } else {
      c.problems.add(c.firstRow + (i - from), c.columnIndex, c.column, v);
      c.target[j] = Number.NaN;
    }
  }
}

/**
 * Copy `source[from..to)` into `c.target` as doubles, recording every cell that is not a
 * finite number (null, NaN, ±Infinity, an integer beyond 2^53) in `c.problems`.
 */
export function copyAsDoubles(source: ArrayLike<unknown>, from: number, to: number, c: CopyTarget): void {
  if (source instanceof Float64Array) copyFloat64(source, from, to, c);
  else if (source instanceof Float32Array) copyFloat32(source, from, to, c);
  else if (source instanceof Int32Array || source instanceof Uint32Array) {
    // Every 32-bit integer is an exact, finite double.
    c.target.set(source.subarray(from, to), c.at);
  } else if (source instanceof BigInt64Array || source instanceof BigUint64Array) copyBigInts(source, from, to, c);
  else copyMixed(source, from, to, c);
}
