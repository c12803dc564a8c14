/**
 * A mergeable summary of many realisations: realisations with the same key
 * (a cell of a grid over a few columns) are pooled into one cell that keeps
 * their number, the sum of every stored column, the smallest and largest
 * entropy production Σ among them, and the sum of e^{−Σ}.
 *
 * The grid is centred and mirror-symmetric: at level 0 column d is cut into
 * cells [(k − ½)s, (k + ½)s) of width s = step0_d, so the mirror image of cell
 * k is cell −k and a realisation and its time reverse fall into mirrored cells.
 * Each table level L puts column d at its own level min(max_d, max(0, L − delay_d))
 * (a column with an infinite delay, such as a count, never widens), and each
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
  /** Pairs (a, b) of stored columns whose product sums are kept too (second moments). */
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
  /** cells × pairs sums of w x_a x_b over each cell. */
  products: Float64Array;
  /** Σ of the first realisation of each cell, and the sum over the cell of w e^{−(Σ − that reference)}. */
  sigmaRef: Float64Array;
  expSum: Float64Array;
}

const EMPTY = -1;
/** Levels beyond this would need cell indices past 2^53 / 3^L exactness. */
export const MAX_LEVEL = 30;

/** A column's own level at table level L. */
export function columnLevel(level: number, delay: number, max = Infinity): number {
  return Math.min(max, Math.max(0, level - delay));
}

/** Index at `toLevel` of the cell with index k at `fromLevel` (centred cells, factor 3 a level). */
export function coarserIndex(k: number, fromLevel: number, toLevel: number): number {
  if (toLevel === fromLevel) return k;
  const p = 3 ** (toLevel - fromLevel);
  return Math.floor((k + (p - 1) / 2) / p);
}

/** Rows handed to `addRows`: key columns and stored values row-major, one Σ a row, all of weight 1. */
export interface RowBlock {
  rows: number;
  x: Float64Array; // rows × dims
  v: Float64Array; // rows × stored
  sigma: Float64Array;
}

/**
 * The table. Each cell's record lives at its hash slot, all quantities side by
 * side in one Float64Array: [key × dims, count, sums × stored, products ×
 * pairs, Σmin, Σmax, Σref, Σ w e^−(Σ−Σref)]. `addRows` inserts a block of rows
 * partition by partition (by the top bits of their slots), so that each
 * partition's records stay in cache while it is filled: with 10^5 cells, random
 * access into the table otherwise dominates the reading of a large file. Rows
 * keep their order within a cell (a stable partition), so every sum and each
 * cell's reference Σ are those of the row-by-row order — except in a block
 * during which the table goes up a level, whose remaining rows are added in
 * partition order (the same on every run, so results still reproduce exactly).
 */
export class CellTable {
  level = 0;
  size = 0;
  private slots = 0;
  private mask = 0;
  private used!: Uint8Array;
  private data!: Float64Array;
  private readonly maxSlots: number;
  private readonly stride: number;
  private readonly oCount: number;
  private readonly oSums: number;
  private readonly oProducts: number;
  private readonly oMin: number;
  private readonly oMax: number;
  private readonly oRef: number;
  private readonly oExp: number;
  private readonly pairA: Int32Array;
  private readonly pairB: Int32Array;
  private readonly key: Float64Array;
  private readonly inverseStep: Float64Array;
  /** 3^(column level) of each column at the current table level. */
  private readonly factor: Float64Array;
  // Scratch for addRows, grown on demand.
  private hashes = new Int32Array(0);
  private keysOfRows = new Float64Array(0);
  private sortedHashes = new Int32Array(0);
  private sortedKeys = new Float64Array(0);
  private sortedValues = new Float64Array(0);
  private sortedSigma = new Float64Array(0);
  private sortedRow = new Int32Array(0);
  private readonly partitionStart = new Int32Array(PARTITIONS + 1);

  constructor(readonly spec: GridSpec) {
    this.level = spec.startLevel;
    let max = 1;
    while (max < 2 * (spec.capacity + 1)) max *= 2;
    this.maxSlots = max;
    this.oCount = spec.dims;
    this.oSums = this.oCount + 1;
    this.oProducts = this.oSums + spec.stored;
    this.oMin = this.oProducts + spec.pairs.length;
    this.oMax = this.oMin + 1;
    this.oRef = this.oMax + 1;
    this.oExp = this.oRef + 1;
    this.stride = this.oExp + 1;
    this.pairA = Int32Array.from(spec.pairs, (p) => p[0]);
    this.pairB = Int32Array.from(spec.pairs, (p) => p[1]);
    // Start at a quarter of the largest table: at most two doublings (re-insertions), and a
    // smaller working set while the table fills, which is most of the cost on this machine class.
    this.allocate(Math.max(1 << 10, this.maxSlots / 4));
    this.key = new Float64Array(spec.dims);
    this.inverseStep = Float64Array.from(spec.step0, (s) => 1 / s);
    this.factor = new Float64Array(spec.dims);
    this.refreshFactors();
  }

  /** 3^(column level) of each column, after the level was set. */
  refreshFactors(): void {
    for (let d = 0; d < this.spec.dims; d++) this.factor[d] = 3 ** columnLevel(this.level, this.spec.delay[d], this.spec.maxColumnLevel[d]);
  }

  private allocate(slots: number): void {
    this.slots = slots;
    this.mask = slots - 1;
    this.used = new Uint8Array(slots);
    this.data = new Float64Array(slots * this.stride);
    this.size = 0;
  }

  /** Grid indices of raw key values x (length dims) at the current level, into `out` at `at`. */
  private gridKey(x: Float64Array, xAt: number, out: Float64Array, at: number): void {
    for (let d = 0; d < this.spec.dims; d++) {
      const k = Math.floor(x[xAt + d] * this.inverseStep[d] + 0.5);
      const p = this.factor[d];
      out[at + d] = p === 1 ? k : Math.floor((k + (p - 1) / 2) / p);
    }
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

  /** Offset of the record with this key (created empty if new). */
  private recordFor(key: Float64Array, at: number, hash: number): number {
    const dims = this.spec.dims;
    const data = this.data;
    let slot = hash & this.mask;
    while (this.used[slot] === 1) {
      const base = slot * this.stride;
      let same = true;
      for (let d = 0; d < dims; d++) {
        if (data[base + d] !== key[at + d]) {
          same = false;
          break;
        }
      }
      if (same) return base;
      slot = (slot + 1) & this.mask;
    }
    this.used[slot] = 1;
    this.size++;
    const base = slot * this.stride;
    for (let d = 0; d < dims; d++) data[base + d] = key[at + d];
    data[base + this.oMin] = Infinity;
    data[base + this.oMax] = -Infinity;
    return base;
  }

  /** Add `weight` realisations at record `base`. */
  private accumulate(base: number, v: Float64Array, vAt: number, weight: number, sigma: number): void {
    const data = this.data;
    if (data[base + this.oCount] === 0) data[base + this.oRef] = sigma;
    data[base + this.oCount] += weight;
    const sums = base + this.oSums;
    for (let s = 0; s < this.spec.stored; s++) data[sums + s] += weight * v[vAt + s];
    const products = base + this.oProducts;
    for (let p = 0; p < this.pairA.length; p++) data[products + p] += weight * v[vAt + this.pairA[p]] * v[vAt + this.pairB[p]];
    if (sigma < data[base + this.oMin]) data[base + this.oMin] = sigma;
    if (sigma > data[base + this.oMax]) data[base + this.oMax] = sigma;
    data[base + this.oExp] += weight * Math.exp(data[base + this.oRef] - sigma);
  }

  /** After a new cell: grow the slots while they can, coarsen once the capacity is reached. */
  private afterInsert(): boolean {
    if (this.size > this.spec.capacity) {
      this.coarsen();
      return true;
    }
    if (2 * this.size > this.slots && this.slots < this.maxSlots) this.grow();
    return false;
  }

  private grow(): void {
    const old = this.export();
    this.allocate(this.slots * 2);
    this.absorb(old, false);
  }

  /**
   * Add `weight` realisations with key columns `x` (length dims), stored values
   * `values` (length stored) and entropy production `sigma`.
   */
  add(x: Float64Array, values: Float64Array, weight: number, sigma: number): void {
    this.gridKey(x, 0, this.key, 0);
    const before = this.size;
    const base = this.recordFor(this.key, 0, this.hashOf(this.key, 0));
    this.accumulate(base, values, 0, weight, sigma);
    if (this.size !== before) this.afterInsert();
  }

  /** Add a block of rows of weight 1, partition by partition (see the class comment). */
  addRows(block: RowBlock): void {
    const { dims, stored } = this.spec;
    const n = block.rows;
    if (this.hashes.length < n) {
      this.hashes = new Int32Array(n);
      this.sortedHashes = new Int32Array(n);
      this.keysOfRows = new Float64Array(n * dims);
      this.sortedKeys = new Float64Array(n * dims);
      this.sortedValues = new Float64Array(n * stored);
      this.sortedSigma = new Float64Array(n);
      this.sortedRow = new Int32Array(n);
    }
    const level = this.level;
    const keys = this.keysOfRows;
    const hashes = this.hashes;
    for (let i = 0; i < n; i++) {
      this.gridKey(block.x, i * dims, keys, i * dims);
      hashes[i] = this.hashOf(keys, i * dims);
    }
    // Stable counting sort of the rows by the top bits of their slot, moving the rows
    // themselves so that both the rows and the records are then read in order.
    const shift = Math.max(0, Math.log2(this.slots) - PARTITION_BITS);
    const start = this.partitionStart;
    start.fill(0);
    for (let i = 0; i < n; i++) start[((hashes[i] & this.mask) >>> shift) + 1]++;
    for (let p = 0; p < PARTITIONS; p++) start[p + 1] += start[p];
    const sk = this.sortedKeys;
    const sv = this.sortedValues;
    const ss = this.sortedSigma;
    const sh = this.sortedHashes;
    const sr = this.sortedRow;
    for (let i = 0; i < n; i++) {
      const j = start[(hashes[i] & this.mask) >>> shift]++;
      for (let d = 0; d < dims; d++) sk[j * dims + d] = keys[i * dims + d];
      for (let s = 0; s < stored; s++) sv[j * stored + s] = block.v[i * stored + s];
      ss[j] = block.sigma[i];
      sh[j] = hashes[i];
      sr[j] = i;
    }
    for (let j = 0; j < n; j++) {
      if (this.level !== level) {
        // The table went up a level part-way: the rest go in one by one at the new level.
        const i = sr[j];
        this.add(block.x.subarray(i * dims, (i + 1) * dims), sv.subarray(j * stored, (j + 1) * stored), 1, ss[j]);
        continue;
      }
      const before = this.size;
      const base = this.recordFor(sk, j * dims, sh[j]);
      this.accumulate(base, sv, j * stored, 1, ss[j]);
      if (this.size !== before) this.afterInsert();
    }
  }

  /** Go up one level (or more, until the cells fit): pool neighbouring cells of the coarsenable columns. */
  coarsen(): void {
    const old = this.export();
    do {
      this.level++;
      if (this.level > MAX_LEVEL) {
        // Whole-number columns alone hold more distinct values than the capacity: pool them too.
        this.level = old.level + 1;
        this.spec.delay.forEach((d, i) => {
          if (!Number.isFinite(d)) this.spec.delay[i] = old.level;
        });
        this.spec.maxColumnLevel.fill(Infinity);
      }
      this.refreshFactors();
      this.allocate(this.slots);
      this.absorb(old, false);
    } while (this.size > this.spec.capacity);
  }

  /** Add every cell of `data` (at a level ≤ this.level) into this table. */
  absorb(data: CellTableData, autoCoarsen = true): void {
    const { dims, stored, delay, maxColumnLevel } = this.spec;
    const key = this.key;
    const P = this.pairA.length;
    for (let c = 0; c < data.cells; c++) {
      for (let d = 0; d < dims; d++) {
        const k = data.keys[c * dims + d];
        key[d] = coarserIndex(k, columnLevel(data.level, delay[d], maxColumnLevel[d]), columnLevel(this.level, delay[d], maxColumnLevel[d]));
      }
      const before = this.size;
      const base = this.recordFor(key, 0, this.hashOf(key, 0));
      const own = this.data;
      if (own[base + this.oCount] === 0) own[base + this.oRef] = data.sigmaRef[c];
      own[base + this.oCount] += data.count[c];
      for (let s = 0; s < stored; s++) own[base + this.oSums + s] += data.sums[c * stored + s];
      for (let p = 0; p < P; p++) own[base + this.oProducts + p] += data.products[c * P + p];
      if (data.sigmaMin[c] < own[base + this.oMin]) own[base + this.oMin] = data.sigmaMin[c];
      if (data.sigmaMax[c] > own[base + this.oMax]) own[base + this.oMax] = data.sigmaMax[c];
      own[base + this.oExp] += data.expSum[c] * Math.exp(own[base + this.oRef] - data.sigmaRef[c]);
      if (this.size === before) continue;
      if (autoCoarsen) this.afterInsert();
      else if (2 * this.size > this.slots && this.slots < this.maxSlots) {
        // Growing while re-inserting: finish into a larger table (the old one is a snapshot).
        const partial = this.export();
        const rest: CellTableData = sliceCells(data, c + 1, dims, stored, P);
        this.allocate(this.slots * 2);
        this.absorb(partial, false);
        this.absorb(rest, false);
        return;
      }
    }
  }

  /** The occupied cells as plain arrays, in slot order. */
  export(): CellTableData {
    const { dims, stored } = this.spec;
    const P = this.pairA.length;
    const n = this.size;
    const out: CellTableData = {
      level: this.level,
      cells: n,
      keys: new Float64Array(n * dims),
      count: new Float64Array(n),
      sums: new Float64Array(n * stored),
      sigmaMin: new Float64Array(n),
      sigmaMax: new Float64Array(n),
      sigmaRef: new Float64Array(n),
      expSum: new Float64Array(n),
      products: new Float64Array(n * P),
    };
    const data = this.data;
    let c = 0;
    for (let slot = 0; slot < this.slots; slot++) {
      if (this.used[slot] === 0) continue;
      const base = slot * this.stride;
      for (let d = 0; d < dims; d++) out.keys[c * dims + d] = data[base + d];
      out.count[c] = data[base + this.oCount];
      for (let s = 0; s < stored; s++) out.sums[c * stored + s] = data[base + this.oSums + s];
      for (let p = 0; p < P; p++) out.products[c * P + p] = data[base + this.oProducts + p];
      out.sigmaMin[c] = data[base + this.oMin];
      out.sigmaMax[c] = data[base + this.oMax];
      out.sigmaRef[c] = data[base + this.oRef];
      out.expSum[c] = data[base + this.oExp];
      c++;
    }
    return out;
  }
}

/** Partitions of a block of rows in `addRows`: 2^6, so that a partition's records fit in cache. */
const PARTITION_BITS = 8;
const PARTITIONS = 1 << PARTITION_BITS;

/** Cells [from, cells) of a table's data. */
function sliceCells(data: CellTableData, from: number, dims: number, stored: number, P: number): CellTableData {
  return {
    level: data.level,
    cells: data.cells - from,
    keys: data.keys.subarray(from * dims),
    count: data.count.subarray(from),
    sums: data.sums.subarray(from * stored),
    sigmaMin: data.sigmaMin.subarray(from),
    sigmaMax: data.sigmaMax.subarray(from),
    sigmaRef: data.sigmaRef.subarray(from),
    expSum: data.expSum.subarray(from),
    products: data.products.subarray(from * P),
  };
}

/**
 * Merge tables of the parts of one file, in part order, into one table no
 * larger than the capacity, with its cells sorted by key (a canonical order, so
 * the summary does not depend on hash-table layout).
 */
export function mergeCellTables(spec: GridSpec, parts: CellTableData[]): CellTableData {
  const table = new CellTable(spec);
  table.level = Math.max(spec.startLevel, ...parts.map((p) => p.level));
  table.refreshFactors();
  for (const part of parts) table.absorb(part);
  return sortedByKey(spec, table.export());
}

function sortedByKey(spec: GridSpec, data: CellTableData): CellTableData {
  const { dims, stored } = spec;
  const order = Array.from({ length: data.cells }, (_, i) => i);
  order.sort((a, b) => {
    for (let d = 0; d < dims; d++) {
      const diff = data.keys[a * dims + d] - data.keys[b * dims + d];
      if (diff !== 0) return diff;
    }
    return 0;
  });
  const out: CellTableData = {
    level: data.level,
    cells: data.cells,
    keys: new Float64Array(data.cells * dims),
    count: new Float64Array(data.cells),
    sums: new Float64Array(data.cells * stored),
    sigmaMin: new Float64Array(data.cells),
    sigmaMax: new Float64Array(data.cells),
    sigmaRef: new Float64Array(data.cells),
    expSum: new Float64Array(data.cells),
    products: new Float64Array(data.cells * spec.pairs.length),
  };
  order.forEach((from, to) => {
    out.keys.set(data.keys.subarray(from * dims, (from + 1) * dims), to * dims);
    out.sums.set(data.sums.subarray(from * stored, (from + 1) * stored), to * stored);
    out.count[to] = data.count[from];
    out.sigmaMin[to] = data.sigmaMin[from];
    out.sigmaMax[to] = data.sigmaMax[from];
    out.sigmaRef[to] = data.sigmaRef[from];
    out.expSum[to] = data.expSum[from];
    const P = spec.pairs.length;
    out.products.set(data.products.subarray(from * P, (from + 1) * P), to * P);
  });
  return out;
}
