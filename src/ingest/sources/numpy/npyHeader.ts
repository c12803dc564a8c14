import { DataError } from "../../../errors.ts";
import { parsePythonLiteral, PyDict, PyTuple, type PyValue } from "./pythonLiteral.ts";

/**
 * The header of a .npy file (NumPy's format specification, numpy.lib.format, versions
 * 1.0, 2.0 and 3.0): the magic bytes \x93NUMPY, a major and a minor version byte, the
 * header length (2 bytes little-endian in version 1, 4 bytes from version 2), then the
 * header: the repr of a dict with keys descr (the dtype), fortran_order and shape,
 * ASCII (Latin-1 in version 2) or UTF-8 (version 3), padded with spaces and ended by a
 * newline. The array's bytes follow it directly.
 */
export interface NpyHeader {
  version: string;
  descr: PyValue;
  fortranOrder: boolean;
  shape: number[];
  /** Byte offset of the data, from the start of the .npy bytes. */
  dataOffset: number;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // \x93 N U M P Y

/** Bytes needed to know the header length: magic, version, and the longest length field. */
export const NPY_PREAMBLE_BYTES = 12;

/** How many bytes the header occupies in all (magic to newline), from the first 12 bytes; null when they are not a .npy start. */
export function npyHeaderBytes(start: Uint8Array): number | null {
  if (start.length < 10 || MAGIC.some((b, i) => start[i] !== b)) return null;
  const major = start[6];
  const view = new DataView(start.buffer, start.byteOffset, start.byteLength);
  if (major === 1) return 10 + view.getUint16(8, true);
  if ((major === 2 || major === 3) && start.length >= 12) return 12 + view.getUint32(8, true);
  return null;
}

/** Parse the header from the file's first bytes (at least `npyHeaderBytes` of them). */
export function parseNpyHeader(bytes: Uint8Array, label: string): NpyHeader {
  if (bytes.length < 10 || MAGIC.some((b, i) => bytes[i] !== b)) {
    throw new DataError(`${label}: not a NumPy .npy file (it does not start with the bytes \\x93NUMPY); expected a file written by numpy.save`);
  }
  const major = bytes[6];
  const minor = bytes[7];
  const version = `${major}.${minor}`;
  if (major < 1 || major > 3) {
    throw new DataError(`${label}: .npy format version ${version} is not one this reader knows (1.0, 2.0 or 3.0)`);
  }
  const total = npyHeaderBytes(bytes);
  if (total === null || total > bytes.length) {
    throw new DataError(`${label}: the .npy header is cut short: it announces ${total ?? "?"} bytes but the file holds ${bytes.length}; the file is truncated`);
  }
  const start = major === 1 ? 10 : 12;
  const text = new TextDecoder(major === 3 ? "utf-8" : "latin1").decode(bytes.subarray(start, total));
  let literal: PyValue;
  try {
    literal = parsePythonLiteral(text);
  } catch (err) {
    throw new DataError(`${label}: the .npy header is not a Python dict literal (${(err as Error).message}); the file is damaged`);
  }
  if (!(literal instanceof PyDict)) throw new DataError(`${label}: the .npy header is not a dict; the file is damaged`);
  const descr = literal.entries.get("descr");
  const fortran = literal.entries.get("fortran_order");
  const shape = literal.entries.get("shape");
  if (descr === undefined || typeof fortran !== "boolean" || !(shape instanceof PyTuple) || !shape.items.every((n) => typeof n === "number" && Number.isSafeInteger(n) && n >= 0)) {
    throw new DataError(`${label}: the .npy header lacks descr, fortran_order (True or False) or shape (a tuple of sizes); the file is damaged`);
  }
  return { version, descr, fortranOrder: fortran, shape: shape.items as number[], dataOffset: total };
}
