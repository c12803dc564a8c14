import type { Metadata } from "h5wasm/node";
import type { NumericType } from "../binary/numericType.ts";

/** Type classes of HDF5 (H5Tpublic.h, H5T_class_t), in words for messages. */
const CLASS_NAMES: Record<number, string> = {
  2: "times (H5T_TIME)",
  3: "strings",
  4: "bit fields",
  5: "opaque bytes",
  6: "a nested compound",
  7: "object or region references",
  8: "enumerated labels (an enum)",
  9: "variable-length sequences",
  10: "arrays of several values per row",
};

/** A numeric HDF5 type as the reader decodes it, or what the type holds instead. */
export type Hdf5Element = { numeric: NumericType } | { numeric: null; holds: string };

/**
 * HDF5 integers (class 0) of 1, 2, 4 or 8 bytes and IEEE floats (class 1) of 2, 4 or 8
 * bytes are numbers; everything else is refused. `littleEndian` is the byte order the
 * bytes arrive in: the file's for compound members (h5wasm reads compound records as
 * stored), little-endian for a plain dataset (h5wasm reads those in the native order of
 * WebAssembly, which is little-endian).
 */
export function hdf5Element(metadata: Metadata, littleEndian: boolean): Hdf5Element {
  const size = metadata.size;
  if (metadata.vlen) return { numeric: null, holds: metadata.type === 3 ? "variable-length strings" : CLASS_NAMES[9] };
  if (metadata.type === 0 && (size === 1 || size === 2 || size === 4 || size === 8)) {
    return { numeric: { kind: metadata.signed ? "int" : "uint", bytes: size, littleEndian } };
  }
  if (metadata.type === 1 && (size === 2 || size === 4 || size === 8)) return { numeric: { kind: "float", bytes: size, littleEndian } };
  if (metadata.type === 1) return { numeric: null, holds: `${size * 8}-bit floats, which have no exact double` };
  if (metadata.type === 0) return { numeric: null, holds: `${size * 8}-bit integers` };
  if (metadata.type === 3) return { numeric: null, holds: `fixed-length strings of ${size} bytes` };
  return { numeric: null, holds: CLASS_NAMES[metadata.type] ?? `values of HDF5 type class ${metadata.type}` };
}
