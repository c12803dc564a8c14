import type { SamplesDataset } from "../../ingest/types.ts";
import { fitExchangeLogistic } from "../../stats/logisticFit.ts";
import type { Rng } from "../../stats/rng.ts";

/**
 * Joint block bootstrap of the slopes A(τ) of ln P(n, τ)/P(−n, τ) = A(τ) n at several window lengths cut
 * from one trajectory. The windows at every τ overlap in time, so their slopes are correlated; resampling
 * each τ on its own would lose that. Instead the trajectory's time axis is cut into blocks of length L,
 * each replicate draws blocks of time with replacement once, and every τ takes the windows that start
 * inside the drawn blocks (a window is whole: counted in the block where it starts). This is the
 * non-overlapping block bootstrap (Carlstein, Ann. Stat. 14, 1171 (1986); Künsch, Ann. Stat. 17, 1217
 * (1989); Lahiri, Resampling Methods for Dependent Data (Springer, 2003), ch. 2) applied to the time axis
 * shared by all window lengths, so that one replicate holds the same stretches of the trace at every τ.
 *
 * L is the longest block of windows any τ uses (its block length in windows times τ, the block length
 * being twice the integrated autocorrelation time of its windows, at least 2): every τ then has at least
 * its own block length of windows in a block of time.
 */
export interface JointBootstrap {
  /** Time block length L (s) and number of time blocks. */
  blockSeconds: number;
  blocks: number;
  /** Replicates requested, and those in which every τ's slope could be fitted. */
  requested: number;
  used: number;
  /** Covariance of the slopes (order of the datasets given), from the usable replicates. */
  covariance: number[][];
}

/** Windows of one dataset as a histogram of counts per block of time. */
interface CountTable {
  values: number[];
  /** counts[b * values.length + v]: windows starting in time block b with count values[v]. */
  counts: Float64Array;
}

function countTable(d: SamplesDataset, count: ArrayLike<number>, blockSeconds: number, blocks: number): CountTable {
  const index = new Map<number, number>();
  for (let i = 0; i < count.length; i++) if (!index.has(count[i])) index.set(count[i], index.size);
  const values = [...index.keys()];
  const counts = new Float64Array(blocks * values.length);
  for (let i = 0; i < count.length; i++) {
    const b = timeBlock(i, d.tau!, blockSeconds);
    counts[b * values.length + index.get(count[i])!] += d.weight ? d.weight[i] : 1;
  }
  return { values, counts };
}

/** The time block in which window i (of length τ, windows back to back from the trace's start) starts. */
function timeBlock(i: number, tau: number, blockSeconds: number): number {
  return Math.floor((i * tau) / blockSeconds);
}

/**
 * `datasets`: windows of one trajectory at several lengths (each with `windows` and `tau`); `count`: the
 * counted transfer of each window of each dataset. Returns null when fewer than two time blocks exist.
 */
export function jointBootstrap(datasets: SamplesDataset[], count: ArrayLike<number>[], resamples: number, rng: Rng): JointBootstrap | null {
  const blockSeconds = Math.max(...datasets.map((d) => d.windows!.blockLength * d.tau!));
  const blocks = Math.max(...datasets.map((d, j) => timeBlock(count[j].length - 1, d.tau!, blockSeconds) + 1));
  if (blocks < 2) return null;
  const tables = datasets.map((d, j) => countTable(d, count[j], blockSeconds, blocks));
  const m = datasets.length;
  const replicates: Float64Array[] = [];
  const drawn = new Float64Array(blocks);
  for (let r = 0; r < resamples; r++) {
    drawn.fill(0);
    for (let b = 0; b < blocks; b++) drawn[rng.int(blocks)] += 1;
    const slopes = new Float64Array(m);
    for (let j = 0; j < m; j++) {
      const t = tables[j];
      const V = t.values.length;
      const w = new Float64Array(V);
      for (let b = 0; b < blocks; b++) {
        if (drawn[b] === 0) continue;
        for (let v = 0; v < V; v++) w[v] += drawn[b] * t.counts[b * V + v];
      }
      const fit = fitExchangeLogistic([t.values], w);
      slopes[j] = fit.status === "converged" ? fit.coefficients[0] : Number.NaN;
    }
    if (slopes.every((s) => Number.isFinite(s))) replicates.push(slopes);
  }
  const used = replicates.length;
  const mean = new Float64Array(m);
  for (const s of replicates) for (let j = 0; j < m; j++) mean[j] += s[j] / used;
  const covariance = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  for (const s of replicates) {
    for (let j = 0; j < m; j++) for (let k = 0; k < m; k++) covariance[j][k] += ((s[j] - mean[j]) * (s[k] - mean[k])) / (used - 1);
  }
  return { blockSeconds, blocks, requested: resamples, used, covariance };
}
