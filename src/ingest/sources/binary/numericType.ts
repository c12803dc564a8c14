import type { RowProblems } from "../../parquet/rowProblems.ts";
import { integerPower } from "../../../math/index.ts";

/**
 * A fixed-size binary number as NumPy and HDF5 store them: IEEE 754 binary16, binary32
 * or binary64, or a two's-complement (signed) or plain (unsigned) integer of 1, 2, 4 or
 * 8 bytes, in either byte order.
 */
export interface NumericType {
  kind: "float" | "int" | "uint";
  bytes: 1 | 2 | 4 | 8;
  littleEndian: boolean;
}

/** The type in words, for messages: "big-endian 64-bit float", "8-bit unsigned integer". */
export function describeNumericType(type: NumericType): string {
  const order = type.bytes === 1 ? "" : type.littleEndian ? "little-endian " : "big-endian ";
  const name = type.kind === "float" ? "float" : type.kind === "int" ? "signed integer" : "unsigned integer";
  return `${order}${type.bytes * 8}-bit ${name}`;
}

/**
 * IEEE 754-2019 binary16 (1 sign bit, 5 exponent bits with bias 15, 10 fraction bits) as
 * a double. Every binary16 value is exactly a double, so this loses nothing.
 */
export function halfToDouble(bits: number): number {
  const sign = bits & 0x8000 ? -1 : 1;
  const exponent = (bits >> 10) & 0x1f;
  const fraction = bits & 0x3ff;
  if (exponent === 0) return sign * fraction * integerPower(2, -24); // subnormal (or zero)
  if (exponent === 0x1f) return fraction === 0 ? sign * Infinity : Number.NaN;
  return sign * (1024 + fraction) * integerPower(2, exponent - 25);
}

// Integers of magnitude up to 2^53 are exactly representable as IEEE 754 doubles; above
// it not every integer is (IEEE 754-2019, binary64 has a 53-bit significand).
const MAX_EXACT_INTEGER = 2n ** 53n;

/** Where a column's elements sit in a buffer of whole records, and where they go. */
export interface ColumnCopy {
  bytes: Uint8Array;
  /** Byte offset of the first element, and bytes from one element to the next. */
  offset: number;
  stride: number;
  count: number;
  type: NumericType;
  target: Float64Array;
  /** 0-based row of the first element, for messages. */
  firstRow: number;
  columnIndex: number;
  column: string;
  problems: RowProblems;
}

/**
 * Decode `count` elements into doubles, recording each one that is not a finite number
 * (NaN, ±Infinity) or is an integer beyond 2^53 (not every such integer has a double).
 */
export function decodeColumn(c: ColumnCopy): void {
  const view = new DataView(c.bytes.buffer, c.bytes.byteOffset, c.bytes.byteLength);
  const { type, target, count, stride, problems } = c;
  const le = type.littleEndian;
  let at = c.offset;
  const bad = (i: number, value: unknown) => problems.add(c.firstRow + i, c.columnIndex, c.column, value);
  if (type.kind === "float") {
    const read =
      type.bytes === 8 ? (p: number) => view.getFloat64(p, le) : type.bytes === 4 ? (p: number) => view.getFloat32(p, le) : (p: number) => halfToDouble(view.getUint16(p, le));
    for (let i = 0; i < count; i++, at += stride) {
      const v = read(at);
      // v − v is 0 for every finite v and NaN for NaN and ±Infinity.
      if (v - v !== 0) bad(i, v);
      target[i] = v;
    }
    return;
  }
  if (type.bytes === 8) {
    for (let i = 0; i < count; i++, at += stride) {
      const v = type.kind === "int" ? view.getBigInt64(at, le) : view.getBigUint64(at, le);
      if (v > MAX_EXACT_INTEGER || v < -MAX_EXACT_INTEGER) bad(i, v);
      target[i] = Number(v);
    }
    return;
  }
  const signed = type.kind === "int";
  const read =
    type.bytes === 4
      ? signed ? (p: number) => view.getInt32(p, le) : (p: number) => view.getUint32(p, le)
      : type.bytes === 2
        ? signed ? (p: number) => view.getInt16(p, le) : (p: number) => view.getUint16(p, le)
        : signed ? (p: number) => view.getInt8(p) : (p: number) => view.getUint8(p);
  // Every integer of up to 32 bits is an exact, finite double.
  for (let i = 0; i < count; i++, at += stride) target[i] = read(at);
}
