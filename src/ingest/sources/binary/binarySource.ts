import fs from "node:fs";
import { sha256OfDescriptor } from "../fileBytes.ts";
import type { OpenSource, SourceRequest } from "../types.ts";
import type { RecordBatch } from "./readRecordColumns.ts";

/** What a binary reader gives once its file is open and its columns are checked. */
export interface OpenBinary {
  format: string;
  rows: number;
  /** Every column the file offers (messages about missing columns list them). */
  available: string[];
  /** The requested columns found, as the batches key them (absent optional ones left out). */
  present: readonly string[];
  batches(): AsyncGenerator<RecordBatch>;
  /** Units the file states for the requested columns (request order), where the format has them. */
  units?: OpenSource["units"];
  /** Releases what the reader holds besides the descriptor. */
  close?(): void;
}

/**
 * The source interface over a binary reader (NumPy, HDF5): values in request order,
 * rows located by their 1-based number, progress estimated from rows read, and the
 * digest of the bytes on disk read through the same descriptor.
 */
export function binarySource(request: SourceRequest, fd: number, size: number, open: OpenBinary): OpenSource {
  const present = new Set(open.present);
  return {
    label: request.label,
    format: open.format,
    located: "row",
    names: request.columns.map((w) => (present.has(String(w.column)) ? String(w.column) : null)),
    available: open.available,
    byteSize: size,
    units: open.units,
    async *batches(onBytes) {
      for await (const batch of open.batches()) {
        const locations = new Uint32Array(batch.rows);
        for (let i = 0; i < batch.rows; i++) locations[i] = batch.firstRow + i + 1;
        onBytes?.(Math.round(((batch.firstRow + batch.rows) / Math.max(1, open.rows)) * size), size);
        yield { rows: batch.rows, values: request.columns.map((w) => batch.values.get(String(w.column)) ?? null), locations };
      }
    },
    sha256: () => sha256OfDescriptor(fd, size),
    close: async () => {
      open.close?.();
      fs.closeSync(fd);
    },
  };
}

/** The columns a request marks optional, as the readers key them. */
export function optionalColumns(request: SourceRequest): Set<string> {
  return new Set(request.columns.filter((w) => w.optional).map((w) => String(w.column)));
}
