import type { NumericType } from "../binary/numericType.ts";
import { PyTuple, type PyValue } from "./pythonLiteral.ts";

/**
 * NumPy dtype descriptions as a .npy header writes them (numpy.lib.format: a dtype
 * string such as '<f8', or for a structured array a list of (name, dtype) or
 * (name, dtype, shape) tuples, with unnamed '|V' entries for padding). Only plain
 * numbers become columns; every other kind keeps its size (so later fields keep their
 * offsets) and a description of what it holds, for the message that refuses it.
 */
export type NpyElement = { numeric: NumericType; dtype: string } | { numeric: null; dtype: string; holds: string };

export interface NpyField {
  name: string;
  offset: number;
  element: NpyElement;
}

export interface NpyDtype {
  itemBytes: number;
  /** The fields of a structured dtype, in order; null for a plain one. */
  fields: NpyField[] | null;
  /** The element of a plain dtype (for a structured one: a record). */
  element: NpyElement;
}

const NAMES: Record<string, string> = {
  b: "booleans",
  c: "complex numbers",
  O: "Python objects",
  U: "text (Unicode strings)",
  S: "byte strings",
  a: "byte strings",
  V: "raw bytes (void)",
  M: "dates and times (datetime64)",
  m: "time differences (timedelta64)",
};

/** One dtype string ('<f8', '|u1', '<U3', '|O', '<M8[ns]'), its size in bytes and what it holds. */
function parseDtypeString(dtype: string): { bytes: number; element: NpyElement } | null {
  const match = /^([<>|=])([a-zA-Z])(\d*)(\[[^\]]*\])?$/.exec(dtype);
  if (!match) return null;
  const [, order, code, digits] = match;
  const n = digits === "" ? (code === "O" ? 8 : 0) : Number(digits);
  const bytes = code === "U" ? 4 * n : n;
  const littleEndian = order !== ">";
  if ((code === "f" && (n === 2 || n === 4 || n === 8)) || ((code === "i" || code === "u") && (n === 1 || n === 2 || n === 4 || n === 8))) {
    // '=' is the writer's native order, which the file does not record; numpy.save always
    // writes '<' or '>' ('|' for one byte, where order does not matter).
    if (order === "=" && n > 1) return { bytes, element: { numeric: null, dtype, holds: "numbers in an unstated byte order ('=')" } };
    const kind = code === "f" ? "float" : code === "i" ? "int" : "uint";
    return { bytes, element: { numeric: { kind, bytes: n as 1 | 2 | 4 | 8, littleEndian }, dtype } };
  }
  if (code === "f") return { bytes, element: { numeric: null, dtype, holds: `${n * 8}-bit extended-precision floats (np.longdouble), which have no exact double` } };
  return { bytes, element: { numeric: null, dtype, holds: NAMES[code] ?? `values of kind '${code}'` } };
}

/** Size in bytes of a descr (string or list), or null when it cannot be understood. */
function parseDescr(descr: PyValue): { bytes: number; fields: NpyField[] | null; element: NpyElement } | null {
  if (typeof descr === "string") {
    const parsed = parseDtypeString(descr);
    return parsed && { bytes: parsed.bytes, fields: null, element: parsed.element };
  }
  if (!Array.isArray(descr)) return null;
  const fields: NpyField[] = [];
  let offset = 0;
  for (const entry of descr) {
    if (!(entry instanceof PyTuple) || entry.items.length < 2 || entry.items.length > 3) return null;
    const [rawName, inner, shape] = entry.items;
    // A name may be a (title, name) pair.
    const name = rawName instanceof PyTuple ? rawName.items[1] : rawName;
    if (typeof name !== "string") return null;
    const parsed = parseDescr(inner);
    if (!parsed) return null;
    let count = 1;
    if (shape !== undefined) {
      const dims = shape instanceof PyTuple ? shape.items : [shape];
      if (!dims.every((d) => typeof d === "number")) return null;
      count = (dims as number[]).reduce((a, b) => a * b, 1);
    }
    const bytes = parsed.bytes * count;
    const dtypeText = typeof inner === "string" ? inner : "a record";
    let element: NpyElement = parsed.element;
    if (parsed.fields !== null) element = { numeric: null, dtype: dtypeText, holds: "a nested record" };
    else if (shape !== undefined) element = { numeric: null, dtype: dtypeText, holds: `an array of ${count} values per row` };
    if (name !== "") fields.push({ name, offset, element }); // '' names padding
    offset += bytes;
  }
  return { bytes: offset, fields, element: { numeric: null, dtype: "a record", holds: "records" } };
}

/** The dtype of a header's descr, or null when the description is not one NumPy writes. */
export function npyDtype(descr: PyValue): NpyDtype | null {
  const parsed = parseDescr(descr);
  return parsed && { itemBytes: parsed.bytes, fields: parsed.fields, element: parsed.element };
}
