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

export class CellTable {
  level = 0;
  size = 0;
  private slots: number;
  private mask: number;
  private slotCell: Int32Array | undefined;
  private keys!: Float64Array;
  private count!: Float64Array;
  private sums!: Float64Array;
  private sigmaMin!: Float64Array;
  private sigmaMax!: Float64Array;
  private sigmaRef!: Float64Array;
  private products!: Float64Array;
  private expSum!: Float64Array;
  private readonly key: Float64Array;
  private readonly inverseStep: Float64Array;
  /** 3^(column level) of each column at the current table level. */
  private readonly factor: Float64Array;

  constructor(readonly spec: GridSpec) {
    this.level = spec.startLevel;
    this.slots = 1;
    while (this.slots < 2 * spec.capacity) this.slots *= 2;
    this.mask = this.slots - 1;
    this.allocate();
    this.key = new Float64Array(spec.dims);
    this.inverseStep = Float64Array.from(spec.step0, (s) => 1 / s);
    this.factor = new Float64Array(spec.dims);
    this.setFactors();
  }

  refreshFactors(): void {
    this.setFactors();
  }

  private setFactors(): void {
    for (let d = 0; d < this.spec.dims; d++) this.factor[d] = 3 ** columnLevel(this.level, this.spec.delay[d], this.spec.maxColumnLevel[d]);
  }

  private allocate(): void {
    const { dims, stored, capacity } = this.spec;
    const cells = capacity + 1;
    if (this.slotCell) {
      // Reuse the arrays: on this machine class, touching fresh memory costs more than the work itself.
      this.slotCell.fill(EMPTY);
      this.count.fill(0);
      this.sums.fill(0);
      this.expSum.fill(0);
      this.products.fill(0);
      this.size = 0;
      return;
    }
    this.slotCell = new Int32Array(this.slots).fill(EMPTY);
    this.keys = new Float64Array(cells * dims);
    this.count = new Float64Array(cells);
    this.sums = new Float64Array(cells * stored);
    this.sigmaMin = new Float64Array(cells);
    this.sigmaMax = new Float64Array(cells);
    this.sigmaRef = new Float64Array(cells);
    this.expSum = new Float64Array(cells);
    this.products = new Float64Array(cells * this.spec.pairs.length);
    this.size = 0;
  }

  /**
   * Add `weight` realisations with key columns `x` (length dims), stored values
   * `values` (length stored) and entropy production `sigma`.
   */
  add(x: Float64Array, values: Float64Array, weight: number, sigma: number): void {
    const { dims, stored } = this.spec;
    const key = this.key;
    for (let d = 0; d < dims; d++) {
      const k = Math.floor(x[d] * this.inverseStep[d] + 0.5);
      const p = this.factor[d];
      key[d] = p === 1 ? k : Math.floor((k + (p - 1) / 2) / p);
    }
    const cell = this.cellFor(key);
    if (this.count[cell] === 0) this.sigmaRef[cell] = sigma;
    this.count[cell] += weight;
    const base = cell * stored;
    for (let s = 0; s < stored; s++) this.sums[base + s] += weight * values[s];
    const pairs = this.spec.pairs;
    const pbase = cell * pairs.length;
    for (let p = 0; p < pairs.length; p++) this.products[pbase + p] += weight * values[pairs[p][0]] * values[pairs[p][1]];
    if (sigma < this.sigmaMin[cell]) this.sigmaMin[cell] = sigma;
    if (sigma > this.sigmaMax[cell]) this.sigmaMax[cell] = sigma;
    this.expSum[cell] += weight * Math.exp(this.sigmaRef[cell] - sigma);
    if (this.size > this.spec.capacity) this.coarsen();
  }

  /** Index of the cell with this key, created empty if new. */
  private cellFor(key: Float64Array): number {
    const dims = this.spec.dims;
    let h = 0x811c9dc5;
    for (let d = 0; d < dims; d++) {
      const k = key[d];
      h = Math.imul(h ^ (k | 0), 0x01000193);
      h = Math.imul(h ^ ((k / 4294967296) | 0), 0x01000193);
    }
    h ^= h >>> 15;
    let slot = h & this.mask;
    while (true) {
      const cell = this.slotCell![slot];
      if (cell === EMPTY) break;
      let same = true;
      const base = cell * dims;
      for (let d = 0; d < dims; d++) {
        if (this.keys[base + d] !== key[d]) {
          same = false;
          break;
        }
      }
      if (same) return cell;
      slot = (slot + 1) & this.mask;
    }
    const cell = this.size++;
    this.slotCell![slot] = cell;
    this.keys.set(key, cell * dims);
    this.sigmaMin[cell] = Infinity;
    this.sigmaMax[cell] = -Infinity;
    return cell;
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
      this.setFactors();
      this.allocate();
      this.absorb(old, false);
    } while (this.size > this.spec.capacity);
  }

  /** Add every cell of `data` (at a level ≤ this.level) into this table. */
  absorb(data: CellTableData, autoCoarsen = true): void {
    const { dims, stored, delay, maxColumnLevel } = this.spec;
    const key = this.key;
    for (let c = 0; c < data.cells; c++) {
      for (let d = 0; d < dims; d++) {
        const k = data.keys[c * dims + d];
        key[d] = coarserIndex(k, columnLevel(data.level, delay[d], maxColumnLevel[d]), columnLevel(this.level, delay[d], maxColumnLevel[d]));
      }
      const cell = this.cellFor(key);
      if (this.count[cell] === 0) this.sigmaRef[cell] = data.sigmaRef[c];
      this.count[cell] += data.count[c];
      for (let s = 0; s < stored; s++) this.sums[cell * stored + s] += data.sums[c * stored + s];
      const P = this.spec.pairs.length;
      for (let p = 0; p < P; p++) this.products[cell * P + p] += data.products[c * P + p];
      if (data.sigmaMin[c] < this.sigmaMin[cell]) this.sigmaMin[cell] = data.sigmaMin[c];
      if (data.sigmaMax[c] > this.sigmaMax[cell]) this.sigmaMax[cell] = data.sigmaMax[c];
      this.expSum[cell] += data.expSum[c] * Math.exp(this.sigmaRef[cell] - data.sigmaRef[c]);
      if (autoCoarsen && this.size > this.spec.capacity) this.coarsen();
    }
  }

  /** The occupied cells as plain arrays, in the order they were created. */
  export(): CellTableData {
    const { dims, stored } = this.spec;
    const n = this.size;
    return {
      level: this.level,
      cells: n,
      keys: this.keys.slice(0, n * dims),
      count: this.count.slice(0, n),
      sums: this.sums.slice(0, n * stored),
      sigmaMin: this.sigmaMin.slice(0, n),
      sigmaMax: this.sigmaMax.slice(0, n),
      sigmaRef: this.sigmaRef.slice(0, n),
      expSum: this.expSum.slice(0, n),
      products: this.products.slice(0, n * this.spec.pairs.length),
    };
  }
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
