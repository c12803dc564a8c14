// Writes `samples` columns as a Parquet file for tests, benchmarks and demo scripts. It lives
// here, not in src/, because hyparquet-writer is a devDependency: the audit tool only reads Parquet.
import { parquetWriteFile } from "hyparquet-writer";
import type { CompressionCodec } from "hyparquet";
import type { Compressors } from "hyparquet-writer/src/types.js";

export interface WriteSamplesOptions {
  /** Rows per row group (default 2^20, as recent Arrow writers use). */
  rowGroupRows?: number;
  /** Page compression (default SNAPPY, hyparquet-writer's own); others need `compressors`. */
  codec?: CompressionCodec;
  compressors?: Compressors;
}

/**
 * Write equal-length double columns as REQUIRED (non-null) DOUBLE columns, in the given
 * key order. Parquet stores the IEEE 754 doubles as they are, so they read back exactly.
 */
export function writeSamplesParquet(filePath: string, columns: Record<string, Float64Array>, options: WriteSamplesOptions = {}): void {
  const names = Object.keys(columns);
  const rows = names.length ? columns[names[0]].length : 0;
  for (const name of names) {
    if (columns[name].length !== rows) throw new RangeError(`column "${name}" has ${columns[name].length} values, expected ${rows} like "${names[0]}"`);
  }
  parquetWriteFile({
    filename: filePath,
    columnData: names.map((name) => ({ name, data: columns[name], type: "DOUBLE" as const, nullable: false })),
    rowGroupSize: options.rowGroupRows ?? 1 << 20,
    codec: options.codec,
    compressors: options.compressors,
  });
}
