import type { NumericTable } from "../readCsv.ts";
import { openSource } from "./index.ts";
import type { Located, OpenSource, SourceRequest } from "./types.ts";

/** Whole columns of a data file, keyed by the column as the dataset names it, with the file's format. */
export interface SourceTable extends NumericTable {
  format: string;
  located: Located;
  /** Units the file states for the requested columns (HDF5 attributes), request order. */
  units?: OpenSource["units"];
}

/** A typed array that doubles its room as values are appended. */
export class GrowingColumn<A extends Float64Array | Uint32Array> {
  private data: A;
  length = 0;
  constructor(private readonly make: (length: number) => A) {
    this.data = make(1 << 12);
  }
  append(values: ArrayLike<number>): void {
    if (this.length + values.length > this.data.length) {
      const next = this.make(Math.max(this.data.length * 2, this.length + values.length));
      next.set(this.data.subarray(0, this.length));
      this.data = next;
    }
    this.data.set(values, this.length);
    this.length += values.length;
  }
  toArray(): A {
    return this.data.slice(0, this.length) as A;
  }
}

/**
 * The consumer for datasets held whole (coefficients, cumulants, small
 * samples files): every batch of the source appended, each row's location
 * kept for messages, the digest of the bytes on disk.
 */
export async function readSourceTable(request: SourceRequest, onBytes?: (done: number, total: number) => void): Promise<SourceTable> {
  const source = await openSource(request);
  try {
    const columns = request.columns.map(() => new GrowingColumn((n) => new Float64Array(n)));
    const locations = new GrowingColumn((n) => new Uint32Array(n));
    for await (const batch of source.batches(onBytes)) {
      batch.values.forEach((v, i) => v && columns[i].append(v));
      locations.append(batch.locations);
    }
    const table = new Map<string, Float64Array>();
    request.columns.forEach((want, i) => {
      if (source.names[i] !== null) table.set(String(want.column), columns[i].toArray());
    });
    return {
      sha256: await source.sha256(),
      rows: locations.length,
      columns: table,
      lineOfRow: locations.toArray(),
      headers: source.available,
      format: source.format,
      located: source.located,
      units: source.units,
    };
  } finally {
    await source.close();
  }
}
