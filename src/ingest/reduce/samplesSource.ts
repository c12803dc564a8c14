import { DataError } from "../../errors.ts";
import { openSource } from "../sources/index.ts";
import { checkSummaryGrid, digestOfPart, inPartOrder, isSummaryPath, openSummary, type OpenSummary } from "../sources/summary/summarySource.ts";
import { SummaryPairs } from "../sources/summary/summaryPairs.ts";
import { partsDigest } from "../sources/parts.ts";
import { GrowingColumn } from "../sources/readSourceTable.ts";
import type { Located, OpenSource, SourceRequest } from "../sources/types.ts";
import type { RowChunk } from "../fast/scanLines.ts";
import { RowProblemsError, type SampleRole, type SampleRoles } from "../samplesRows.ts";
import { mergeCellTables, type CellTableData } from "./cellTable.ts";
import { PARTS } from "./parallelReduce.ts";
import { partsThreads, readPart, readPartsOnWorkers, type PartJob, type PartRead } from "./parallelParts.ts";
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
  /** Use worker threads for large plain text files and for the parts of a dataset (default true; false gives the same result in this thread). */
  threads?: boolean;
  /**
   * Worker threads reading the parts of a multi-part dataset (parallelParts.ts):
   * given, it is used whatever the parts' sizes (1: one after another in this
   * thread); by default TRANSPORT_AUDIT_PARTS_THREADS, else one a core (at most
   * four) for datasets of PARALLEL_PARTS_FROM_BYTES or more. The result is the same.
   */
  partsThreads?: number;
  /** Bytes of the file processed so far, and its size. */
  onBytes?: (done: number, total: number) => void;
  /**
   * Summarise on the grid the dataset's configuration alone gives
   * (`configurationSpec`), not on one chosen from the first rows: for
   * datasets of parts, whose parts may be summarised apart (summarise).
   */
  configurationGrid?: boolean;
}

/** One part summarised: its cell tables (unmerged, in range order), rows, digest, pieces and the spec used. */
export interface PartCells {
  tables: CellTableData[];
  rows: number;
  sha256: string;
  pieces: number;
  spec: SamplesReductionSpec;
}

/**
 * The one consumer of `samples` sources, for a file or the parts of a
 * multi-part dataset (`requests` in file order). Below the size threshold
 * (all parts together) every row is kept: each part through `exact` with its
 * own label, then concatenated. Above it the cell summary: one grid for all
 * parts (chosen from the first part's first rows, or from the configuration
 * alone with `configurationGrid`), each part's cells from byte ranges scanned
 * by worker threads where the source offers them (plain text), else from its
 * batches, and the parts' tables merged (exact, in part order). Every part
 * must have the first part's columns. A part may be a summary written by
 * `summarise` (`<part>.summary`): its cells are merged where the part's
 * would be, after its grid is checked against the configuration's; a raw
 * part beside its own summary is only hashed and must have the digest the
 * summary records; the same part twice (raw and summarised under another
 * name, or two summaries of it) is refused. A dataset with summaries is
 * always summarised.
 */
export async function readSamplesSource(
  requests: SourceRequest[],
  input: Omit<ReduceInput, "roles">,
  exact: ExactFields,
  options: SamplesReadOptions & { partBytes?: number[] } = {},
): Promise<{ fields: ReducedFields; format: string }> {
  requests = inPartOrder(requests);
  const openPart = (r: SourceRequest): Promise<OpenSource | OpenSummary> => (isSummaryPath(r.filePath) ? Promise.resolve(openSummary(r)) : openSource(r));
  let source = await openPart(requests[0]);
  const first = { label: requests[0].label, available: source.available };
  const format = source.format;
  // Roles named by the file's own column names (positions become names like "2" without a header).
  const { roles, wantOfRole } = rolesOfSource(requests[0], source);
  const full: ReduceInput = { ...input, roles };
  const total = options.partBytes ? options.partBytes.reduce((a, b) => a + b, 0) : source.byteSize;
  const summaries = requests.filter((r) => isSummaryPath(r.filePath)).length;
  const large = summaries > 0 || total > (options.reduceAboveBytes ?? REDUCE_ABOVE_BYTES);
  const exactParts: ReducedFields[] = [];
  const tables: CellTableData[] = [];
  const digests: string[] = [];
  const capacity = options.cellCapacity ?? DEFAULT_CELL_CAPACITY;
  let spec: SamplesReductionSpec | null = large && (options.configurationGrid || summaries > 0) ? configurationSpec(full, wantOfRole, capacity) : null;
  const check = new SummaryPairs(requests);
  let rows = 0;
  let pieces = 0;
  /** Every part must have the first part's columns and format. */
  const checkLikeFirst = (k: number, available: string[], partFormat: string) => {
    const label = requests[k].label;
    if (k > 0 && available.join("\u0000") !== first.available.join("\u0000")) {
      throw new DataError(
        `${label}: its columns (${quoted(available)}) differ from those of ${first.label} (${quoted(first.available)}); every part of a multi-part dataset needs the same columns`,
      );
    }
    if (k > 0 && partFormat !== format) {
      throw new DataError(`${label}: is ${partFormat}, but ${first.label} is ${format}; every part of a multi-part dataset has one format`);
    }
  };
  const takeRows = (k: number, read: SamplesRows) => {
    exactParts.push(exact({ ...full, label: requests[k].label }, read));
    digests.push(read.sha256);
  };
  const takeCells = (k: number, done: PartCells) => {
    spec = done.spec;
    check.rawRead(requests[k], done.sha256);
    tables.push(...done.tables);
    rows += done.rows;
    pieces += done.pieces;
    digests.push(done.sha256);
  };
  const threads = summaries === 0 && (!large || spec !== null) ? partsThreads(requests.length, total, options) : 1;
  if (threads >= 2) {
    // Raw parts only, on a grid known before any is read: every part is read alike, on the workers (part 0 too).
    await source.close();
    const job = (k: number): PartJob => ({ request: requests[k], mode: large ? "cells" : "rows", part: { ...full, label: requests[k].label }, wantOfRole, spec, cellCapacity: options.cellCapacity });
    const jobs = requests.map((_, k) => job(k));
    const sizes = options.partBytes ?? requests.map(() => 0);
    let bytesRead = 0;
    const reads = await readPartsOnWorkers(jobs, threads, (k) => options.onBytes?.((bytesRead += sizes[k]), total));
    for (let k = 0; k < requests.length; k++) {
      // A part no worker read (it failed there) is read here: its error is then the sequential reading's own.
      const read: PartRead = reads[k] ?? (await readPart(jobs[k], (available, partFormat) => checkLikeFirst(k, available, partFormat)));
      checkLikeFirst(k, read.available, read.format);
      if (read.rows) takeRows(k, read.rows);
      else takeCells(k, read.cells!);
    }
  } else {
    for (let k = 0; k < requests.length; k++) {
      if (k > 0) source = await openPart(requests[k]);
      try {
        checkLikeFirst(k, source.available, source.format);
        if ("summary" in source) {
          const { summary } = source;
          const label = requests[k].label;
          checkSummaryGrid(summary, spec!, label);
          check.summaryRead(requests[k], summary.source.sha256);
          tables.push(...summary.tables);
          rows += summary.rows;
          pieces += summary.pieces;
          digests.push(await source.sha256());
          continue;
        }
        if (check.hasSummary(requests[k])) {
          // Its summary, next in part order, supplies the cells; the part is only hashed, to be compared.
          const sha256 = await digestOfPart(requests[k]);
          check.rawRead(requests[k], sha256);
          digests.push(sha256);
          continue;
        }
        if (!large) takeRows(k, await wholeRows(source, requests[k]));
        else takeCells(k, await reducePart({ ...full, label: requests[k].label }, source, wantOfRole, spec, options));
      } finally {
        await source.close();
      }
    }
  }
  const sha256 = requests.length === 1 ? digests[0] : partsDigest(requests.map((r, k) => ({ path: r.label, sha256: digests[k] })));
  if (!large) return { fields: { ...concatFields(exactParts), sha256 }, format };
  const merged = mergeCellTables(spec!.grid, tables);
  const from = summaries === 0 ? "" : requests.length === 1 ? ", from its summary (transport-audit summarise)" : `, ${summaries} of them from summaries (transport-audit summarise)`;
  return { fields: fieldsFromCells(full, spec!, merged, rows, sha256, pieces), format: format + from };
}

/**
 * The grid of a dataset that is read in parts: a function of its
 * configuration alone (the mapped columns, the work declaration, the
 * energy unit and the reservoirs' affinities), so that parts summarised on
 * different machines, and the same parts read raw, share it and merge cell
 * by cell. It is the grid reductionSpec chooses when it has no rows to look
 * at: Σ and β̄W on 2^-12 k_B, counts exact (widening only past MAX_LEVEL),
 * Q (a key only at equal temperatures) on 2^-24 of the energy unit, start
 * level 0 (the table climbs as it fills).
 */
export function configurationSpec(input: ReduceInput, slotOfRole: Partial<Record<SampleRole, number>>, capacity = DEFAULT_CELL_CAPACITY): SamplesReductionSpec {
  return reductionSpec(input, null, slotOfRole, capacity);
}

/**
 * One raw part summarised into cells: byte ranges on worker threads where
 * the source offers them, else its batches in this thread; on `spec`'s grid
 * when given, else on one chosen from the part's first rows.
 */
export async function reducePart(
  part: ReduceInput,
  source: OpenSource,
  wantOfRole: Partial<Record<SampleRole, number>>,
  spec: SamplesReductionSpec | null,
  options: SamplesReadOptions,
): Promise<PartCells> {
  const plan = source.byteRanges;
  if (plan) {
    const slotOfPlanRole: Partial<Record<SampleRole, number>> = {};
    for (const [role, name] of Object.entries(part.roles)) slotOfPlanRole[role as SampleRole] = plan.layout.slotNames.indexOf(name!);
    const chosen = spec ?? byteRangeSpec(part, plan, slotOfPlanRole, options.cellCapacity ?? DEFAULT_CELL_CAPACITY);
    const done = await reduceByteRanges(plan, { ...chosen, label: part.label, slotOfRole: slotOfPlanRole }, () => source.sha256(), options);
    if (done) return { ...done, pieces: PARTS, spec: chosen };
    spec = chosen;
  }
  return { ...(await reduceBatches(part, source, wantOfRole, spec, options)), pieces: 1 };
}

/** The roles of a dataset named by a part's own column names, and each role's place in the request. */
export function rolesOfSource(request: SourceRequest, source: Pick<OpenSource, "names">): { roles: SampleRoles; wantOfRole: Partial<Record<SampleRole, number>> } {
  const roles: SampleRoles = {};
  const wantOfRole: Partial<Record<SampleRole, number>> = {};
  request.columns.forEach((want, i) => {
    roles[want.role as SampleRole] = source.names[i]!;
    wantOfRole[want.role as SampleRole] = i;
  });
  return { roles, wantOfRole };
}
function quoted(names: string[]): string {
  return names.map((n) => `"${n}"`).join(", ");
}

/** Every row of a source, as raw columns by role. */
export async function wholeRows(source: OpenSource, request: SourceRequest): Promise<SamplesRows> {
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
): Promise<Omit<PartCells, "pieces">> {
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
    leadParticles: parts.every((p) => p.leadParticles) ? { A: cat((p) => p.leadParticles!.A)!, B: cat((p) => p.leadParticles!.B)! } : null,
    // Σ_res and the labels of every part: the states (p from all start states) are formed on the whole.
    stateRows: parts.every((p) => p.stateRows)
      ? { start: cat((p) => p.stateRows!.start)!, end: cat((p) => p.stateRows!.end)!, sigmaReservoirs: cat((p) => p.stateRows!.sigmaReservoirs)! }
      : null,
  };
}
