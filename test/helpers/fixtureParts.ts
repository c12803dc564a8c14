// The fixtures' one dataset (scripts/fixtures/write_formats.py, 240 rows) cut into consecutive slices of
// rows, one file a slice, for multi-part datasets whose parts differ: merged in another order than part
// order, such parts give other rows in another order and other digests. NumPy files are cut in their
// bytes (the header's shape is the only change, so the dtype stays as NumPy wrote it); HDF5 parts are
// written with h5wasm in the fixtures' layouts from the comma file's values, little-endian (h5wasm
// writes no other byte order; the big-endian fixtures are read in test/ingest/formats.test.ts).
import fs from "node:fs";
import path from "node:path";
import { unzipSync, zipSync } from "fflate";
import h5wasm from "h5wasm/node";
import { commaColumns, FORMAT_FIXTURES } from "./formatsAudit.ts";

/** Rows [start, end) of a one-dimensional .npy array (format 1.0, numpy/lib/format.py: magic, version, 2-byte header length, dict, data). */
export function npyRows(bytes: Uint8Array, start: number, end: number): Uint8Array {
  const view = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (view[6] !== 1) throw new Error(`npyRows: format ${view[6]}.${view[7]}; only 1.0 is cut here`);
  const headerLength = view.readUInt16LE(8);
  const header = view.subarray(10, 10 + headerLength).toString("latin1");
  const shape = /'shape': \((\d+),\)/.exec(header);
  if (!shape) throw new Error(`npyRows: not a one-dimensional array: ${header.trim()}`);
  const rows = Number(shape[1]);
  const data = view.subarray(10 + headerLength);
  const itemSize = data.length / rows;
  // The new dict padded with spaces to the old length: the data start stays on its 64-byte boundary.
  const dict = header.trimEnd().replace(shape[0], `'shape': (${end - start},)`);
  const padded = dict + " ".repeat(headerLength - 1 - dict.length) + "\n";
  return Buffer.concat([view.subarray(0, 10), Buffer.from(padded, "latin1"), data.subarray(start * itemSize, end * itemSize)]);
}

/** `parts` .npy files of consecutive rows of a fixture, named part-0000.npy… in row order. */
export function npyParts(fixture: string, parts: number) {
  return (target: string) => {
    fs.mkdirSync(target, { recursive: true });
    const bytes = fs.readFileSync(path.join(FORMAT_FIXTURES, fixture));
    const rows = rowsOfNpy(bytes);
    for (let k = 0; k < parts; k++) fs.writeFileSync(path.join(target, `part-000${k}.npy`), npyRows(bytes, (k * rows) / parts, ((k + 1) * rows) / parts));
  };
}

/** `parts` .npz archives of consecutive rows of every member of a fixture, each member deflated (as numpy.savez_compressed). */
export function npzParts(fixture: string, parts: number) {
  return (target: string) => {
    fs.mkdirSync(target, { recursive: true });
    const members = unzipSync(fs.readFileSync(path.join(FORMAT_FIXTURES, fixture)));
    for (let k = 0; k < parts; k++) {
      const sliced = Object.fromEntries(
        Object.entries(members).map(([name, bytes]) => {
          const rows = rowsOfNpy(bytes);
          return [name, npyRows(bytes, (k * rows) / parts, ((k + 1) * rows) / parts)];
        }),
      );
      // A fixed time stamp: the same bytes on every run.
      fs.writeFileSync(path.join(target, `part-000${k}.npz`), zipSync(sliced, { level: 6, mtime: new Date(Date.UTC(2020, 0, 1)) }));
    }
  };
}

function rowsOfNpy(bytes: Uint8Array): number {
  const header = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).subarray(10, 10 + (bytes[8] | (bytes[9] << 8))).toString("latin1");
  return Number(/'shape': \((\d+),\)/.exec(header)![1]);
}

/**
 * `parts` HDF5 files of consecutive rows of the comma file's columns (the fixtures' one dataset), in
 * the layouts of write_formats.py: `compound`, a table /runs/exchange of (window int32, Q_meV
 * float64, n int16), chunked and deflated (chunks of 16 rows here, as a part has only 60); `columns`,
 * one dataset a role, /runs/Q (float32) and /runs/n (int64), contiguous. Every value is a multiple of
 * 1/4 and small, so every type holds it exactly. `units: meV` as the fixtures state it.
 */
export function hdf5Parts(layout: "compound" | "columns", parts: number) {
  return async (target: string) => {
    const columns = await commaColumns();
    await h5wasm.ready;
    fs.mkdirSync(target, { recursive: true });
    const rows = columns.n.length;
    for (let k = 0; k < parts; k++) {
      const [start, end] = [(k * rows) / parts, ((k + 1) * rows) / parts];
      const slice = (name: string) => Array.from(columns[name].subarray(start, end));
      const out = new h5wasm.File(path.join(target, `part-000${k}.h5`), "w");
      try {
        out.create_group("runs");
        if (layout === "compound") {
          // h5wasm's type letters are Python struct's: i int32, d float64, h int16 (little-endian: h5wasm writes no other order).
          const data = new Map<string, number[]>([
            ["window", slice("window")],
            ["Q_meV", slice("Q_meV")],
            ["n", slice("n")],
          ]);
          const table = out.create_dataset({ name: "runs/exchange", data, shape: [end - start], dtype: [["window", "<i"], ["Q_meV", "<d"], ["n", "<h"]], chunks: [16], compression: "gzip" });
          table.create_attribute("units", "meV");
        } else {
          const Q = out.create_dataset({ name: "runs/Q", data: Float32Array.from(slice("Q_meV")), dtype: "<f" });
          Q.create_attribute("units", "meV");
          out.create_dataset({ name: "runs/n", data: BigInt64Array.from(slice("n"), BigInt), dtype: "<q" });
        }
      } finally {
        out.close();
      }
    }
  };
}
