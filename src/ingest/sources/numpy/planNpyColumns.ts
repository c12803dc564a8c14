import { DataError } from "../../../errors.ts";
import { describeNumericType } from "../binary/numericType.ts";
import type { ColumnSource } from "../binary/readRecordColumns.ts";
import { npyDtype, type NpyElement } from "./npyDtype.ts";
import type { NpyHeader } from "./npyHeader.ts";

/** A column of a .npy array: a field name (structured arrays) or a position counted from 1 (2-D arrays). */
export type NpyColumnRef = string | number;

/** Where the requested columns' bytes are: streams from byte offsets (relative to the data), and the columns in them. */
export interface NpyPlan {
  rows: number;
  /** Byte offset (from the start of the data) and record size of each stream to read. */
  streams: { start: number; recordBytes: number }[];
  columns: ColumnSource[];
  /** Bytes the data section must hold. */
  dataBytes: number;
  /** What the array is, in words, for the report: "structured array of 240 rows (fields window <u2, …)". */
  description: string;
}

const NUMERIC = "numbers (a float: f2, f4, f8; or an integer: i1 to i8, u1 to u8)";

function refuseElement(label: string, column: string, element: NpyElement): string | null {
  return element.numeric ? null : `${label}, column "${column}": expected ${NUMERIC}, found ${element.holds}, dtype "${element.dtype}"`;
}

/** A 2-D array's column position: a number, or a string of digits as YAML may give it. */
function positionOf(ref: NpyColumnRef): number | null {
  const n = typeof ref === "number" ? ref : /^\d+$/.test(ref) ? Number(ref) : null;
  return n !== null && Number.isSafeInteger(n) ? n : null;
}

/**
 * Check the header against the requested columns and lay out their reads.
 * `shape` rules: a structured array is 1-D with columns by field name; a plain array is
 * 2-D (rows × columns) with columns by position from 1, as in text files without a
 * header; `oneColumn` (a .npz member) wants a plain 1-D array, which is its one column.
 * Columns in `optional` that the array lacks are left out instead of refused.
 */
export function planNpyColumns(header: NpyHeader, label: string, columns: readonly NpyColumnRef[], oneColumn = false, optional: ReadonlySet<string> = new Set()): NpyPlan {
  const dtype = npyDtype(header.descr);
  if (dtype === null) throw new DataError(`${label}: the .npy header's dtype ${JSON.stringify(header.descr)} is not one NumPy writes; the file is damaged`);
  const shape = header.shape;
  const shapeText = `(${shape.join(", ")}${shape.length === 1 ? "," : ""})`;
  const wanted = [...new Set(columns.map(String))];
  if (dtype.fields === null && !dtype.element.numeric) {
    // Every column of a plain array has its one dtype: name the requested ones.
    throw new DataError(wanted.map((c) => refuseElement(label, c, dtype.element)).join("\n"));
  }
  if (oneColumn) {
    if (dtype.fields !== null || shape.length !== 1) {
      throw new DataError(`${label}: expected a 1-D array of numbers (one per row) in this .npz member, found ${dtype.fields ? "a structured array" : `an array of shape ${shapeText}`}`);
    }
    const rows = shape[0];
    const type = dtype.element.numeric!;
    return {
      rows,
      streams: [{ start: 0, recordBytes: dtype.itemBytes }],
      columns: [{ column: wanted[0], stream: 0, offset: 0, type }],
      dataBytes: rows * dtype.itemBytes,
      description: `${rows} values of dtype ${String(header.descr)} (${describeNumericType(type)})`,
    };
  }
  if (dtype.fields !== null) {
    if (shape.length !== 1) throw new DataError(`${label}: a structured array must be 1-D (one record per row); found shape ${shapeText}`);
    const rows = shape[0];
    const byName = new Map(dtype.fields.map((f) => [f.name, f]));
    const problems: string[] = [];
    const sources: ColumnSource[] = [];
    for (const name of wanted) {
      const field = byName.get(name);
      if (!field) {
        if (optional.has(name)) continue;
        problems.push(`${label}: has no field "${name}"; its fields are ${dtype.fields.map((f) => `"${f.name}"`).join(", ")}`);
        continue;
      }
      const refusal = refuseElement(label, name, field.element);
      if (refusal) problems.push(refusal);
      else sources.push({ column: name, stream: 0, offset: field.offset, type: field.element.numeric! });
    }
    if (problems.length) throw new DataError(problems.join("\n"));
    const fieldList = dtype.fields.map((f) => `${f.name} ${f.element.dtype}`).join(", ");
    return {
      rows,
      streams: [{ start: 0, recordBytes: dtype.itemBytes }],
      columns: sources,
      dataBytes: rows * dtype.itemBytes,
      description: `structured array of ${rows} rows (fields ${fieldList}), columns by field name`,
    };
  }
  if (shape.length !== 2) {
    throw new DataError(`${label}: expected a structured array (columns by field name) or a 2-D array (rows × columns, columns by position from 1); found an array of shape ${shapeText}`);
  }
  const [rows, width] = shape;
  const type = dtype.element.numeric!;
  const item = dtype.itemBytes;
  const problems: string[] = [];
  const positions: number[] = [];
  for (const ref of wanted) {
    const p = positionOf(ref);
    if (p === null || p < 1 || p > width) {
      if (!optional.has(ref)) problems.push(`${label}: column ${JSON.stringify(ref)} is not a position from 1 to ${width} (a 2-D array's columns are numbered from 1, as in text files without a header)`);
    } else positions.push(p);
  }
  if (problems.length) throw new DataError(problems.join("\n"));
  const order = header.fortranOrder ? "Fortran (column-major)" : "C (row-major)";
  const description = `2-D array of ${rows} rows × ${width} columns, dtype ${String(header.descr)} (${describeNumericType(type)}), ${order} order, columns by position from 1`;
  if (header.fortranOrder) {
    // Column-major: column p is one run of `rows` elements; each is read as its own stream.
    return {
      rows,
      streams: positions.map((p) => ({ start: (p - 1) * rows * item, recordBytes: item })),
      columns: positions.map((p, i) => ({ column: String(p), stream: i, offset: 0, type })),
      dataBytes: rows * width * item,
      description,
    };
  }
  return {
    rows,
    streams: [{ start: 0, recordBytes: width * item }],
    columns: positions.map((p) => ({ column: String(p), stream: 0, offset: (p - 1) * item, type })),
    dataBytes: rows * width * item,
    description,
  };
}

/**
 * Where data that stop after `available` bytes first fall short, as `row N, column "c"`
 * (rows from 1): the element the data end in or before.
 */
export function whereDataEnd(header: NpyHeader, available: number): { row: number; column: string } {
  const dtype = npyDtype(header.descr)!;
  const item = dtype.itemBytes;
  if (dtype.fields !== null || header.shape.length < 2) {
    // One record per row: the field whose bytes the data stop in (or the first, at a record boundary).
    const within = available % item;
    const column = dtype.fields ? (dtype.fields.filter((f) => f.offset <= within).at(-1) ?? dtype.fields[0]).name : "1";
    return { row: Math.floor(available / item) + 1, column };
  }
  const [rows, width] = header.shape;
  const element = Math.floor(available / item);
  return header.fortranOrder
    ? { row: (element % rows) + 1, column: String(Math.floor(element / rows) + 1) }
    : { row: Math.floor(element / width) + 1, column: String((element % width) + 1) };
}
