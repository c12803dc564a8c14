import { DataError } from "../../errors.ts";
import { openSource } from "../sources/index.ts";
import { GrowingColumn } from "../sources/readSourceTable.ts";
import type { Located, OpenSource, SourceRequest } from "../sources/types.ts";
import type { RowChunk } from "../fast/scanLines.ts";
import { formatRowProblems, type SampleRole, type SampleRoles } from "../samplesRows.ts";
import { mergeCellTables } from "./cellTable.ts";
import { DEFAULT_CELL_CAPACITY, fieldsFromCells, reduceByteRanges, REDUCE_ABOVE_BYTES, reductionSpec, type ReducedFields, type ReduceInput } from "./reduceSamples.ts";
import { SamplesReducer } from "./samplesSink.ts";

/** A `samples` file as read: whole raw columns (declared units) with each row's location, or already summarised into cells. */
export type SamplesRead =
  | { kind: "rows"; raw: Partial<Record<SampleRole, Float64Array>>; rows: number; lines: ArrayLike<number>; sha256: string; located: Located }
  | { kind: "cells"; fields: ReducedFields };

/** How a `samples` file is read: whole, or (large files) reduced to cells while streaming. */
export interface SamplesReadOptions {
  /** Files larger than this are reduced to cells (reduceSamples.ts); default REDUCE_ABOVE_BYTES. */
  reduceAboveBytes?: number;
  /** Most cells a reduced dataset keeps; default DEFAULT_CELL_CAPACITY. */
  cellCapacity?: number;
  /** Use worker threads for large plain text files (default true; false gives the same result in this thread). */
  threads?: boolean;
  /** Bytes of the file processed so far, and its size. */
  onBytes?: (done: number, total: number) => void;
}

/**
 * The one consumer of `samples` sources: below the size threshold every
 * row's raw columns; above it the cell summary, from byte ranges scanned by
 * worker threads where the source offers them (plain text), else from its
 * batches in this thread (any format). `input` lacks the roles' names in
 * the file until the source is open; they are filled in here.
 */
export async function readSamplesSource(
  request: SourceRequest,
  input: Omit<ReduceInput, "roles">,
  options: SamplesReadOptions = {},
): Promise<{ read: SamplesRead; format: string; input: ReduceInput }> {
  const source = await openSource(request);
  try {
    // Roles named by the file's own column names (positions become names like "2" without a header).
    const named: SampleRoles = {};
    const slotOfRole: Partial<Record<SampleRole, number>> = {};
    request.columns.forEach((want, i) => {
      named[want.role as SampleRole] = source.names[i]!;
      slotOfRole[want.role as SampleRole] = i;
    });
    const full: ReduceInput = { ...input, roles: named };
    const large = source.byteSize > (options.reduceAboveBytes ?? REDUCE_ABOVE_BYTES);
    if (!large) return { read: await wholeRows(source, request), format: source.format, input: full };
    const plan = source.byteRanges;
    if (plan) {
      const slotOfPlanRole: Partial<Record<SampleRole, number>> = {};
      for (const [role, name] of Object.entries(named)) slotOfPlanRole[role as SampleRole] = plan.layout.slotNames.indexOf(name!);
      const fields = await reduceByteRanges(full, plan, slotOfPlanRole, () => source.sha256(), options);
      if (fields !== null) return { read: { kind: "cells", fields }, format: source.format, input: full };
    }
    return { read: { kind: "cells", fields: await reduceBatches(full, source, slotOfRole, options) }, format: source.format, input: full };
  } finally {
    await source.close();
  }
}

/** Every row of a source, as raw columns by role. */
async function wholeRows(source: OpenSource, request: SourceRequest): Promise<SamplesRead> {
  const columns = request.columns.map(() => new GrowingColumn((n) => new Float64Array(n)));
  const lines = new GrowingColumn((n) => new Uint32Array(n));
  for await (const batch of source.batches()) {
    batch.values.forEach((v, i) => v && columns[i].append(v));
    lines.append(batch.locations);
  }
  const raw: Partial<Record<SampleRole, Float64Array>> = {};
  request.columns.forEach((want, i) => (raw[want.role as SampleRole] = columns[i].toArray()));
  return { kind: "rows", raw, rows: lines.length, lines: lines.toArray(), sha256: await source.sha256(), located: source.located };
}

/**
 * A large file of any format summarised into cells one batch at a time in
 * this thread: the same cells, grid and rules as the parallel path, the grid
 * chosen from the first batch.
 */
async function reduceBatches(input: ReduceInput, source: OpenSource, slotOfRole: Partial<Record<SampleRole, number>>, options: SamplesReadOptions): Promise<ReducedFields> {
  let reducer: SamplesReducer | null = null;
  let rows = 0;
  for await (const batch of source.batches(options.onBytes)) {
    const chunk: RowChunk = { rows: batch.rows, values: batch.values as Float64Array[], lines: batch.locations as Uint32Array };
    reducer ??= new SamplesReducer(reductionSpec(input, chunk, slotOfRole, options.cellCapacity ?? DEFAULT_CELL_CAPACITY));
    reducer.accept(chunk);
    rows += batch.rows;
  }
  if (reducer === null || rows === 0) throw new DataError(`${input.label}: the file has no rows`);
  if (reducer.rowProblems.count > 0) throw new DataError(formatRowProblems(input.label, reducer.rowProblems, source.located));
  // One sorted part: the merge hands it back as it is (no second table, no second sort).
  const merged = mergeCellTables(reducer.spec.grid, [reducer.table.exportSorted()]);
  return fieldsFromCells(input, reducer.spec, merged, rows, await source.sha256(), 1);
}
