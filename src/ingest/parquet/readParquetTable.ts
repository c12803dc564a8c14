import { parquetInfo } from "./parquetInfo.ts";
import { readParquetColumns } from "./readParquetColumns.ts";
import type { ParquetTable } from "./types.ts";

/**
 * Whole requested columns at once, for files that fit in memory; the same checks and
 * messages as readParquetColumns, plus the SHA-256 of the file.
 */
export async function readParquetTable(filePath: string, label: string, columns: string[]): Promise<ParquetTable> {
  const { rows, sha256 } = await parquetInfo(filePath, label);
  const wanted = [...new Set(columns)];
  const out = new Map(wanted.map((c) => [c, new Float64Array(rows)]));
  for await (const batch of readParquetColumns(filePath, label, wanted)) {
    for (const [column, data] of batch.values) out.get(column)!.set(data, batch.firstRow);
  }
  return { sha256, rows, columns: out };
}
