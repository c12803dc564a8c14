import fs from "node:fs";
import { DataError, newProblemLog } from "../../errors.ts";
import type { ByteRangePlan } from "../sources/types.ts";
import type { Affinities } from "../../physics/affinities.ts";
import { entropyProduction } from "../../physics/entropyProduction.ts";
import type { RowChunk, ScanLayout } from "../fast/scanLines.ts";
import { scanFileRange } from "../fast/scanRange.ts";
import type { SampleRole, SampleRoles } from "../samplesRows.ts";
import type { SamplesDataset, SamplesReduction } from "../types.ts";
import { columnLevel, MAX_LEVEL, type CellTableData } from "./cellTable.ts";
import { reduceInParts, workerBundle } from "./parallelReduce.ts";
import { reducedColumns, type KeyColumn, type SampleColumn, type SamplesReductionSpec } from "./samplesSink.ts";
import { integerPower, log } from "../../math/index.ts";

/**
 * Files above this size are summarised while they are read instead of being
 * held row by row. 64 MB of CSV is about 2–3 million realisations: below it the
 * checks' own work on raw rows takes seconds; above it, memory and time grow
 * with the file while the summary does not.
 */
export const REDUCE_ABOVE_BYTES = 64 << 20;

/**
 * Most cells a summary keeps. The checks' work grows with the number of cells
 * and so does the cost of the table itself (cache misses); 2^18 cells keep Σ
 * and β̄W cells at most 0.06 k_B wide for 10^8 realisations of the benchmark's
 * law, with the checks taking a second or two.
 */
export const DEFAULT_CELL_CAPACITY = 1 << 18;

/**
 * Widest Σ (and β̄W) cells at which the exact relations are still tested
 * without qualification. Pooling shifts a cell's averages by about a twelfth
 * of its width squared; at 0.06 k_B that is below 1e-3 k_B, under a standard
 * error at 10^8 realisations of the benchmark (measured: a cell width of
 * 0.178 k_B made the weighted identity fail there, 0.059 k_B and 0.020 k_B
 * passed with the same result). Past it, a failure of a relation that pooling
 * can fake is reported as inconclusive (src/report/runAudit.ts).
 */
export const FAITHFUL_CELL_WIDTH = 0.06;

/**
 * The finest cell width of a continuous column, relative to the largest value
 * seen at the start of the file: 2^-24 (6e-8) is below the printed resolution
 * of any measured or simulated energy, so at the finest level distinct values
 * stay in distinct cells.
 */
const FINEST_RELATIVE_STEP = integerPower(2, -24);

/**
 * Finest cell width of Σ and of β̄W, k_B: 2^-12 ≈ 2.4e-4, far below the
 * statistical resolution of any relation tested on them.
 */
const SIGMA_STEP = integerPower(2, -12);

/**
 * Where Q is a key column of its own (a_Q = 0), it widens first, up to this
 * level, and Σ's cells only after it: 3^13 ≈ 1.6e6 finest steps, cells of
 * about a tenth of Q's largest value at the start of the file.
 */
const TRANSVERSE_MAX_LEVEL = 13;

/**
 * A count column widens with Σ when the probe alone shows more than
 * capacity / MANY_COUNTS_FRACTION distinct counts (4096 at the default
 * capacity): a file ~200 times the probe's length could then hold more
 * distinct counts than the table has cells.
 */
const MANY_COUNTS_FRACTION = 64;

/** Whether `values` hold more than `limit` distinct values (stops counting past it). */
function distinctAbove(values: Float64Array, limit: number): boolean {
  const seen = new Set<number>();
  for (let i = 0; i < values.length && seen.size <= limit; i++) seen.add(values[i]);
  return seen.size > limit;
}

/** Rows read from the start of the file to choose the grid. */
const PROBE_BYTES = 1 << 20;

export interface ReduceInput {
  label: string;
  /** The dataset's id in audit.yaml, for messages. */
  dataset: string;
  /** Role → the column's name in the file (its header name, or its position without a header). */
  roles: SampleRoles;
  joules: number;
  affinity: Affinities;
  workZero: boolean;
  /**
   * (β_Aμ_A + β_Bμ_B)/2, for data with per-lead particle columns: Σ_res = β̄W + a_Q Q + a_N dN − this ·
   * (dN_A + dN_B) (samplesRows.ts subtractHeldParticles). Absent: 0.
   */
  meanBetaMu?: number;
}

/**
 * The dataset's arrays as read (every row, or one entry a cell), before the conductor's states are joined:
 * with state columns, `sigma` is the reservoirs' part Σ_res and `stateRows` holds each row's or cell's start
 * and end labels (and the same Σ_res), from which src/ingest/samples.ts forms p and Σ_tot once for the whole
 * dataset.
 */
export type ReducedFields = Pick<
  SamplesDataset,
  "sha256" | "rows" | "W" | "W_data" | "Q" | "dN" | "dE_A" | "dE_B" | "weight" | "realisations" | "sigma" | "reduction" | "leadParticles"
> & { stateRows?: StateRows | null };

/** Start and end state labels (as written) and Σ_res of each row or cell. */
export interface StateRows {
  start: Float64Array;
  end: Float64Array;
  sigmaReservoirs: Float64Array;
}

/** The spec of a summary from the first rows of a plain text file's byte ranges. */
export function byteRangeSpec(input: ReduceInput, plan: ByteRangePlan, slotOfRole: Partial<Record<SampleRole, number>>, capacity = DEFAULT_CELL_CAPACITY): SamplesReductionSpec {
  return reductionSpec(input, csvProbe(plan.fd, plan.dataStart, plan.size, plan.layout), slotOfRole, capacity);
}

/**
 * A large plain text `samples` file summarised into cells (see cellTable.ts)
 * on worker threads, each scanning a byte range of the descriptor the source
 * opened, while this thread computes the digest: the sorted cell tables of
 * the ranges. Null when a range holds anything the byte scanner leaves to the
 * general reader, or any problem (the caller then reduces the source's
 * batches, which reads or words it with exact lines).
 */
export async function reduceByteRanges(
  plan: ByteRangePlan,
  spec: SamplesReductionSpec,
  digest: () => Promise<string>,
  options: { threads?: boolean; onBytes?: (done: number, total: number) => void } = {},
): Promise<{ tables: CellTableData[]; rows: number; sha256: string } | null> {
  const { fd, size, layout } = plan;
  // esbuild bundles the worker in its own process while this thread reads the probe.
  if (options.threads !== false) void workerBundle();
  let done = plan.dataStart;
  const { parts, sha256 } = await reduceInParts(fd, plan.dataStart, size, layout, spec, digest, {
    threads: options.threads,
    onBytes: (n) => {
      done += n;
      options.onBytes?.(done, size);
    },
  });
  if (parts.some((p) => p.state.structural !== null || p.state.problemCount > 0 || p.rowProblems.count > 0)) return null;
  const rows = parts.reduce((a, p) => a + p.state.rows, 0);
  if (rows === 0) return null;
  return { tables: parts.map((p) => p.table), rows, sha256 };
}

/** The first whole rows of a plain text file (up to PROBE_BYTES), as the scanner gives them; null if none. */
function csvProbe(fd: number, dataStart: number, size: number, layout: ScanLayout): RowChunk | null {
  let probe: RowChunk | null = null;
  scanFileRange(fd, dataStart, probeEnd(fd, dataStart, size), layout, (chunk) => {
    if (probe === null) probe = { rows: chunk.rows, values: chunk.values.map((v) => Float64Array.from(v)), lines: Uint32Array.from(chunk.lines) };
  });
  return probe;
}

/**
 * Key and stored columns, and the grid, chosen from the rows at the start of
 * the file (`probe`: the scanner's columns in slot order).
 */
export function reductionSpec(input: ReduceInput, probe: RowChunk | null, slotOfRole: Partial<Record<SampleRole, number>>, capacity: number): SamplesReductionSpec {
  const { roles } = input;
  const hasE = roles.dE_A !== undefined && roles.dE_B !== undefined;
  const hasW = roles.W !== undefined || hasE;
  const a = input.affinity;
  const sigma = { cW: input.workZero ? 0 : a.beta_bar, cQ: a.a_Q, cN: a.a_N, cHeld: input.meanBetaMu ?? 0 };
  const perLead = roles.dN_A !== undefined;
  const states = roles.state_start !== undefined;
  // The key resolves, on the same fine grid in units of k_B, the two quantities the
  // checks use inside exponentials: Σ and β̄W (e^−Σ, and e^−β̄W in the weighted
  // currents and fluxes); the counts exactly (each lead's, where given); the
  // conductor's states exactly (a cell holds one pair of end states, so the boundary
  // term ln p(x₀) − ln p(x_τ) is one number per cell and Σ_tot = Σ_res + it); and Q
  // only when those do not already fix it (equal temperatures, a_Q = 0), on a
  // relative grid. Pooling then only mixes realisations whose Σ and β̄W agree to
  // within a cell.
  const keyColumns: KeyColumn[] = ["sigma"];
  if (hasW) keyColumns.push("betaW");
  if (roles.dN !== undefined) keyColumns.push("dN");
  if (perLead) keyColumns.push("dN_A", "dN_B");
  if (states) keyColumns.push("state_start", "state_end");
  const transverse: SampleColumn | null = sigma.cQ === 0 ? "Q" : null;
  if (transverse) keyColumns.push(transverse);
  const storedColumns: SampleColumn[] = ["Q"];
  if (hasW) storedColumns.push("W");
  if (roles.dN !== undefined || perLead) storedColumns.push("dN");
  if (hasE) storedColumns.push("dE_A", "dE_B");
  if (perLead) storedColumns.push("dN_A", "dN_B");

  // The probe's rows in J, as the sink forms them.
  const first = probe;
  const raw: Partial<Record<SampleRole, Float64Array>> = {};
  for (const [role, slot] of Object.entries(slotOfRole)) if (first) raw[role as SampleRole] = first.values[slot!];
  const sample = first ? reducedColumns(raw, { roles, joules: input.joules, sigma, dataset: input.dataset }, first.rows, first.lines, newProblemLog()) : null;
  const columnOf = (c: KeyColumn): Float64Array | null => {
    if (sample === null) return null;
    if (c === "betaW") return sample.rows.W_data ? sample.rows.W_data.map((w) => a.beta_bar * w) : null;
    return c === "sigma" ? sample.sigma : sample.columns[c];
  };

  const step0 = new Float64Array(keyColumns.length);
  const delay = new Float64Array(keyColumns.length);
  const maxLevel = new Float64Array(keyColumns.length).fill(Infinity);
  keyColumns.forEach((c, d) => {
    const values = columnOf(c);
    let maxAbs = 0;
    const counted = c === "dN" || c === "dN_A" || c === "dN_B";
    const label = c === "state_start" || c === "state_end";
    let whole = counted || label;
    if (values) {
      for (let i = 0; i < values.length; i++) {
        const v = values[i];
        if (Number.isFinite(v)) maxAbs = Math.max(maxAbs, Math.abs(v));
        if (!Number.isInteger(v)) whole = false;
      }
    }
    if (label) {
      // A state label is never pooled with another (up to MAX_LEVEL; fieldsFromCells refuses a table that went past it).
      step0[d] = 1;
      delay[d] = Infinity;
      maxLevel[d] = 0;
    } else if (whole) {
      step0[d] = 1;
      // Counts stay apart at every level, unless the start of the file already shows so many
      // distinct counts that they alone could fill the table: then they widen with Σ, and Σ's
      // cells can stay narrow (past MAX_LEVEL everything would widen, Σ included).
      delay[d] = values !== null && distinctAbove(values, capacity / MANY_COUNTS_FRACTION) ? (transverse ? TRANSVERSE_MAX_LEVEL : 0) : Infinity;
    } else if (c === "sigma" || c === "betaW") {
      step0[d] = SIGMA_STEP;
      delay[d] = transverse ? TRANSVERSE_MAX_LEVEL : 0;
    } else {
      const scale = maxAbs > 0 ? maxAbs : input.joules;
      step0[d] = integerPower(2, Math.ceil(Math.log2(scale * FINEST_RELATIVE_STEP)));
      delay[d] = 0;
      maxLevel[d] = TRANSVERSE_MAX_LEVEL;
    }
  });
  const keyValues = keyColumns.map((c) => columnOf(c));
  const startLevel =
    sample === null || keyValues.some((v) => v === null) ? 0 : levelForProbe(keyValues as Float64Array[], sample.rows.rows, step0, delay, maxLevel, capacity / 8);
  return {
    label: input.label,
    dataset: input.dataset,
    roles,
    slotOfRole,
    joules: input.joules,
    sigma,
    betaBar: a.beta_bar,
    keyColumns,
    storedColumns,
    grid: { dims: keyColumns.length, step0, delay, maxColumnLevel: maxLevel, stored: storedColumns.length, pairs: momentPairs(storedColumns), capacity, startLevel },
  };
}

/** Pairs of the currents (Q, W, ΔN) among the stored columns, whose within-cell second moments are kept. */
function momentPairs(stored: SampleColumn[]): [number, number][] {
  const currents = stored.map((c, i) => [c, i] as const).filter(([c]) => c === "Q" || c === "W" || c === "dN");
  const pairs: [number, number][] = [];
  for (let x = 0; x < currents.length; x++) for (let y = x; y < currents.length; y++) pairs.push([currents[x][1], currents[y][1]]);
  return pairs;
}

/**
 * Number of probe rows' distinct cells at a level (stops counting past
 * `limit`), from the rows' level-0 cell indices `k0` (rows × dims). Cells are
 * told apart by a 53-bit hash of their key: a collision among some 10^4 keys
 * has a probability near 10^−7 and would only make the start level one finer,
 * which the table corrects as it fills.
 */
function probeCells(k0: Float64Array, dims: number, rows: number, delay: Float64Array, maxLevel: Float64Array, level: number, limit: number): number {
  // coarserIndex(k, 0, l) = ⌊(k + (p − 1)/2) / p⌋ with p = 3^l, its factors taken once per column.
  const p = Float64Array.from(delay, (dl, d) => integerPower(3, columnLevel(level, dl, maxLevel[d])));
  const half = p.map((f) => (f - 1) / 2);
  const seen = new HashSet53(limit + 1);
  for (let i = 0; i < rows && seen.size <= limit; i++) {
    let h1 = 0x811c9dc5;
    let h2 = 0x01000193;
    for (let d = 0; d < dims; d++) {
      const k = Math.floor((k0[i * dims + d] + half[d]) / p[d]);
      const lo = k | 0;
      const hi = (k / 4294967296) | 0;
      h1 = Math.imul(h1 ^ lo, 0x01000193) ^ hi;
      h2 = Math.imul(h2 ^ hi, 0x5bd1e995) ^ lo;
    }
    seen.add(h1 | 0, h2 >>> 11);
  }
  return seen.size;
}

/**
 * A set of 53-bit values given as a high 32-bit and a low 21-bit part, for
 * at most `most` values: open addressing in typed arrays, which spares the
 * probe's bisection a Set of the same values as doubles (V8 keeps values
 * beyond 2^31 as heap numbers there).
 */
class HashSet53 {
  size = 0;
  private readonly high: Int32Array;
  /** Low part + 1 (0: empty slot). */
  private readonly low: Int32Array;
  private readonly mask: number;

  constructor(most: number) {
    let slots = 16;
    while (slots < 2 * most) slots *= 2;
    this.high = new Int32Array(slots);
    this.low = new Int32Array(slots);
    this.mask = slots - 1;
  }

  /** Add the value high · 2^21 + low (low in [0, 2^21)); at most `most` distinct values. */
  add(high: number, low: number): void {
    let slot = Math.imul(high ^ Math.imul(low, 0x9e3779b1), 0x85ebca6b) >>> 0;
    slot = (slot ^ (slot >>> 16)) & this.mask;
    while (this.low[slot] !== 0) {
      if (this.high[slot] === high && this.low[slot] === low + 1) return;
      slot = (slot + 1) & this.mask;
    }
    this.high[slot] = high;
    this.low[slot] = low + 1;
    this.size++;
  }
}

/**
 * The lowest level at which the probe's rows fall into at most `target` cells
 * (the count falls with the level; bisection): where every part's table starts,
 * so that it does not climb level by level from the finest grid. The file has
 * more rows than the probe, so a table may still go higher; the result is the
 * same either way.
 */
function levelForProbe(keys: Float64Array[], rows: number, step0: Float64Array, delay: Float64Array, maxLevel: Float64Array, target: number): number {
  // Each row's level-0 cell once, for every level the bisection tries.
  const dims = keys.length;
  const k0 = new Float64Array(rows * dims);
  for (let i = 0; i < rows; i++) for (let d = 0; d < dims; d++) k0[i * dims + d] = Math.floor(keys[d][i] / step0[d] + 0.5);
  let lo = 0;
  let hi = MAX_LEVEL;
  if (probeCells(k0, dims, rows, delay, maxLevel, hi, target) > target) return hi;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (probeCells(k0, dims, rows, delay, maxLevel, mid, target) <= target) hi = mid;
    else lo = mid + 1;
  }
  return lo;
}

/** End of the last whole line within PROBE_BYTES of the data start (a cut line would read as a bad cell). */
function probeEnd(fd: number, dataStart: number, size: number): number {
  if (size - dataStart <= PROBE_BYTES) return size;
  const buffer = Buffer.allocUnsafe(PROBE_BYTES);
  const got = fs.readSync(fd, buffer, 0, PROBE_BYTES, dataStart);
  const nl = buffer.subarray(0, got).lastIndexOf(10);
  return nl < 0 ? size : dataStart + nl + 1;
}

/** The dataset's arrays over the merged cells: column means, multiplicities, Σ of each cell's mean. */
export function fieldsFromCells(
  input: ReduceInput,
  spec: SamplesReductionSpec,
  cells: CellTableData,
  rows: number,
  sha256: string,
  parts: number,
): ReducedFields {
  const n = cells.cells;
  const S = spec.storedColumns.length;
  const mean = (c: SampleColumn): Float64Array | null => {
    const s = spec.storedColumns.indexOf(c);
    if (s < 0) return null;
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) out[i] = cells.sums[i * S + s] / cells.count[i];
    return out;
  };
  const Q = mean("Q")!;
  const W_data = mean("W");
  const dNmean = mean("dN");
  const dN = dNmean ?? new Float64Array(n);
  const W = input.workZero ? new Float64Array(n) : W_data!;
  // Each cell's Σ is the one whose exponential is the cell's average of e^{−Σ}:
  // Σ*_C = −ln(Σ_i w_i e^{−Σ_i} / Σ_i w_i). Every sum of e^{−Σ} over cells (integral
  // relation, the exchange relation's bin averages) is then the sum over the
  // realisations, and under the exchange relation mirrored cells C, −C obey
  // P(C)/P(−C) = e^{Σ*_C} exactly (integrate P(z) = e^{Σ(z)} P(−z) over C), as
  // single realisations do. The plain mean Σ̄_C (Σ is linear in W, Q, ΔN, so the Σ
  // of the cell's column means) exceeds Σ*_C by at most the cell's Σ range
  // (Jensen), which `maxSigmaSpread` reports.
  const sigmaMean = entropyProduction(input.affinity, W, Q, dN);
  const perLead = spec.storedColumns.includes("dN_A");
  const stateKeys = spec.keyColumns.includes("state_start");
  const sigma = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const star = cells.sigmaRef[i] - log(cells.expSum[i] / cells.count[i]);
    // Σ* lies in the cell's range; where the range is a single value, every realisation in the cell has that Σ:
    // keep it (no rounding drift). Two-point data keep the Σ of the cell's means there, as they always have;
    // data of a conductor keep the realisations' own Σ_res (the means would need the held particles again).
    const single = perLead || stateKeys ? cells.sigmaMin[i] : sigmaMean[i];
    sigma[i] = cells.sigmaMax[i] === cells.sigmaMin[i] ? single : Math.min(cells.sigmaMax[i], Math.max(cells.sigmaMin[i], star));
  }
  let realisations = 0;
  let pooled = 0;
  let maxSpread = 0;
  for (let i = 0; i < n; i++) {
    realisations += cells.count[i];
    const spread = cells.sigmaMax[i] - cells.sigmaMin[i];
    if (spread > 0) pooled += cells.count[i];
    if (spread > maxSpread) maxSpread = spread;
  }
  if (realisations === 0) throw new DataError(`${input.label}: every count in column "${input.roles.count}" is zero; there are no realisations`);
  const steps: Record<string, number> = {};
  spec.keyColumns.forEach((c, d) => {
    steps[c] = spec.grid.step0[d] * integerPower(3, columnLevel(cells.level, spec.grid.delay[d], spec.grid.maxColumnLevel[d]));
  });
  // Within-cell scatter Σ_C Σ_{i∈C} w_i (x_i − x̄_C)(y_i − ȳ_C) of each pair of currents:
  // what second moments computed from the cells' means lack (src/checks/helpers.ts adds it back).
  // It is the table's total Σ w x y less Σ_C S_x S_y / n_C. Cancellation costs digits in
  // proportion to how narrow the cells are (about 4 of 16 at the benchmark's cells), the
  // same as forming it cell by cell; the result enters variances as a small correction.
  const scatter: Record<string, number> = {};
  spec.grid.pairs.forEach(([a, b], p) => {
    let between = 0;
    for (let i = 0; i < n; i++) between += (cells.sums[i * S + a] * cells.sums[i * S + b]) / cells.count[i];
    const within = cells.productTotals[p] - between;
    scatter[`${spec.storedColumns[a]},${spec.storedColumns[b]}`] = a === b ? Math.max(0, within) : within;
  });
  const reduction: SamplesReduction = {
    cells: n,
    scatter,
    steps,
    level: cells.level,
    maxSigmaSpread: maxSpread,
    pooledFraction: pooled / realisations,
    parts,
  };
  return {
    sha256,
    rows,
    W,
    W_data,
    Q,
    dN,
    dE_A: mean("dE_A"),
    dE_B: mean("dE_B"),
    weight: Float64Array.from(cells.count),
    realisations,
    sigma,
    reduction,
    leadParticles: perLead ? { A: mean("dN_A")!, B: mean("dN_B")! } : null,
    stateRows: stateKeys ? { ...stateLabelsOfCells(input, spec, cells), sigmaReservoirs: sigma } : null,
  };
}

/**
 * Each cell's start and end state (the key's index at level 0, which is the label: states are keyed on a
 * step of 1 and never widen up to MAX_LEVEL). A table that had to go past MAX_LEVEL widened every column,
 * states included: it is refused rather than pool realisations with different states.
 */
function stateLabelsOfCells(input: ReduceInput, spec: SamplesReductionSpec, cells: CellTableData): { start: Float64Array; end: Float64Array } {
  const dims = spec.keyColumns.length;
  const at = (c: KeyColumn) => spec.keyColumns.indexOf(c);
  for (const c of ["state_start", "state_end"] as const) {
    const d = at(c);
    if (columnLevel(cells.level, spec.grid.delay[d], spec.grid.maxColumnLevel[d]) !== 0) {
      throw new DataError(
        `${input.label}: holds more distinct combinations of particle counts and conductor states than a summary of ${spec.grid.capacity} cells can keep apart, so states would be pooled; give the windows as a histogram (a count column), or audit fewer windows`,
      );
    }
  }
  const labels = (d: number) => Float64Array.from({ length: cells.cells }, (_, i) => cells.keys[i * dims + d]);
  return { start: labels(at("state_start")), end: labels(at("state_end")) };
}

