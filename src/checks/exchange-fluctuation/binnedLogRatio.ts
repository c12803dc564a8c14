import { chiSquareSf } from "../../stats/chiSquare.ts";
import { exp, log } from "../../math/index.ts";

/**
 * The binned log-ratio ln P(Σ)/P(−Σ) that a reader expects to see, and a
 * goodness-of-fit test of it against the ideal line.
 *
 * Discrete Σ (few distinct values, e.g. counted electrons): each value s > 0 is
 * paired with −s exactly. Continuous Σ: bins in |Σ| holding equal numbers of
 * negative-Σ realisations (the scarce side), mirrored onto Σ > 0, so that every
 * bin has counts on both sides.
 *
 * Where the point sits: if P(s) = e^s P(−s) holds, the expected count ratio of a
 * bin is the average of e^{|Σ|} over the bin's negative-side realisations
 * (integrate the relation over the bin), so x = ln of that average puts an
 * ideal point exactly on y = x whatever the bin width (derived here from the
 * relation; for discrete Σ it is the value s itself).
 *
 * Goodness of fit: given n = n+ + n− realisations in a bin pair, n+ is binomial
 * with p = e^x/(1 + e^x) under the relation; Pearson's statistic summed over
 * bins is χ² with one degree of freedom per bin (Pearson 1900; the relation
 * fixes p, nothing is fitted). For continuous bins the variance includes the
 * delta-method uncertainty of the estimated x (coefficient of variation of
 * e^{|Σ|} in the bin over n−).
 */
export interface LogRatioBin {
  x: number; // k_B
  y: number; // ln(n+/n−)
  yErr: number; // sqrt(1/n+ + 1/n−), Poisson counts
  nPositive: number;
  nNegative: number;
  lower: number; // |Σ| range of the bin (equal for discrete values)
  upper: number;
}

export interface LogRatio {
  discrete: boolean;
  bins: LogRatioBin[];
  chiSquare: number;
  dof: number;
  pValue: number;
  /** Bins dropped for having fewer than minCount realisations on a side. */
  dropped: number;
}

const MAX_DISTINCT = 400;
const MAX_BINS = 30;

/** A key that maps s and −s to opposite integers after rounding to a relative tolerance. */
function keyOf(s: number, unit: number): number {
  const k = Math.round(Math.abs(s) / unit);
  return s < 0 ? -k : k;
}

function discreteValues(sigma: ArrayLike<number>, weight: ArrayLike<number> | null): { unit: number; cells: Map<number, { w: number; s: number }> } | null {
  let maxAbs = 0;
  for (let i = 0; i < sigma.length; i++) maxAbs = Math.max(maxAbs, Math.abs(sigma[i]));
  if (!(maxAbs > 0)) return null;
  const unit = maxAbs * 1e-9; // rounding of a printed energy times an affinity
  const cells = new Map<number, { w: number; s: number }>();
  for (let i = 0; i < sigma.length; i++) {
    const w = weight ? weight[i] : 1;
    if (w === 0) continue;
    const k = keyOf(sigma[i], unit);
    const c = cells.get(k);
    if (c) c.w += w;
    else {
      if (cells.size >= MAX_DISTINCT) return null;
      cells.set(k, { w, s: sigma[i] });
    }
  }
  // Many realisations per value is what makes exact pairing worthwhile.
  let total = 0;
  for (const c of cells.values()) total += c.w;
  return total >= 10 * cells.size ? { unit, cells } : null;
}

function finish(bins: (LogRatioBin & { varX: number })[], discrete: boolean, dropped: number): LogRatio {
  let chi = 0;
  for (const b of bins) {
    const n = b.nPositive + b.nNegative;
    const p = 1 / (1 + exp(-b.x));
    const binomial = n * p * (1 - p);
    const variance = binomial + binomial * binomial * b.varX;
    chi += (b.nPositive - n * p) ** 2 / variance;
  }
  const dof = bins.length;
  return {
    discrete,
    bins: bins.map(({ varX: _v, ...rest }) => rest),
    chiSquare: chi,
    dof,
    pValue: dof > 0 && !Number.isNaN(chi) ? chiSquareSf(chi, dof) : Number.NaN,
    dropped,
  };
}

/**
 * `sigmaCell`: for a dataset summarised into cells (src/ingest/reduce), the
 * width of its Σ cells, which are centred on multiples of it and mirrored
 * about zero. Bin edges are then moved to cell boundaries, (k + ½)·sigmaCell,
 * so that every cell and its mirror image fall into mirrored bins whole, and
 * the cells around Σ = 0 (their own mirror images) stay out: each bin pair is
 * then a union of mirrored cell pairs, for which the relation holds exactly
 * (see reduceSamples.ts).
 */
export function binnedLogRatio(sigma: ArrayLike<number>, weight: ArrayLike<number> | null, minCount: number, sigmaCell: number | null = null): LogRatio {
  const disc = discreteValues(sigma, weight);
  if (disc) {
    const bins: (LogRatioBin & { varX: number })[] = [];
    let dropped = 0;
    for (const [k, c] of disc.cells) {
      if (k <= 0) continue;
      const neg = disc.cells.get(-k)?.w ?? 0;
      if (c.w < minCount || neg < minCount) {
        dropped++;
        continue;
      }
      bins.push({ x: c.s, y: log(c.w / neg), yErr: Math.sqrt(1 / c.w + 1 / neg), nPositive: c.w, nNegative: neg, lower: c.s, upper: c.s, varX: 0 });
    }
    bins.sort((a, b) => a.x - b.x);
    return finish(bins, true, dropped);
  }

  // Continuous: |Σ| of the negative side, sorted with their weights.
  let negCount = 0;
  for (let i = 0; i < sigma.length; i++) if (sigma[i] < 0 && (weight ? weight[i] : 1) > 0) negCount++;
  const order = new Uint32Array(negCount);
  let m = 0;
  let negTotal = 0;
  for (let i = 0; i < sigma.length; i++) {
    const w = weight ? weight[i] : 1;
    if (sigma[i] < 0 && w > 0) {
      order[m++] = i;
      negTotal += w;
    }
  }
  if (negTotal < minCount) return finish([], false, 0);
  if (weight) order.sort((a, b) => sigma[b] - sigma[a]); // ascending |Σ|
  else {
    // One realisation per row: a native numeric sort of the values, then their rows are not needed for the edges.
    const values = new Float64Array(order.length);
    for (let j = 0; j < order.length; j++) values[j] = sigma[order[j]];
    values.sort(); // most negative first
    values.reverse(); // ascending |Σ|
    return mirrorBins(sigma, null, minCount, negTotal, (j) => -values[j], values.length, () => 1, sigmaCell);
  }
  return mirrorBins(sigma, weight, minCount, negTotal, (j) => -sigma[order[j]], order.length, (j) => weight[order[j]], sigmaCell);
}

/**
 * Move edges (in place) to the nearest cell boundaries (k + ½)·cell, the first
 * to ½·cell and the last up to the boundary above it, dropping edges that
 * coincide.
 */
function snapToCells(edges: number[], cell: number): void {
  const last = (Math.ceil(edges[edges.length - 1] / cell - 0.5) + 0.5) * cell;
  const snapped = [0.5 * cell];
  for (let k = 1; k < edges.length - 1; k++) {
    const e = (Math.round(edges[k] / cell - 0.5) + 0.5) * cell;
    if (e > snapped[snapped.length - 1] && e < last) snapped.push(e);
  }
  snapped.push(Math.max(last, 1.5 * cell));
  edges.length = 0;
  edges.push(...snapped);
}

/** Bins in |Σ| with equal negative weight, given the negative side's |Σ| in ascending order. */
function mirrorBins(
  sigma: ArrayLike<number>,
  weight: ArrayLike<number> | null,
  minCount: number,
  negTotal: number,
  absAt: (j: number) => number,
  count: number,
  weightAt: (j: number) => number = () => 1,
  sigmaCell: number | null = null,
): LogRatio {
  const perBin = Math.max(minCount, negTotal / MAX_BINS);
  // Edges in |Σ| at equal negative weight.
  const edges: number[] = [0];
  let acc = 0;
  for (let j = 0; j < count; j++) {
    acc += weightAt(j);
    const remaining = negTotal - acc;
    if (acc >= perBin * edges.length && remaining >= perBin && j + 1 < count) {
      const a = absAt(j);
      const b = absAt(j + 1);
      if (b > a) edges.push((a + b) / 2);
    }
  }
  edges.push(absAt(count - 1) * (1 + 1e-12) + 1e-300);
  if (sigmaCell !== null) snapToCells(edges, sigmaCell);
  const K = edges.length - 1;
  const nNeg = new Float64Array(K);
  const nPos = new Float64Array(K);
  // Per bin: log-sum-exp of |Σ| on the negative side, with its second moment for the variance of x.
  const maxAbs = new Float64Array(K).fill(-Infinity);
  const binOf = (a: number): number => {
    if (!(a > 0) || a < edges[0] || a >= edges[K]) return -1;
    let lo = 0;
    let hi = K;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (a >= edges[mid]) lo = mid;
      else hi = mid;
    }
    return lo;
  };
  const binIndex = new Int32Array(sigma.length);
  for (let i = 0; i < sigma.length; i++) {
    const w = weight ? weight[i] : 1;
    const k = w > 0 ? binOf(Math.abs(sigma[i])) : -1;
    binIndex[i] = k;
    if (k < 0) continue;
    if (sigma[i] > 0) nPos[k] += w;
    else if (sigma[i] < 0) {
      nNeg[k] += w;
      if (-sigma[i] > maxAbs[k]) maxAbs[k] = -sigma[i];
    }
  }
  const s1 = new Float64Array(K);
  const s2 = new Float64Array(K);
  for (let i = 0; i < sigma.length; i++) {
    const k = binIndex[i];
    if (k < 0 || !(sigma[i] < 0)) continue;
    const w = weight ? weight[i] : 1;
    const e = exp(-sigma[i] - maxAbs[k]);
    s1[k] += w * e;
    s2[k] += w * e * e;
  }
  const bins: (LogRatioBin & { varX: number })[] = [];
  let dropped = 0;
  for (let k = 0; k < K; k++) {
    if (nPos[k] < minCount || nNeg[k] < minCount) {
      dropped++;
      continue;
    }
    const mean = s1[k] / nNeg[k];
    const variance = Math.max(s2[k] / nNeg[k] - mean * mean, 0);
    const x = maxAbs[k] + log(mean);
    bins.push({
      x,
      y: log(nPos[k] / nNeg[k]),
      yErr: Math.sqrt(1 / nPos[k] + 1 / nNeg[k]),
      nPositive: nPos[k],
      nNegative: nNeg[k],
      lower: edges[k],
      upper: edges[k + 1],
      varX: variance / (mean * mean) / nNeg[k],
    });
  }
  return finish(bins, false, dropped);
}

/**
 * The bin of each row in a binned log-ratio (index into `ratio.bins`, −1 for rows in no bin or with zero
 * weight): the same pairing of s with −s as the bins were built with (the rounding key for exact values,
 * the |Σ| edges otherwise), whichever sign the row's Σ has.
 */
export function binOfEachRow(sigma: ArrayLike<number>, weight: ArrayLike<number> | null, ratio: LogRatio): Int32Array {
  const out = new Int32Array(sigma.length).fill(-1);
  if (ratio.bins.length === 0) return out;
  if (ratio.discrete) {
    let maxAbs = 0;
    for (let i = 0; i < sigma.length; i++) maxAbs = Math.max(maxAbs, Math.abs(sigma[i]));
    const unit = maxAbs * 1e-9; // as discreteValues keys them
    const index = new Map(ratio.bins.map((b, k) => [keyOf(b.x, unit), k]));
    for (let i = 0; i < sigma.length; i++) {
      if ((weight ? weight[i] : 1) > 0 && sigma[i] !== 0) out[i] = index.get(Math.abs(keyOf(sigma[i], unit))) ?? -1;
    }
    return out;
  }
  for (let i = 0; i < sigma.length; i++) {
    const a = Math.abs(sigma[i]);
    if (!((weight ? weight[i] : 1) > 0) || !(a > 0)) continue;
    // Bins are disjoint and sorted by |Σ|: a binary search over their lower edges.
    let lo = 0;
    let hi = ratio.bins.length;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (a >= ratio.bins[mid].lower) lo = mid;
      else hi = mid;
    }
    const b = ratio.bins[lo];
    if (a >= b.lower && a < b.upper) out[i] = lo;
  }
  return out;
}
