import { entropyProduction } from "../../physics/entropyProduction.ts";
import { newProblemLog, type ProblemLog } from "../../errors.ts";
import { CellTable, type CellTableData, type GridSpec, type RowBlock } from "./cellTable.ts";
import { conductorRowsOf, logSigmaOutOfRange, sampleRowsOf, sigmaInRange, subtractHeldParticles, type SampleRole, type SampleRoles, type SampleRows } from "../samplesRows.ts";
import type { RowChunk, ScanLayout, ScanState } from "../fast/scanLines.ts";
import { scanFileRange } from "../fast/scanRange.ts";

/** Everything a thread needs to reduce its share of a `samples` file (plain data: it crosses to workers). */
export interface SamplesReductionSpec {
  label: string;
  dataset: string;
  roles: SampleRoles;
  /** Slot of each mapped role in the scanner's output. */
  slotOfRole: Partial<Record<SampleRole, number>>;
  joules: number;
  /**
   * Σ = cW W + cQ Q + cN ΔN per realisation (cW = 0 when work: zero is declared), less cHeld (dN_A + dN_B)
   * with per-lead particle columns (Σ_res, samplesRows.ts subtractHeldParticles); cHeld absent: 0.
   */
  sigma: { cW: number; cQ: number; cN: number; cHeld?: number };
  /** β̄ (1/J), for the β̄W key column. */
  betaBar: number;
  /** Columns forming the grid key, and columns whose sums are kept. */
  keyColumns: KeyColumn[];
  storedColumns: SampleColumn[];
  grid: GridSpec;
}

/**
 * Columns of the reduced rows (J; particles as counted; state labels as written). With per-lead columns
 * ΔN is their symmetric split (dN_B − dN_A)/2.
 */
export type SampleColumn = "Q" | "W" | "dN" | "dE_A" | "dE_B" | "dN_A" | "dN_B" | "state_start" | "state_end";
/** Columns a cell key may use: the stored ones, Σ and β̄W (k_B). */
export type KeyColumn = SampleColumn | "sigma" | "betaW";

export interface SamplesPartSummary {
  state: Pick<ScanState, "rows" | "line" | "problems" | "problemCount" | "structural">;
  rowProblems: ProblemLog;
  table: CellTableData;
}

/** A sink that turns chunks of raw rows into cells. */
export class SamplesReducer {
  readonly table: CellTable;
  readonly rowProblems = newProblemLog();
  private readonly rowBuffer = new Float64Array(5);
  private weightBuffer = new Float64Array(0);
  private block: RowBlock = { rows: 0, x: new Float64Array(0), v: new Float64Array(0), sigma: new Float64Array(0) };

  /** Buffers for a block of rows, reused from chunk to chunk. */
  private blockFor(rows: number, dims: number, stored: number): RowBlock {
    if (this.block.sigma.length < rows) {
      this.block = { rows: 0, x: new Float64Array(rows * dims), v: new Float64Array(rows * stored), sigma: new Float64Array(rows) };
    }
    return this.block;
  }

  constructor(readonly spec: SamplesReductionSpec) {
    this.table = new CellTable(spec.grid);
  }

  accept(chunk: RowChunk): void {
    const { spec } = this;
    const r = spec.roles;
    if (r.dE_A === undefined && r.count === undefined && r.Q !== undefined && r.dN_A === undefined && r.state_start === undefined) return this.acceptPlain(chunk);
    const raw: Partial<Record<SampleRole, Float64Array>> = {};
    for (const [role, slot] of Object.entries(spec.slotOfRole)) raw[role as SampleRole] = chunk.values[slot!];
    const read = reducedColumns(raw, spec, chunk.rows, chunk.lines, this.rowProblems);
    if (read === null) return; // the file is refused; only the problems matter now
    const { rows, columns, sigma } = read;
    const W = rows.W_data;
    const betaW = W ? W.map((w) => spec.betaBar * w) : null;
    const key = spec.keyColumns.map((c) => (c === "sigma" ? sigma : c === "betaW" ? betaW! : columns[c]!));
    const stored = spec.storedColumns.map((c) => columns[c]!);
    const weight = rows.weight;
    const dims = key.length;
    const S = stored.length;
    const block = this.blockFor(chunk.rows, dims, S);
    if (weight && this.weightBuffer.length < chunk.rows) this.weightBuffer = new Float64Array(chunk.rows);
    const weights = this.weightBuffer;
    let n = 0;
    for (let i = 0; i < chunk.rows; i++) {
      const w = weight ? weight[i] : 1;
      if (w === 0) continue; // a histogram's empty bin holds no realisation
      for (let d = 0; d < dims; d++) block.x[n * dims + d] = key[d][i];
      for (let s = 0; s < S; s++) block.v[n * S + s] = stored[s][i];
      block.sigma[n] = sigma[i];
      if (weight) weights[n] = w;
      n++;
    }
    block.rows = n;
    this.table.addRows(weight ? { ...block, weight: weights } : block);
  }

  /**
   * The common layout (Q, optionally W and ΔN, one realisation a row): no
   * redundant columns to cross-check and no counts to validate, so rows go
   * straight from the scanner's columns into the table without intermediate
   * arrays. Same arithmetic as the general path (sampleRowsOf), same result.
   */
  private acceptPlain(chunk: RowChunk): void {
    const { spec } = this;
    const j = spec.joules;
    const qs = chunk.values[spec.slotOfRole.Q!];
    const ws = spec.slotOfRole.W !== undefined ? chunk.values[spec.slotOfRole.W] : null;
    const ns = spec.slotOfRole.dN !== undefined ? chunk.values[spec.slotOfRole.dN] : null;
    const { cW, cQ, cN } = spec.sigma;
    // Each key and stored column as an index into one row: [Σ, Q, W, ΔN, β̄W].
    const source = { sigma: 0, Q: 1, W: 2, dN: 3, betaW: 4 } as Record<string, number>;
    const bb = spec.betaBar;
    const keyAt = Int32Array.from(spec.keyColumns, (c) => source[c]);
    const storedAt = Int32Array.from(spec.storedColumns, (c) => source[c]);
    const row = this.rowBuffer;
    const dims = keyAt.length;
    const S = storedAt.length;
    const block = this.blockFor(chunk.rows, dims, S);
    const x = block.x;
    const v = block.v;
    // The benchmark's and most files' layout, written out; any other through the index arrays.
    const common = spec.keyColumns.join() === "sigma,betaW,dN" && spec.storedColumns.join() === "Q,W,dN";
    let n = 0;
    for (let i = 0; i < chunk.rows; i++) {
      const Q = qs[i] * j;
      const W = ws ? ws[i] * j : 0;
      const dN = ns ? ns[i] : 0;
      const sigma = cW * W + cQ * Q + cN * dN;
      if (!sigmaInRange(sigma)) {
        logSigmaOutOfRange([sigma], [chunk.lines[i]], spec.roles.Q!, this.rowProblems, spec.dataset);
        continue;
      }
      if (this.rowProblems.count > 0) continue; // the file is refused; only the problems matter now
      block.sigma[n] = sigma;
      if (common) {
        x[3 * n] = sigma;
        x[3 * n + 1] = bb * W;
        x[3 * n + 2] = dN;
        v[3 * n] = Q;
        v[3 * n + 1] = W;
        v[3 * n + 2] = dN;
        n++;
        continue;
      }
      row[0] = sigma;
      row[1] = Q;
      row[2] = W;
      row[3] = dN;
      row[4] = bb * W;
      for (let d = 0; d < dims; d++) x[n * dims + d] = row[keyAt[d]];
      for (let k = 0; k < S; k++) v[n * S + k] = row[storedAt[k]];
      n++;
    }
    block.rows = n;
    this.table.addRows(block);
  }
}

/**
 * The rows of a chunk as the summary keys and stores them: the row rules (samplesRows.ts), the conductor's
 * columns where mapped, and Σ (Σ_res with per-lead particle columns) with overflowing rows logged; null when
 * the chunk has a problem (the file is then refused). Also what the grid is chosen from (reductionSpec).
 */
export function reducedColumns(
  raw: Partial<Record<SampleRole, Float64Array>>,
  spec: Pick<SamplesReductionSpec, "roles" | "joules" | "sigma" | "dataset">,
  count: number,
  lines: ArrayLike<number>,
  problems: ProblemLog,
): { rows: SampleRows; columns: Record<SampleColumn, Float64Array | null>; sigma: Float64Array } | null {
  const rows = sampleRowsOf(raw, spec.roles, spec.joules, count, lines, problems);
  const conductor = conductorRowsOf(raw, spec.roles, count, lines, problems);
  if (problems.count > 0) return null;
  const dN = conductor?.dN ?? rows.dN;
  const columns: Record<SampleColumn, Float64Array | null> = {
    Q: rows.Q,
    W: rows.W_data,
    dN,
    dE_A: rows.dE_A,
    dE_B: rows.dE_B,
    dN_A: conductor?.dN_A ?? null,
    dN_B: conductor?.dN_B ?? null,
    state_start: conductor?.start ?? null,
    state_end: conductor?.end ?? null,
  };
  const sigma = subtractHeldParticles(sigmaOfRows({ ...rows, dN }, spec.sigma), conductor?.held ?? null, spec.sigma.cHeld ?? 0);
  logSigmaOutOfRange(sigma, lines, spec.roles.Q ?? spec.roles.dE_B!, problems, spec.dataset);
  return problems.count > 0 ? null : { rows, columns, sigma };
}

/**
 * Σ = cW W + cQ Q + cN ΔN of each row (k_B): entropyProduction with the
 * reduction's coefficients (cW = 0 when the work is declared zero), absent
 * columns counting as zeros. `acceptPlain` forms the same sum row by row.
 */
export function sigmaOfRows(rows: SampleRows, c: SamplesReductionSpec["sigma"]): Float64Array {
  const zeros = rows.W_data && rows.dN ? null : new Float64Array(rows.rows);
  return entropyProduction({ beta_bar: c.cW, a_Q: c.cQ, a_N: c.cN }, rows.W_data ?? zeros!, rows.Q, rows.dN ?? zeros!);
}

/** Scan one byte range of an open file and reduce it: the work of one thread. */
export function reduceFileRange(fd: number, start: number, end: number, layout: ScanLayout, spec: SamplesReductionSpec, onBytes?: (n: number) => void): SamplesPartSummary {
  const reducer = new SamplesReducer(spec);
  const state = scanFileRange(fd, start, end, layout, (chunk) => reducer.accept(chunk), { onBytes });
  return {
    state: { rows: state.rows, line: state.line, problems: state.problems, problemCount: state.problemCount, structural: state.structural ?? state.refusal?.message ?? null },
    rowProblems: reducer.rowProblems,
    table: reducer.table.exportSorted(),
  };
}
