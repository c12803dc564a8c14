import fs from "node:fs";
import { DataError } from "../../errors.ts";
import { parquetInfo, readParquetColumns, readParquetTable } from "../parquet/index.ts";
import type { RowChunk } from "../fast/scanLines.ts";
import type { SampleRole } from "../samplesRows.ts";
import { formatRowProblems } from "../samplesRows.ts";
import { mergeCellTables } from "./cellTable.ts";
import { DEFAULT_CELL_CAPACITY, fieldsFromCells, reductionSpec, type ReducedFields, type ReduceInput } from "./reduceSamples.ts";
import { SamplesReducer } from "./samplesSink.ts";

/** `samples` files written by simulation codes as Parquet (same roles and units as CSV). */
export function isParquetFile(file: string): boolean {
  return /\.parquet$/i.test(file);
}

/** The requested columns of a whole Parquet file, rows numbered from 1. */
export async function readParquetRaw(input: ReduceInput): Promise<{ raw: Partial<Record<SampleRole, Float64Array>>; rows: number; lines: Uint32Array; sha256: string }> {
  const table = await readParquetTable(input.filePath, input.label, uniqueColumns(input));
  const raw: Partial<Record<SampleRole, Float64Array>> = {};
  for (const [role, column] of Object.entries(input.roles)) raw[role as SampleRole] = table.columns.get(column!);
  const lines = new Uint32Array(table.rows);
  for (let i = 0; i < table.rows; i++) lines[i] = i + 1;
  return { raw, rows: table.rows, lines, sha256: table.sha256 };
}

/**
 * A large Parquet file summarised into cells, one batch of rows at a time in
 * this thread (decoding, not the summary, is the cost here): the same cells,
 * grid and rules as for CSV (reduceSamples.ts), the grid chosen from the
 * first batch.
 */
export async function reduceSamplesParquet(
  input: ReduceInput,
  options: { cellCapacity?: number; onBytes?: (done: number, total: number) => void } = {},
): Promise<ReducedFields> {
  const columns = uniqueColumns(input);
  const info = await parquetInfo(input.filePath, input.label);
  const size = fs.statSync(input.filePath).size;
  let reducer: SamplesReducer | null = null;
  let rows = 0;
  for await (const batch of readParquetColumns(input.filePath, input.label, columns)) {
    const lines = new Uint32Array(batch.rows);
    for (let i = 0; i < batch.rows; i++) lines[i] = batch.firstRow + i + 1;
    const chunk: RowChunk = { rows: batch.rows, values: columns.map((c) => batch.values.get(c)!), lines };
    reducer ??= new SamplesReducer(reductionSpec(input, chunk, columns, options.cellCapacity ?? DEFAULT_CELL_CAPACITY));
    reducer.accept(chunk);
    rows += batch.rows;
    // Progress in bytes, estimated from the rows decoded (row groups are of similar size).
    options.onBytes?.(Math.round((rows / info.rows) * size), size);
  }
  if (reducer === null || rows === 0) throw new DataError(`${input.label}: the file has no rows`);
  if (reducer.rowProblems.count > 0) throw new DataError(formatRowProblems(input.label, reducer.rowProblems, "row"));
  // One sorted part: the merge hands it back as it is (no second table, no second sort).
  const merged = mergeCellTables(reducer.spec.grid, [reducer.table.exportSorted()]);
  return fieldsFromCells(input, reducer.spec, merged, rows, info.sha256, 1);
}

/** Each mapped column once, in the order audit.yaml maps them. */
function uniqueColumns(input: ReduceInput): string[] {
  return [...new Set(Object.values(input.roles) as string[])];
}
