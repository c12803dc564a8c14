import { DataError } from "../../errors.ts";
import { openSource } from "../sources/index.ts";
import { partsDigest } from "../sources/parts.ts";
import { GrowingColumn } from "../sources/readSourceTable.ts";
import type { Located, OpenSource, SourceRequest } from "../sources/types.ts";
import type { RowChunk } from "../fast/scanLines.ts";
import { RowProblemsError, type SampleRole, type SampleRoles } from "../samplesRows.ts";
import { mergeCellTables, type CellTableData } from "./cellTable.ts";
import { PARTS } from "./parallelReduce.ts";
import { byteRangeSpec, DEFAULT_CELL_CAPACITY, fieldsFromCells, reduceByteRanges, REDUCE_ABOVE_BYTES, reductionSpec, type ReducedFields, type ReduceInput } from "./reduceSamples.ts";
import { SamplesReducer, type SamplesReductionSpec } from "./samplesSink.ts";

/** A `samples` file (or one part) read whole: raw columns (declared units) with each row's location. */
export interface SamplesRows {
  raw: Partial<Record<SampleRole, Float64Array>>;
  rows: number;
  lines: ArrayLike<number>;
  sha256: string;
  located: Located;
}

/** The dataset's arrays from whole rows: the role rules of src/ingest/samples.ts, given the messages' label. */
export type ExactFields = (input: ReduceInput, rows: SamplesRows) => ReducedFields;

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
 * The one consumer of `samples` sources, for a file or the parts of a
 * multi-part dataset (`requests` in file order). Below the size threshold
 * (all parts together) every row is kept: each part through `exact` with its
 * own label, then concatenated. Above it the cell summary: one grid for all
 * parts (chosen from the first part's first rows), each part's cells from
 * byte ranges scanned by worker threads where the source offers them (plain
 * text), else from its batches, and the parts' tables merged (exact, in
 * part order). Every part must have the first part's columns.
 */
export async function readSamplesSource(
  requests: SourceRequest[],
  input: Omit<ReduceInput, "roles">,
  exact: ExactFields,
  options: SamplesReadOptions & { partBytes?: number[] } = {},
): Promise<{ fields: ReducedFields; format: string }> {
  let source = await openSource(requests[0]);
  const first = { label: requests[0].label, available: source.available };
  const format = source.format;
  // Roles named by the file's own column names (positions become names like "2" without a header).
  const roles: SampleRoles = {};
  const wantOfRole: Partial<Record<SampleRole, number>> = {};
  requests[0].columns.forEach((want, i) => {
    roles[want.role as SampleRole] = source.names[i]!;
    wantOfRole[want.role as SampleRole] = i;
  });
  const full: ReduceInput = { ...input, roles };
  const total = options.partBytes ? options.partBytes.reduce((a, b) => a + b, 0) : source.byteSize;
  const large = total > (options.reduceAboveBytes ?? REDUCE_ABOVE_BYTES);
  const exactParts: ReducedFields[] = [];
  const tables: CellTableData[] = [];
  const digests: string[] = [];
  let spec: SamplesReductionSpec | null = null;
  let rows = 0;
  let pieces = 0;
  for (let k = 0; k < requests.length; k++) {
    if (k > 0) source = await openSource(requests[k]);
    try {
      const label = requests[k].label;
      if (k > 0 && source.available.join("\u0000") !== first.available.join("\u0000")) {
        throw new DataError(
          `${label}: its columns (${quoted(source.available)}) differ from those of ${first.label} (${quoted(first.available)}); every part of a multi-part dataset needs the same columns`,
        );
      }
      if (k > 0 && source.format !== format) {
        throw new DataError(`${label}: is ${source.format}, but ${first.label} is ${format}; every part of a multi-part dataset has one format`);
      }
      const part = { ...full, label };
      if (!large) {
        const read = await wholeRows(source, requests[k]);
        exactParts.push(exact(part, read));
        digests.push(read.sha256);
        continue;
      }
      const plan = source.byteRanges;
      let done: { tables: CellTableData[]; rows: number; sha256: string } | null = null;
      if (plan) {
        const slotOfPlanRole: Partial<Record<SampleRole, number>> = {};
        for (const [role, name] of Object.entries(roles)) slotOfPlanRole[role as SampleRole] = plan.layout.slotNames.indexOf(name!);
        spec ??= byteRangeSpec(part, plan, slotOfPlanRole, options.cellCapacity ?? DEFAULT_CELL_CAPACITY);
        done = await reduceByteRanges(plan, { ...spec, label, slotOfRole: slotOfPlanRole }, () => source.sha256(), options);
        if (done) pieces += PARTS;
      }
      if (done === null) {
        const reduced = await reduceBatches(part, source, wantOfRole, spec, options);
        spec = reduced.spec;
        done = reduced;
        pieces += 1;
      }
      tables.push(...done.tables);
      rows += done.rows;
      digests.push(done.sha256);
    } finally {
      await source.close();
    }
  }
  const sha256 = requests.length === 1 ? digests[0] : partsDigest(requests.map((r, k) => ({ path: r.label, sha256: digests[k] })));
  if (!large) return { fields: { ...concatFields(exactParts), sha256 }, format };
  const merged = mergeCellTables(spec!.grid, tables);
  return { fields: fieldsFromCells(full, spec!, merged, rows, sha256, pieces), format };
}

function quoted(names: string[]): string {
  return names.map((n) => `"${n}"`).join(", ");
}

/** Every row of a source, as raw columns by role. */
async function wholeRows(source: OpenSource, request: SourceRequest): Promise<SamplesRows> {
  const columns = request.columns.map(() => new GrowingColumn((n) => new Float64Array(n)));
  const lines = new GrowingColumn((n) => new Uint32Array(n));
  for await (const batch of source.batches()) {
    batch.values.forEach((v, i) => v && columns[i].append(v));
    lines.append(batch.locations);
  }
  const raw: Partial<Record<SampleRole, Float64Array>> = {};
  request.columns.forEach((want, i) => (raw[want.role as SampleRole] = columns[i].toArray()));
  return { raw, rows: lines.length, lines: lines.toArray(), sha256: await source.sha256(), located: source.located };
}

/**
 * A file of any format summarised into cells one batch at a time in this
 * thread: the same cells, grid and rules as the parallel path; the grid is
 * `spec`'s when one exists (an earlier part chose it), else chosen from the
 * first batch. Batches are laid out in the spec's slots.
 */
async function reduceBatches(
  input: ReduceInput,
  source: OpenSource,
  wantOfRole: Partial<Record<SampleRole, number>>,
  spec: SamplesReductionSpec | null,
  options: SamplesReadOptions,
): Promise<{ tables: CellTableData[]; rows: number; sha256: string; spec: SamplesReductionSpec }> {
  let reducer: SamplesReducer | null = spec ? new SamplesReducer({ ...spec, label: input.label }) : null;
  let rows = 0;
  for await (const batch of source.batches(options.onBytes)) {
    const inSlots = (slotOfRole: Partial<Record<SampleRole, number>>): RowChunk => {
      const values: Float64Array[] = [];
      for (const [role, slot] of Object.entries(slotOfRole)) values[slot!] = batch.values[wantOfRole[role as SampleRole]!]!;
      return { rows: batch.rows, values, lines: batch.locations as Uint32Array };
    };
    reducer ??= new SamplesReducer(reductionSpec(input, inSlots(wantOfRole), wantOfRole, options.cellCapacity ?? DEFAULT_CELL_CAPACITY));
    reducer.accept(inSlots(reducer.spec.slotOfRole));
    rows += batch.rows;
  }
  if (reducer === null || rows === 0) throw new DataError(`${input.label}: the file has no rows`);
  if (reducer.rowProblems.count > 0) throw new RowProblemsError(input.label, reducer.rowProblems, source.located);
  return { tables: [reducer.table.exportSorted()], rows, sha256: await source.sha256(), spec: reducer.spec };
}

/** The dataset's arrays of several parts read whole, one after the other (part order is file order). */
function concatFields(parts: ReducedFields[]): ReducedFields {
  if (parts.length === 1) return parts[0];
  const cat = (pick: (p: ReducedFields) => Float64Array | null): Float64Array | null => {
    if (parts.some((p) => pick(p) === null)) return null;
    const out = new Float64Array(parts.reduce((a, p) => a + pick(p)!.length, 0));
    let at = 0;
    for (const p of parts) {
      out.set(pick(p)!, at);
      at += pick(p)!.length;
    }
    return out;
  };
  const weight = parts.some((p) => p.weight !== null)
    ? cat((p) => p.weight ?? new Float64Array(p.rows).fill(1))
    : null;
  return {
    sha256: "",
    rows: parts.reduce((a, p) => a + p.rows, 0),
    W: cat((p) => p.W)!,
    W_data: cat((p) => p.W_data),
    Q: cat((p) => p.Q)!,
    dN: cat((p) => p.dN)!,
    dE_A: cat((p) => p.dE_A),
    dE_B: cat((p) => p.dE_B),
    weight,
    realisations: parts.reduce((a, p) => a + p.realisations, 0),
    sigma: cat((p) => p.sigma)!,
    reduction: null,
  };
}
