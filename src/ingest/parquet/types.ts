/** One bounded slice of rows of the requested columns, in file order. */
export interface ParquetColumnBatch {
  rows: number;
  /** 0-based index of the batch's first row in the file. */
  firstRow: number;
  /** Values by requested column name, each of length `rows`. */
  values: Map<string, Float64Array>;
}

/** What the footer says about a file, and the SHA-256 of its bytes. */
export interface ParquetInfo {
  rows: number;
  /** Top-level column names, in schema order. */
  columns: string[];
  sha256: string;
}

/** Whole requested columns of a file. */
export interface ParquetTable {
  sha256: string;
  rows: number;
  columns: Map<string, Float64Array>;
}
