/**
 * A mergeable summary of many realisations: realisations with the same key
 * (a point on a grid over a few columns) are pooled into one cell that keeps
 * their number, the sum of every stored column, and the smallest and largest
 * entropy production among them.
 *
 * The grid. Column d is cut at multiples of step_d = step0_d · 2^level (level
 * shared by the coarsenable columns), so a cell at one level is exactly the
 * union of two neighbouring cells at the level below: floor(floor(x/s)/2) =
 * floor(x/2s). When a table holds more than its capacity of cells it goes up
 * one level. Summaries of different parts of a file therefore merge exactly
 * (bring both to the higher level, add cell by cell), and the result depends
 * only on the data and the capacity, not on how the file was split — apart from
 * the order of floating-point additions, which a fixed split fixes.
 *
 * What is kept exactly: the number of realisations, every column's total (so
 * every mean), and, through the Σ range of each cell, a bound on how far any
 * realisation's entropy production is from its cell's mean. With step0 far
 * below the resolution of printed data, distinct printed values fall in
 * distinct cells and nothing is lost; the Σ ranges say whether that happened.
 */

export interface GridSpec {
  /** Columns that make up the key. */
  dims: number;
  /** Finest step of each key column (a power of two, in the column's unit). */
  step0: Float64Array;
  /** Columns whose step grows with the level (the others keep step0: whole-number columns). */
  coarsenable: Uint8Array;
  /** Stored sums per cell. */
  stored: number;
  /** Most cells a table may hold before it coarsens. */
  capacity: number;
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
}

const EMPTY = -1;

export class CellTable {
  level = 0;
  size = 0;
  private slots: number;
  private mask: number;
  private slotCell!: Int32Array;
  private keys!: Float64Array;
  private count!: Float64Array;
  private sums!: Float64Array;
  private sigmaMin!: Float64Array;
  private sigmaMax!: Float64Array;
  private readonly key: Float64Array;
  private readonly inverseStep: Float64Array;

  constructor(readonly spec: GridSpec) {
    this.slots = 1;
    while (this.slots < 2 * spec.capacity) this.slots *= 2;
    this.mask = this.slots - 1;
    this.allocate();
    this.key = new Float64Array(spec.dims);
    this.inverseStep = Float64Array.from(spec.step0, (s) => 1 / s);
  }

  private allocate(): void {
    const { dims, stored, capacity } = this.spec;
    const cells = capacity + 1;
    this.slotCell = new Int32Array(this.slots).fill(EMPTY);
    this.keys = new Float64Array(cells * dims);
    this.count = new Float64Array(cells);
    this.sums = new Float64Array(cells * stored);
    this.sigmaMin = new Float64Array(cells);
    this.sigmaMax = new Float64Array(cells);
    this.size = 0;
  }

  /**
   * Add `weight` realisations with key columns `x` (length dims), stored values
   * `values` (length stored) and entropy production `sigma`.
   */
  add(x: Float64Array, values: Float64Array, weight: number, sigma: number): void {
    const { dims, stored, coarsenable } = this.spec;
    const key = this.key;
    const shift = Math.pow(2, -this.level);
    for (let d = 0; d < dims; d++) {
      const k = Math.floor(x[d] * this.inverseStep[d]);
      key[d] = coarsenable[d] ? Math.floor(k * shift) : k;
    }
    const cell = this.cellFor(key);
    this.count[cell] += weight;
    const base = cell * stored;
    for (let s = 0; s < stored; s++) this.sums[base + s] += weight * values[s];
    if (sigma < this.sigmaMin[cell]) this.sigmaMin[cell] = sigma;
    if (sigma > this.sigmaMax[cell]) this.sigmaMax[cell] = sigma;
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
      const cell = this.slotCell[slot];
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
    this.slotCell[slot] = cell;
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
      if (this.level - old.level > 64) {
        // Whole-number columns alone hold more distinct values than the capacity: pool them too.
        this.spec.coarsenable.fill(1);
      }
      this.allocate();
      this.absorb(old, false);
    } while (this.size > this.spec.capacity);
  }

  /** Add every cell of `data` (at a level ≤ this.level) into this table. */
  absorb(data: CellTableData, autoCoarsen = true): void {
    const { dims, stored, coarsenable } = this.spec;
    const key = this.key;
    let level = this.level;
    let shift = Math.pow(2, data.level - level);
    for (let c = 0; c < data.cells; c++) {
      if (this.level !== level) {
        level = this.level;
        shift = Math.pow(2, data.level - level);
      }
      for (let d = 0; d < dims; d++) {
        const k = data.keys[c * dims + d];
        key[d] = coarsenable[d] ? Math.floor(k * shift) : k;
      }
      const cell = this.cellFor(key);
      this.count[cell] += data.count[c];
      for (let s = 0; s < stored; s++) this.sums[cell * stored + s] += data.sums[c * stored + s];
      if (data.sigmaMin[c] < this.sigmaMin[cell]) this.sigmaMin[cell] = data.sigmaMin[c];
      if (data.sigmaMax[c] > this.sigmaMax[cell]) this.sigmaMax[cell] = data.sigmaMax[c];
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
  table.level = Math.max(0, ...parts.map((p) => p.level));
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
  };
  order.forEach((from, to) => {
    out.keys.set(data.keys.subarray(from * dims, (from + 1) * dims), to * dims);
    out.sums.set(data.sums.subarray(from * stored, (from + 1) * stored), to * stored);
    out.count[to] = data.count[from];
    out.sigmaMin[to] = data.sigmaMin[from];
    out.sigmaMax[to] = data.sigmaMax[from];
  });
  return out;
}
