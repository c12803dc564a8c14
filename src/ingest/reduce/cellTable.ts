import { exp, integerPower } from "../../math/index.ts";
/**
 * A mergeable summary of many realisations: realisations with the same key
 * (a cell of a grid over a few columns) are pooled into one cell that keeps
 * their number, the sum of every stored column, the smallest and largest
 * entropy production Σ among them, and the sum of e^{−Σ}.
 *
 * The grid is centred and mirror-symmetric: at level 0 column d is cut into
 * cells [(k − ½)s, (k + ½)s) of width s = step0_d, so the mirror image of cell
 * k is cell −k and a realisation and its time reverse fall into mirrored cells.
 * Each table level L ≤ MAX_LEVEL puts column d at its own level
 * min(max_d, max(0, L − delay_d)) (a column with an infinite delay, such as a
 * count, does not widen there), and each
 * column level triples the width: cell j at level l+1 is exactly cells 3j−1,
 * 3j, 3j+1 at level l (j = ⌊(k+1)/3⌋), so cells stay centred and
 * mirror-symmetric at every level, and summaries of different
 * parts of a file merge exactly: bring both to the higher level, add cell by
 * cell. When a table holds more than its capacity it goes up a level. The
 * result depends only on the data, the start level and the capacity, not on
 * where the file was cut — apart from the order of floating-point additions,
 * which a fixed split fixes.
 *
 * What is kept exactly: the number of realisations, each column's total (so
 * every mean), the sum of e^{−Σ} (so every exponential average), and the range
 * of Σ in each cell, which bounds what pooling can have changed.
 */

export interface GridSpec {
  /** Columns that make up the key. */
  dims: number;
  /** Finest step of each key column (a power of two, in the column's unit). */
  step0: Float64Array;
  /** Table levels before each column starts to widen (Infinity: never, for whole-number columns). */
  delay: Float64Array;
  /** Highest level of each column (Infinity: no limit). */
  maxColumnLevel: Float64Array;
  /** Stored sums per cell. */
  stored: number;
  /** Pairs (a, b) of stored columns whose product sums over the whole table are kept too (second moments). */
  pairs: [number, number][];
  /** Most cells a table may hold before it coarsens. */
  capacity: number;
  /** Level a table starts at (chosen from the start of the file, the same for every part). */
  startLevel: number;
}

/** The plain-data form of a table: what workers send and what merging takes. */
export interface CellTableData {
  level: number;
  cells: number;
  /** cells × dims grid indices (whole numbers held as doubles). */
  keys: Float64Array;
  /** Sum of weights (realisations) per cell. */
  count: Float64Array;
  /** cells × stored column sums (weighted). */
  sums: Float64Array;
  sigmaMin: Float64Array;
  sigmaMax: Float64Array;
  /**
   * Sum of w x_a x_b over all realisations, one per pair: with the cells' sums this
   * gives the within-cell scatter Σ_C (Σ_{i∈C} w x_a x_b − S_a S_b / n_C), which is
   * all the checks need of second moments; per cell they would make each
   * record half as large again (6 more numbers on 11 for three currents).
   */
  productTotals: Float64Array;
  /** Σ of the first realisation of each cell, and the sum over the cell of w e^{−(Σ − that reference)}. */
  sigmaRef: Float64Array;
  expSum: Float64Array;
  /** Cells in lexicographic order of their keys (exportSorted), which merging can use. */
  sorted?: boolean;
}

/**
 * The last level at which columns follow their delays and limits. At 30, Σ
 * cells are 2^−12 · 3^30 ≈ 5·10^10 k_B wide, a single cell for any data: a
 * table that still holds more cells than its capacity owes them to its
 * whole-number (or limited) columns, so past this level every column widens.
 */
export const MAX_LEVEL = 30;

/**
 * The highest level a table goes to: whole-number columns are then 3^33 ≈ 5.6·10^15
 * wide, so that all counts a double holds exactly fall into at most three cells.
 * A table past its capacity there (only data with values beyond 2^53 can) stays
 * over it rather than widen cells whose widths are no longer exact.
 */
export const LAST_LEVEL = MAX_LEVEL + 33;

/**
 * A column's own level at table level L: min(max, max(0, L − delay)) up to
 * MAX_LEVEL; past it, that level plus L − MAX_LEVEL, for every column (counts
 * too). A function of the level alone, so every part of a file and the table
 * that merges them read the same key the same way whatever levels they reached.
 */
export function columnLevel(level: number, delay: number, max = Infinity): number {
  if (level <= MAX_LEVEL) return Math.min(max, Math.max(0, level - delay));
  return columnLevel(MAX_LEVEL, delay, max) + (level - MAX_LEVEL);
}

/** Index at `toLevel` of the cell with index k at `fromLevel` (centred cells, factor 3 a level). */
export function coarserIndex(k: number, fromLevel: number, toLevel: number): number {
  if (toLevel === fromLevel) return k;
  const p = integerPower(3, toLevel - fromLevel);
  return Math.floor((k + (p - 1) / 2) / p);
}

/** Rows handed to `addRows`: key columns and stored values row-major, one Σ a row. */
export interface RowBlock {
  rows: number;
  x: Float64Array; // rows × dims
  v: Float64Array; // rows × stored
  sigma: Float64Array;
  /** Realisations each row stands for (a histogram's counts); absent: one each. */
  weight?: Float64Array;
}

/** Partitions of a table, by the top bits of a key's hash: 2^8, so that one partition's cells stay in cache while its rows go in. */
const PARTITION_BITS = 8;
const PARTITIONS = 1 << PARTITION_BITS;
/** Rows held back per partition before they are added to its cells. */
const PENDING_ROWS = 1024;

/**
 * One partition's cells: dense records in the order the cells first appear,
 * and an open-addressing index over them (linear probing, at most half full)
 * that keeps each key's hash beside its record number, so a probe reads a
 * record only when the hash matches.
 */
class CellStore {
  size = 0;
  private slots: number;
  /** Record number + 1 at each slot (0: empty), and the hash of its key. */
  private index: Int32Array;
  private tags: Int32Array;
  data: Float64Array;

  /** Room for `records` records (a power of two) before the first growth. */
  constructor(
    private readonly stride: number,
    private readonly dims: number,
    private readonly oMin: number,
    records: number,
  ) {
    this.slots = 2 * records;
    this.index = new Int32Array(this.slots);
    this.tags = new Int32Array(this.slots);
    this.data = new Float64Array(records * stride);
  }

  /** Offset in `data` of the record with this key; a new, empty record if the key is new. */
  recordFor(key: Float64Array, at: number, hash: number): number {
    const { dims, data, index, tags } = this;
    const mask = this.slots - 1;
    let slot = hash & mask;
    let r = index[slot];
    while (r !== 0) {
      if (tags[slot] === hash) {
        const base = (r - 1) * this.stride;
        let same = true;
        for (let d = 0; d < dims; d++) {
          if (data[base + d] !== key[at + d]) {
            same = false;
            break;
          }
        }
        if (same) return base;
      }
      slot = (slot + 1) & mask;
      r = index[slot];
    }
    const base = this.size * this.stride;
    this.size++;
    index[slot] = this.size;
    tags[slot] = hash;
    for (let d = 0; d < dims; d++) data[base + d] = key[at + d];
    data[base + this.oMin] = Infinity;
    data[base + this.oMin + 1] = -Infinity;
    if (2 * this.size >= this.slots) this.grow();
    return base;
  }

  /** Twice the slots, and room for twice the records (records keep their place). */
  private grow(): void {
    this.slots *= 2;
    const mask = this.slots - 1;
    const data = new Float64Array((this.slots / 2) * this.stride);
    data.set(this.data.subarray(0, this.size * this.stride));
    this.data = data;
    const oldIndex = this.index;
    const oldTags = this.tags;
    this.index = new Int32Array(this.slots);
    this.tags = new Int32Array(this.slots);
    for (let s = 0; s < oldIndex.length; s++) {
      if (oldIndex[s] === 0) continue;
      let slot = oldTags[s] & mask;
      while (this.index[slot] !== 0) slot = (slot + 1) & mask;
      this.index[slot] = oldIndex[s];
      this.tags[slot] = oldTags[s];
    }
  }
}

/**
 * The table: PARTITIONS stores, a key going to the store chosen by the top bits
 * of its hash. Each record holds, side by side in one Float64Array, [key × dims,
 * count, sums × stored, Σmin, Σmax, Σref, Σ w e^−(Σ−Σref)]; the sums of products
 * of pairs are kept for the table as a whole, in the order the rows arrive.
 *
 * Rows do not go straight into their cells: each waits in its partition's
 * queue, and a full queue is added to that partition's cells in one go. With
 * 10^5 cells (about 14 MB of records) a row added directly costs a cache miss,
 * which on this machine class is most of the time spent reading a large file;
 * a partition's few hundred cells stay in cache while its queue goes in. A cell
 * lives in one partition and a queue keeps its rows in order, so every sum,
 * and each cell's reference Σ, follow the order of the rows, exactly as if
 * they had been added one by one. The table goes up a level (`coarsen`) when,
 * after a queue went in, it holds more cells than its capacity; whether rows
 * are added one at a time (`add`) or in blocks (`addRows`), the queues and so
 * the result are the same.
 */
export class CellTable {
  level = 0;
  /** Cells in all partitions. */
  size = 0;
  private stores: CellStore[] = [];
  private readonly stride: number;
  private readonly oCount: number;
  private readonly oSums: number;
  private readonly oMin: number;
  private readonly oMax: number;
  private readonly oRef: number;
  private readonly oExp: number;
  private readonly pairA: Int32Array;
  private readonly pairB: Int32Array;
  /** Three stored columns with all six pair products, in the order momentPairs gives (a fast path). */
  private readonly threeCurrents: boolean;
  /** Sum of w x_a x_b of each pair over every row added. */
  private productTotals: Float64Array;
  private readonly key: Float64Array;
  private readonly inverseStep: Float64Array;
  /** 3^(column level) of each column at the current table level. */
  private readonly factor: Float64Array;
  /** Each partition's queue: per row its grid key, stored values, weight and Σ. */
  private readonly entry: number;
  private pending: Float64Array[] = [];
  private readonly pendingRows = new Int32Array(PARTITIONS);
  /** One row's weight and Σ, for `add`. */
  private readonly oneWeight = new Float64Array(1);
  private readonly oneSigma = new Float64Array(1);

  constructor(readonly spec: GridSpec) {
    this.level = spec.startLevel;
    this.oCount = spec.dims;
    this.oSums = this.oCount + 1;
    this.oMin = this.oSums + spec.stored;
    this.oMax = this.oMin + 1;
    this.oRef = this.oMax + 1;
    this.oExp = this.oRef + 1;
    this.stride = this.oExp + 1;
    this.entry = spec.dims + spec.stored + 2;
    this.pairA = Int32Array.from(spec.pairs, (p) => p[0]);
    this.pairB = Int32Array.from(spec.pairs, (p) => p[1]);
    this.productTotals = new Float64Array(spec.pairs.length);
    this.threeCurrents = spec.stored === 3 && spec.pairs.map((p) => p.join()).join(" ") === "0,0 0,1 0,2 1,1 1,2 2,2";
    this.key = new Float64Array(spec.dims);
    this.inverseStep = Float64Array.from(spec.step0, (s) => 1 / s);
    this.factor = new Float64Array(spec.dims);
    this.refreshFactors();
    this.clear();
  }

  /** 3^(column level) of each column, after the level was set. */
  refreshFactors(): void {
    for (let d = 0; d < this.spec.dims; d++) this.factor[d] = integerPower(3, columnLevel(this.level, this.spec.delay[d], this.spec.maxColumnLevel[d]));
  }

  /** No cells. */
  private clear(): void {
    // Room at the start for half the capacity, spread evenly: growing costs fresh memory, which is slow to touch.
    let records = 8;
    while (records < this.spec.capacity / (2 * PARTITIONS)) records *= 2;
    this.stores = Array.from({ length: PARTITIONS }, () => new CellStore(this.stride, this.spec.dims, this.oMin, records));
    this.size = 0;
    this.productTotals = new Float64Array(this.spec.pairs.length);
  }

  private hashOf(key: Float64Array, at: number): number {
    let h = 0x811c9dc5;
    for (let d = 0; d < this.spec.dims; d++) {
      const k = key[at + d];
      h = Math.imul(h ^ (k | 0), 0x01000193);
      h = Math.imul(h ^ ((k / 4294967296) | 0), 0x01000193);
    }
    return h ^ (h >>> 15);
  }

  /**
   * Queue rows 0 … rows−1 of a block (key columns x, stored values v, Σ), each of
   * weight `weights[i]`, or 1 without weights. One loop with the grid key, its
   * hash and the queue write inlined: this is the innermost loop of reading a
   * large file.
   */
  private enqueueBlock(x: Float64Array, v: Float64Array, weights: Float64Array | null, sigmas: Float64Array, rows: number): void {
    const { dims, stored } = this.spec;
    if (this.pending.length === 0) {
      this.pending = Array.from({ length: PARTITIONS }, () => new Float64Array(PENDING_ROWS * this.entry));
    }
    const { inverseStep, factor, pendingRows, pending, entry, key, pairA, pairB, threeCurrents } = this;
    const shift = 32 - PARTITION_BITS;
    const P = pairA.length;
    for (let i = 0; i < rows; i++) {
      const xi = i * dims;
      // The grid key (the level-0 cell, then coarserIndex's arithmetic) and hashOf's hash, inlined.
      let h = 0x811c9dc5;
      for (let d = 0; d < dims; d++) {
        const f = factor[d];
        const k0 = Math.floor(x[xi + d] * inverseStep[d] + 0.5);
        const k = f === 1 ? k0 : Math.floor((k0 + (f - 1) / 2) / f);
        key[d] = k;
        h = Math.imul(h ^ (k | 0), 0x01000193);
        h = Math.imul(h ^ ((k / 4294967296) | 0), 0x01000193);
      }
      const hash = h ^ (h >>> 15);
      const p = hash >>> shift;
      const n = pendingRows[p];
      const queue = pending[p];
      let at = n * entry;
      for (let d = 0; d < dims; d++) queue[at++] = key[d];
      const vi = i * stored;
      for (let s = 0; s < stored; s++) queue[at++] = v[vi + s];
      const w = weights === null ? 1 : weights[i];
      queue[at++] = w;
      queue[at] = sigmas[i];
      const totals = this.productTotals; // replaced when the table goes up a level
      if (threeCurrents) {
        // The common layout written out: three currents and their six products.
        const a = v[vi];
        const b = v[vi + 1];
        const c = v[vi + 2];
        totals[0] += w * a * a;
        totals[1] += w * a * b;
        totals[2] += w * a * c;
        totals[3] += w * b * b;
        totals[4] += w * b * c;
        totals[5] += w * c * c;
      } else {
        for (let k = 0; k < P; k++) totals[k] += w * v[vi + pairA[k]] * v[vi + pairB[k]];
      }
      pendingRows[p] = n + 1;
      if (n + 1 === PENDING_ROWS) {
        this.flush(p);
        if (this.size > this.spec.capacity) this.coarsen();
      }
    }
  }

  /** Add partition p's queued rows to its cells. */
  private flush(p: number): void {
    const n = this.pendingRows[p];
    if (n === 0) return;
    const { dims, stored } = this.spec;
    const queue = this.pending[p];
    const store = this.stores[p];
    const before = store.size;
    const { oCount, oSums, oMin, oMax, oRef, oExp, entry, threeCurrents } = this;
    for (let i = 0; i < n; i++) {
      const at = i * entry;
      // The hash is formed again from the queued key: cheaper than a second queue to write and read.
      const base = store.recordFor(queue, at, this.hashOf(queue, at));
      const data = store.data;
      const vAt = at + dims;
      const weight = queue[vAt + stored];
      const sigma = queue[vAt + stored + 1];
      if (data[base + oCount] === 0) data[base + oRef] = sigma;
      data[base + oCount] += weight;
      const o = base + oSums;
      if (threeCurrents) {
        data[o] += weight * queue[vAt];
        data[o + 1] += weight * queue[vAt + 1];
        data[o + 2] += weight * queue[vAt + 2];
      } else {
        for (let s = 0; s < stored; s++) data[o + s] += weight * queue[vAt + s];
      }
      if (sigma < data[base + oMin]) data[base + oMin] = sigma;
      if (sigma > data[base + oMax]) data[base + oMax] = sigma;
      data[base + oExp] += weight * exp(data[base + oRef] - sigma);
    }
    this.size += store.size - before;
    this.pendingRows[p] = 0;
  }

  /** Every queued row added to its cells, the table coarsened if that made it exceed its capacity. */
  private settle(): void {
    for (let p = 0; p < PARTITIONS; p++) this.flush(p);
    if (this.size > this.spec.capacity) this.coarsen();
  }

  /**
   * Add `weight` realisations with key columns `x` (length dims), stored values
   * `values` (length stored) and entropy production `sigma`.
   */
  add(x: Float64Array, values: Float64Array, weight: number, sigma: number): void {
    this.oneWeight[0] = weight;
    this.oneSigma[0] = sigma;
    this.enqueueBlock(x, values, this.oneWeight, this.oneSigma, 1);
  }

  /** Add a block of rows, in order: the same as `add` row by row. */
  addRows(block: RowBlock): void {
    this.enqueueBlock(block.x, block.v, block.weight ?? null, block.sigma, block.rows);
  }

  /** Go up one level (or more, until the cells fit): pool neighbouring cells of the coarsenable columns. */
  coarsen(): void {
    if (this.level >= LAST_LEVEL) return;
    for (let p = 0; p < PARTITIONS; p++) this.flush(p);
    const old = this.snapshot();
    do {
      this.level++;
      this.refreshFactors();
      this.clear();
      this.absorb(old, false);
    } while (this.size > this.spec.capacity && this.level < LAST_LEVEL);
  }

  /** Add every cell of `data` (at a level ≤ this.level) into this table. */
  absorb(data: CellTableData, autoCoarsen = true): void {
    const { dims, stored, delay, maxColumnLevel } = this.spec;
    const key = this.key;
    for (let p = 0; p < this.productTotals.length; p++) this.productTotals[p] += data.productTotals[p];
    for (let c = 0; c < data.cells; c++) {
      for (let d = 0; d < dims; d++) {
        const k = data.keys[c * dims + d];
        key[d] = coarserIndex(k, columnLevel(data.level, delay[d], maxColumnLevel[d]), columnLevel(this.level, delay[d], maxColumnLevel[d]));
      }
      const hash = this.hashOf(key, 0);
      const store = this.stores[hash >>> (32 - PARTITION_BITS)];
      const before = store.size;
      const base = store.recordFor(key, 0, hash);
      const own = store.data;
      if (own[base + this.oCount] === 0) own[base + this.oRef] = data.sigmaRef[c];
      own[base + this.oCount] += data.count[c];
      for (let s = 0; s < stored; s++) own[base + this.oSums + s] += data.sums[c * stored + s];
      if (data.sigmaMin[c] < own[base + this.oMin]) own[base + this.oMin] = data.sigmaMin[c];
      if (data.sigmaMax[c] > own[base + this.oMax]) own[base + this.oMax] = data.sigmaMax[c];
      own[base + this.oExp] += data.expSum[c] * exp(own[base + this.oRef] - data.sigmaRef[c]);
      if (store.size === before) continue;
      this.size++;
      if (autoCoarsen && this.size > this.spec.capacity) this.coarsen();
    }
  }

  /** The cells as plain arrays (queued rows added first), partition by partition, each in the order its cells first appeared. */
  export(): CellTableData {
    this.settle();
    return this.snapshot();
  }

  /**
   * The cells as plain arrays (queued rows added first), sorted by key: what a
   * worker sends, so that the merge is a linear pass. Copied from the stores
   * straight into key order, without the unsorted copy `export` makes (one
   * more table's worth of fresh memory per worker, about 8 MiB at 10^5 cells);
   * the queues, empty once settled, are let go first (addRows makes them
   * again). The same cells and numbers as sorting `export()`.
   */
  exportSorted(): CellTableData {
    this.settle();
    this.pending = [];
    const { dims, stored } = this.spec;
    const cells = this.size;
    // Cell c in the stores' order (store by store, record by record, as snapshot numbers them): its key, and its store.
    const keys = new Float64Array(cells * dims);
    const storeOf = new Uint16Array(cells);
    const first = new Int32Array(this.stores.length);
    let c = 0;
    this.stores.forEach((store, p) => {
      first[p] = c;
      const data = store.data;
      for (let r = 0; r < store.size; r++, c++) {
        storeOf[c] = p;
        for (let d = 0; d < dims; d++) keys[c * dims + d] = data[r * this.stride + d];
      }
    });
    const order = keyOrder(keys, dims, cells);
    const out = emptyCells(this.level, cells, dims, stored, this.productTotals);
    for (let to = 0; to < cells; to++) {
      const from = order[to];
      const p = storeOf[from];
      this.copyRecord(this.stores[p].data, (from - first[p]) * this.stride, out, to);
    }
    return { ...out, sorted: true };
  }

  /** The cells as plain arrays, without adding queued rows. */
  private snapshot(): CellTableData {
    const { dims, stored } = this.spec;
    const out = emptyCells(this.level, this.size, dims, stored, this.productTotals);
    let c = 0;
    for (const store of this.stores) {
      for (let r = 0; r < store.size; r++, c++) this.copyRecord(store.data, r * this.stride, out, c);
    }
    return out;
  }

  /** The record at `base` of a store's data (key, count, sums, Σ range and reference, exponential sum) into cell `to` of `out`. */
  private copyRecord(data: Float64Array, base: number, out: CellTableData, to: number): void {
    const { dims, stored } = this.spec;
    for (let d = 0; d < dims; d++) out.keys[to * dims + d] = data[base + d];
    out.count[to] = data[base + this.oCount];
    for (let s = 0; s < stored; s++) out.sums[to * stored + s] = data[base + this.oSums + s];
    out.sigmaMin[to] = data[base + this.oMin];
    out.sigmaMax[to] = data[base + this.oMax];
    out.sigmaRef[to] = data[base + this.oRef];
    out.expSum[to] = data[base + this.oExp];
  }
}

/**
 * Merge tables of the parts of one file, in part order, into one table no
 * larger than the capacity, with its cells sorted by key (a canonical order, so
 * the summary does not depend on hash-table layout).
 */
export function mergeCellTables(spec: GridSpec, parts: CellTableData[]): CellTableData {
  const level = Math.max(spec.startLevel, ...parts.map((p) => p.level));
  if (parts.every((p) => p.sorted && p.level === level)) {
    // Sorted parts at one level: merged in one linear pass, with the arithmetic of absorbing them
    // in part order into an empty table, so the result is the same to the last bit.
    if (parts.length === 1 && parts[0].cells <= spec.capacity) return parts[0];
    const merged = mergeSortedParts(spec, parts);
    if (merged) return merged;
  }
  return mergeByTable(spec, level, parts);
}

/**
 * Sorted tables at one level merged in one pass over all of them, cells with equal keys combined
 * in part order (the first part's cell, then each later part's, as `absorb` would): the cells of
 * absorbing them in order, to the last bit. Null once the merge holds more cells than the capacity:
 * at one level a merge keeps every key of every part, so the count only grows, and the general
 * merge (which goes up a level) must give the result.
 *
 * One pass, not one merge per part: merging part by part copied the whole growing result again for
 * each part (about parts²/2 tables' worth of copies into fresh memory, all of it thrown away when the
 * result went past the capacity); the output here is allocated once, for at most capacity + 1 cells.
 * Measured on bench/partsRead.bench.ts's data with the summary forced, the merge of 8 parts of
 * 2.2·10^5 cells (3·10^5 rows each) went from 2.4–3.3 s to 1.5–2.0 s; with 10^6 rows a part (2·10^5
 * cells each, past the capacity only at the last part) it stayed at about 1.3 s, most of it the
 * general merge.
 */
function mergeSortedParts(spec: GridSpec, parts: CellTableData[]): CellTableData | null {
  const { dims, stored, capacity } = spec;
  // The sums of products in part order, ((p0 + p1) + p2) + …, as part-by-part merging added them.
  const productTotals = Float64Array.from(parts[0].productTotals);
  for (let k = 1; k < parts.length; k++) for (let p = 0; p < productTotals.length; p++) productTotals[p] += parts[k].productTotals[p];
  const room = Math.min(capacity + 1, parts.reduce((a, p) => a + p.cells, 0));
  const out = emptyCells(parts[0].level, room, dims, stored, productTotals);
  const next = new Int32Array(parts.length);
  /** The order of part k's next cell's key against `other`'s cell j (−1, 0, 1; lexicographic). */
  const order = (k: number, other: CellTableData, j: number): number => {
    const keys = parts[k].keys;
    const i = next[k];
    for (let d = 0; d < dims; d++) {
      const diff = keys[i * dims + d] - other.keys[j * dims + d];
      if (diff !== 0) return Math.sign(diff);
    }
    return 0;
  };
  let n = 0;
  for (;;) {
    // The first part, in part order, whose next cell has the smallest key.
    let first = -1;
    for (let k = 0; k < parts.length; k++) {
      if (next[k] === parts[k].cells) continue;
      if (first < 0 || order(k, parts[first], next[first]) < 0) first = k;
    }
    if (first < 0) break;
    if (n === capacity) return null;
    copyCell(parts[first], next[first]++, out, n, dims, stored);
    for (let k = first + 1; k < parts.length; k++) {
      if (next[k] === parts[k].cells || order(k, out, n) !== 0) continue;
      const b = parts[k];
      const j = next[k]++;
      out.count[n] += b.count[j];
      for (let s = 0; s < stored; s++) out.sums[n * stored + s] += b.sums[j * stored + s];
      if (b.sigmaMin[j] < out.sigmaMin[n]) out.sigmaMin[n] = b.sigmaMin[j];
      if (b.sigmaMax[j] > out.sigmaMax[n]) out.sigmaMax[n] = b.sigmaMax[j];
      out.expSum[n] += b.expSum[j] * exp(out.sigmaRef[n] - b.sigmaRef[j]);
    }
    n++;
  }
  return { ...firstCells(out, n, dims, stored), sorted: true };
}

/** The general merge: absorb the parts in order into a table (which coarsens if it must), then sort. */
function mergeByTable(spec: GridSpec, level: number, parts: CellTableData[]): CellTableData {
  const table = new CellTable(spec);
  table.level = level;
  table.refreshFactors();
  for (const part of parts) table.absorb(part);
  return sortedByKey(spec, table.export());
}

/**
 * Cell numbers in lexicographic order of their keys (cells × dims whole numbers).
 * When the keys' ranges allow, each key and its cell number are packed into one
 * exact double (rank of the key in the box of keys, times the number of cells,
 * plus the cell number) and sorted as numbers, some ten times faster than a
 * comparison sort; otherwise the comparison sort.
 */
export function keyOrder(keys: Float64Array, dims: number, cells: number): Int32Array {
  const low = new Float64Array(dims).fill(Infinity);
  const high = new Float64Array(dims).fill(-Infinity);
  for (let c = 0; c < cells; c++) {
    for (let d = 0; d < dims; d++) {
      const k = keys[c * dims + d];
      if (k < low[d]) low[d] = k;
      if (k > high[d]) high[d] = k;
    }
  }
  let box = Math.max(1, cells);
  for (let d = 0; d < dims; d++) box *= high[d] - low[d] + 1;
  if (box < 2 ** 53) {
    const packed = new Float64Array(cells);
    for (let c = 0; c < cells; c++) {
      let rank = 0;
      for (let d = 0; d < dims; d++) rank = rank * (high[d] - low[d] + 1) + (keys[c * dims + d] - low[d]);
      packed[c] = rank * cells + c;
    }
    packed.sort();
    const order = new Int32Array(cells);
    for (let c = 0; c < cells; c++) order[c] = packed[c] % cells;
    return order;
  }
  const order = Array.from({ length: cells }, (_, i) => i);
  order.sort((a, b) => {
    for (let d = 0; d < dims; d++) {
      const diff = keys[a * dims + d] - keys[b * dims + d];
      if (diff !== 0) return diff;
    }
    return 0;
  });
  return Int32Array.from(order);
}

function sortedByKey(spec: GridSpec, data: CellTableData): CellTableData {
  const { dims, stored } = spec;
  const order = keyOrder(data.keys, dims, data.cells);
  const out = emptyCells(data.level, data.cells, dims, stored, data.productTotals);
  for (let to = 0; to < data.cells; to++) copyCell(data, order[to], out, to, dims, stored);
  return { ...out, sorted: true };
}

/** Room for `cells` cells at a level, all zero, with the table's sums of products. */
function emptyCells(level: number, cells: number, dims: number, stored: number, productTotals: Float64Array): CellTableData {
  return {
    level,
    cells,
    keys: new Float64Array(cells * dims),
    count: new Float64Array(cells),
    sums: new Float64Array(cells * stored),
    sigmaMin: new Float64Array(cells),
    sigmaMax: new Float64Array(cells),
    sigmaRef: new Float64Array(cells),
    expSum: new Float64Array(cells),
    productTotals: Float64Array.from(productTotals),
  };
}

/** Cell i of `from` written as cell `to` of `out`. */
function copyCell(from: CellTableData, i: number, out: CellTableData, to: number, dims: number, stored: number): void {
  for (let d = 0; d < dims; d++) out.keys[to * dims + d] = from.keys[i * dims + d];
  for (let s = 0; s < stored; s++) out.sums[to * stored + s] = from.sums[i * stored + s];
  out.count[to] = from.count[i];
  out.sigmaMin[to] = from.sigmaMin[i];
  out.sigmaMax[to] = from.sigmaMax[i];
  out.sigmaRef[to] = from.sigmaRef[i];
  out.expSum[to] = from.expSum[i];
}

/** The first `cells` cells of a table's data (views, not copies). */
function firstCells(data: CellTableData, cells: number, dims: number, stored: number): CellTableData {
  return {
    ...data,
    cells,
    keys: data.keys.subarray(0, cells * dims),
    count: data.count.subarray(0, cells),
    sums: data.sums.subarray(0, cells * stored),
    sigmaMin: data.sigmaMin.subarray(0, cells),
    sigmaMax: data.sigmaMax.subarray(0, cells),
    sigmaRef: data.sigmaRef.subarray(0, cells),
    expSum: data.expSum.subarray(0, cells),
  };
}
