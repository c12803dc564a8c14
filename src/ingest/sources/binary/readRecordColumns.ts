import { DataError } from "../../../errors.ts";
import { RowProblems } from "../../parquet/rowProblems.ts";
import type { ByteStream } from "./byteStream.ts";
import { decodeColumn, type NumericType } from "./numericType.ts";

/** A stream of fixed-size records (rows of a table, or elements of one column). */
export interface RecordStream {
  stream: ByteStream;
  recordBytes: number;
}

/** One requested column: which stream holds it, at what offset within a record, as what type. */
export interface ColumnSource {
  /** The name messages use and the key of the batch's values. */
  column: string;
  stream: number;
  offset: number;
  type: NumericType;
}

/** One bounded slice of rows, in file order. */
export interface RecordBatch {
  rows: number;
  /** 0-based index of the batch's first row. */
  firstRow: number;
  values: Map<string, Float64Array>;
}

/** Bytes of records read at once over all streams: bounds memory whatever the row count. */
const BATCH_BYTES = 8 << 20;

/**
 * Stream `rows` rows of the requested numeric columns as doubles, in batches whose
 * records take at most about 8 MiB. Every value is checked (finite, integers within
 * 2^53); after the first bad value no batch is yielded, the rest is still read so that
 * all problems are counted, and one DataError lists the first ones (`label, row N,
 * column "c"`, rows from 1). A stream that ends early is reported by `describeEnd`
 * (which stream, how many whole records it gave).
 */
export async function* readRecordColumns(
  streams: RecordStream[],
  columns: ColumnSource[],
  rows: number,
  label: string,
  describeEnd: (stream: number, wholeRecords: number) => string,
  batchRows?: number,
): AsyncGenerator<RecordBatch> {
  const recordBytes = streams.reduce((sum, s) => sum + s.recordBytes, 0);
  const perBatch = batchRows ?? Math.max(1, Math.floor(BATCH_BYTES / Math.max(1, recordBytes)));
  const problems = new RowProblems(label);
  for (let first = 0; first < rows; first += perBatch) {
    const count = Math.min(perBatch, rows - first);
    const buffers: Uint8Array[] = [];
    for (const [i, s] of streams.entries()) {
      const bytes = await s.stream.read(count * s.recordBytes);
      if (bytes.length < count * s.recordBytes) throw new DataError(describeEnd(i, first + Math.floor(bytes.length / s.recordBytes)));
      buffers.push(bytes);
    }
    const values = new Map<string, Float64Array>();
    for (const [columnIndex, c] of columns.entries()) {
      const target = new Float64Array(count);
      const s = streams[c.stream];
      decodeColumn({ bytes: buffers[c.stream], offset: c.offset, stride: s.recordBytes, count, type: c.type, target, firstRow: first, columnIndex, column: c.column, problems });
      values.set(c.column, target);
    }
    if (problems.total === 0) yield { rows: count, firstRow: first, values };
  }
  if (problems.total > 0) throw problems.toError();
}
