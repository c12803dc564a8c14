import { openParquet, type OpenParquet } from "./openParquet.ts";
import { requireNumericColumns } from "./numericColumns.ts";
import { planReads } from "./planReads.ts";
import { readRowRange } from "./readRowRange.ts";
import { RowProblems } from "./rowProblems.ts";
import { pageCheckingBuffer } from "./pageChecksums.ts";
import type { ParquetColumnBatch } from "./types.ts";

/** Rows per batch unless asked otherwise: 2^20 rows, 8 MiB per double column. */
export const DEFAULT_BATCH_ROWS = 1 << 20;

/**
 * Stream the requested numeric columns as doubles, in file order, in batches of at most
 * `batchRows` rows (see planReads for what bounds memory). Columns are checked before
 * any row is read. Every cell is checked: once a bad cell (null, NaN, ±Infinity, an
 * integer beyond 2^53) is found no further batch is yielded, the rest of the file is
 * still scanned so that all problems are counted, and one DataError lists the first
 * ones (rows counted from 1). A page whose header records a CRC-32 is checked against it
 * before it is decoded (pageChecksums.ts). A consumer that stops early closes the file.
 */
export async function* readParquetColumns(
  filePath: string,
  label: string,
  columns: string[],
  options: { batchRows?: number } = {},
): AsyncGenerator<ParquetColumnBatch> {
  yield* readOpenParquetColumns(await openParquet(filePath, label), label, columns, options);
}

/** readParquetColumns over a file already opened (its footer read); closes it at the end. */
export async function* readOpenParquetColumns(
  open: OpenParquet,
  label: string,
  columns: string[],
  options: { batchRows?: number } = {},
): AsyncGenerator<ParquetColumnBatch> {
  const batchRows = options.batchRows ?? DEFAULT_BATCH_ROWS;
  const wanted = [...new Set(columns)];
  // Everything that can refuse sits inside the try: a refused call must close the file
  // it was handed (Node 26 ends the process when a FileHandle is left to the collector).
  try {
    if (!Number.isSafeInteger(batchRows) || batchRows < 1) throw new RangeError(`batchRows must be a positive integer, got ${batchRows}`);
    requireNumericColumns(open.metadata, label, wanted);
    const problems = new RowProblems(label);
    const checked = { metadata: open.metadata, file: pageCheckingBuffer(open.file, open.metadata, wanted, label) };
    for (const range of planReads(open.metadata, wanted, batchRows)) {
      const values = await readRowRange(checked, label, wanted, range, problems);
      if (problems.total > 0) continue;
      for (let first = range.start; first < range.end; first += batchRows) {
        const last = Math.min(range.end, first + batchRows);
        const slice = new Map<string, Float64Array>();
        for (const [column, data] of values) slice.set(column, data.subarray(first - range.start, last - range.start));
        yield { rows: last - first, firstRow: first, values: slice };
      }
    }
    if (problems.total > 0) throw problems.toError();
  } finally {
    await open.file.close();
  }
}
