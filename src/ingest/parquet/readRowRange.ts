import { parquetRead, type AsyncBuffer, type ColumnData } from "hyparquet";
import { compressors } from "hyparquet-compressors";
import { DataError } from "../../errors.ts";
import type { OpenParquet } from "./openParquet.ts";
import { copyAsDoubles, type RowProblems } from "./rowProblems.ts";
import { PageChecksumMismatch } from "./pageChecksums.ts";

/** A half-open range of 0-based file rows, decoded in one call. */
export interface RowRange {
  start: number;
  end: number;
}

/**
 * Decode rows [start, end) of the requested columns as doubles. hyparquet hands over
 * whole pages, which may reach outside the range, so each chunk is clipped to it. Bad
 * cells go to `problems`; the values returned for them are meaningless. `open.file` is
 * the page-checking buffer (pageChecksums.ts), whose refusal passes through unchanged.
 */
export async function readRowRange(
  open: Pick<OpenParquet, "metadata"> & { file: AsyncBuffer },
  label: string,
  columns: readonly string[],
  range: RowRange,
  problems: RowProblems,
): Promise<Map<string, Float64Array>> {
  const { start, end } = range;
  const values = new Map(columns.map((c) => [c, new Float64Array(end - start)]));
  const filled = new Map(columns.map((c) => [c, 0]));
  const columnIndex = new Map(columns.map((c, i) => [c, i]));
  let callbackError: unknown;

  // hyparquet calls onChunk from a promise callback whose failure nobody awaits, so
  // nothing may throw in here: a failure is kept and rethrown after the read.
  const onChunk = (chunk: ColumnData): void => {
    try {
      const target = values.get(chunk.columnName);
      if (!target) return;
      const from = Math.max(start, chunk.rowStart);
      const to = Math.min(end, chunk.rowEnd);
      if (from >= to) return;
      const offset = chunk.rowStart;
      copyAsDoubles(chunk.columnData, from - offset, to - offset, {
        target,
        at: from - start,
        firstRow: from,
        columnIndex: columnIndex.get(chunk.columnName)!,
        column: chunk.columnName,
        problems,
      });
      filled.set(chunk.columnName, filled.get(chunk.columnName)! + (to - from));
    } catch (err) {
      callbackError ??= err;
    }
  };

  try {
    await parquetRead({
      file: open.file,
      metadata: open.metadata,
      columns: [...columns],
      rowStart: start,
      rowEnd: end,
      onChunk,
      compressors,
      // With an offset index (page locations) hyparquet fetches only the pages that
      // overlap the range, so a large row group can be read in bounded slices.
      useOffsetIndex: true,
    });
  } catch (err) {
    if (err instanceof PageChecksumMismatch) throw err;
    throw new DataError(`${label}: cannot decode rows ${start + 1}–${end} of the Parquet file (${(err as Error).message}); the file may be damaged`);
  }
  if (callbackError) throw callbackError;
  for (const column of columns) {
    const got = filled.get(column)!;
    if (got !== end - start) {
      throw new DataError(`${label}: the Parquet file is damaged: column "${column}" holds ${got} values in rows ${start + 1}–${end}, where the footer promises ${end - start}`);
    }
  }
  return values;
}
