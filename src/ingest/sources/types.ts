import type { ScanLayout } from "../fast/scanLines.ts";

/**
 * A source turns one data file of one format into numeric columns. Every
 * dataset kind reads through sources (src/ingest/sources/index.ts chooses one
 * by `format:` or by the file's extension), and one consumer per use takes
 * their batches: `readSourceTable` for whole columns (coefficients,
 * cumulants, small samples files), `samplesFromSource` for samples (exact
 * columns below the size threshold, the cell summary of src/ingest/reduce
 * above it). Adding a format is one module implementing `SourceModule` and
 * one line in the registry.
 */

/** A column a dataset needs: by name (a header, a Parquet column, an HDF5 path) or by 1-based position. */
export interface ColumnWant {
  /** What it is used for (shown in messages), e.g. "Q". */
  role: string;
  column: string | number;
  /** Absent optional columns are reported as null values, not refused. */
  optional?: boolean;
}

/** The dataset keys that say how a data file is laid out (audit.yaml, every dataset kind). */
export interface FileLayoutSettings {
  /** Format named in audit.yaml; detected from the extension when absent. */
  format?: string;
  /** Decimal separator of text formats ("comma" only with a non-comma delimiter). */
  decimal?: "point" | "comma";
  /** Whether a text file has a header row (default true; false needs columns by position). */
  header?: boolean;
  /** Lines before the table in a text file (an instrument's preamble), skipped. */
  skip_lines?: number;
  /** Container formats (HDF5, .npz): the table inside the file. */
  dataset?: string;
}

/** What a source is asked to open. */
export interface SourceRequest {
  /** The file on disk, already confined to the audit folder. */
  filePath: string;
  /** The file as messages name it (as written in audit.yaml, or the part's path for multi-part datasets). */
  label: string;
  /** The audit folder: a source checks that the file it opened really lies inside it. */
  auditDir: string;
  /** `audit.yaml datasets[i]`, for messages about the layout keys. */
  keyPath: string;
  columns: ColumnWant[];
  settings: FileLayoutSettings;
}

/** A bounded slice of rows, in file order. */
export interface ColumnBatch {
  rows: number;
  /** One array per requested column (request order), `rows` long; null for an absent optional column. */
  values: (Float64Array | null)[];
  /**
   * Where each row is, for messages: its line as an editor counts (text,
   * preamble and comments included) or its 1-based row/element (binary).
   */
  locations: ArrayLike<number>;
}

/** How a source's rows are located in messages: `file:line` or `file, row N`. */
export type Located = "line" | "row";

/**
 * The fast path of plain (uncompressed) delimited text: the data bytes can be
 * cut at line starts and scanned by several threads (src/ingest/reduce/parallelReduce.ts).
 */
export interface ByteRangePlan {
  /** The open descriptor the ranges are read from (nothing else is opened). */
  fd: number;
  dataStart: number;
  size: number;
  /** Lines up to the first data byte (preamble, header, comments). */
  headerLines: number;
  layout: ScanLayout;
}

/** An opened data file. */
export interface OpenSource {
  label: string;
  /** One phrase for the report: "semicolon-separated text, decimal comma, gzip-compressed". */
  format: string;
  located: Located;
  /** Each requested column's name as the file has it (request order), for messages; null when absent. */
  names: (string | null)[];
  /** Every column the file has (messages about missing columns list them). */
  available: string[];
  /** Bytes on disk, for the size threshold and progress. */
  byteSize: number;
  /**
   * The unit the file states for each requested column (request order; HDF5
   * `units` attributes) and the path that states it, null where none is
   * stated; absent for formats that state none.
   */
  units?: ({ unit: string; where: string } | null)[];
  /**
   * The rows in batches of bounded size. Cell problems are gathered over the
   * whole file and thrown as one DataError after the last batch (a consumer
   * must drain the iterator); no batch with a bad cell is handed out.
   */
  batches(onBytes?: (done: number, total: number) => void): AsyncIterable<ColumnBatch>;
  /** SHA-256 (hex) of the bytes on disk, read through the same descriptor; complete once the batches are drained. */
  sha256(): Promise<string>;
  /** Plain text only: the data as byte ranges for parallel scanning. */
  byteRanges?: ByteRangePlan;
  close(): Promise<void>;
}

/** One format. */
export interface SourceModule {
  /** The `format:` value(s) this module answers to. */
  formats: readonly string[];
  /** Whether a file name (compression suffix removed) is of this format when `format:` is absent. */
  detect(fileName: string): string | null;
  open(request: SourceRequest, format: string): Promise<OpenSource>;
}
