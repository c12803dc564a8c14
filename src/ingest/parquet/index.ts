export type { ParquetColumnBatch, ParquetInfo, ParquetTable } from "./types.ts";
export { parquetInfo } from "./parquetInfo.ts";
export { readParquetColumns, DEFAULT_BATCH_ROWS } from "./readParquetColumns.ts";
export { readParquetTable } from "./readParquetTable.ts";
