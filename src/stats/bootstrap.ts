import type { Rng } from "./rng.ts";
import { poissonDeviate, poissonFromTable, poissonInversionTable, ptrsConstants, ptrsDeviate, type PtrsConstants } from "./poissonDeviate.ts";
import { normalCdf, normalQuantile } from "./normal.ts";
import { exp } from "../math/index.ts";

/**
 * Seeded, weighted bootstrap of a ratio of sums, R = Σ w_i u_i / Σ w_i v_i
 * (a mean when v ≡ 1), built to stay fast at 10^6 realisations and honest for
 * heavy tails such as exponential averages.
 *
 * Resampling. Each realisation is drawn Poisson(1) times, so a histogram cell of
 * multiplicity w_i is drawn Poisson(w_i) times: the "Poisson bootstrap"
 * (Hanley & MacGibbon, Comput. Methods Programs Biomed. 83, 57 (2006); from
 * memory), asymptotically equivalent to the multinomial one. Its point is that
 * a histogram and the raw realisations it summarises have exactly the same
 * resampling law, so they give the same verdicts.
 *
 * Speed. The cells with the largest influence |u_i − R v_i| (up to `exactCells`
 * of them: the rare realisations that dominate a heavy tail) are resampled
 * exactly, one Poisson deviate each. The rest is a sum of many small independent
 * terms; its resampled sums (Σ c_i u_i, Σ c_i v_i) are drawn from the bivariate
 * normal law with the exact Poisson-bootstrap mean and covariance (Σ w u, Σ w v;
 * Σ w u², Σ w u v, Σ w v²), which the central limit theorem makes accurate
 * because no single light term matters. With fewer cells than `exactCells`
 * every cell is resampled exactly.
 */
export interface RatioBootstrap {
  estimate: number;
  /** Bootstrap replicates of the ratio, sorted ascending. */
  replicates: Float64Array;
  /** BCa acceleration from the empirical influence values (Efron & Tibshirani 1993, ch. 14). */
  acceleration: number;
  /** Number of cells resampled one by one (the rest through the normal law). */
  exactCells: number;
}

export interface BootstrapOptions {
  resamples: number;
  exactCells?: number;
}

// Cumulative Poisson(1) probabilities, for the common unit-weight draw by inversion.
const POISSON_ONE_CDF = (() => {
  const cdf: number[] = [];
  let p = exp(-1);
  let c = 0;
  for (let k = 0; k < 30; k++) {
    c += p;
    cdf.push(c);
    p /= k + 1;
  }
  return Float64Array.from(cdf);
})();

function poissonOne(rng: Rng): number {
  const u = rng.uniform();
  let k = 0;
  while (u > POISSON_ONE_CDF[k] && k < POISSON_ONE_CDF.length - 1) k++;
  return k;
}

const UNIT = 1;
const TABLE = 2;
const PTRS = 3;
const OTHER = 0;

/**
 * How each exactly resampled cell draws its Poisson(w) count, prepared once for
 * all resamples: unit weights by the Poisson(1) table, weights below 10 by
 * their inversion table, larger ones by PTRS with its constants; anything else
 * (zero, or a weight poissonDeviate refuses) through poissonDeviate itself.
 * Each way consumes the same uniforms and returns the same count as
 * poissonDeviate(rng, w) (or poissonOne) would: resamples are unchanged, only
 * the exponentials, logarithms and roots per draw are gone.
 */
function exactDraws(weights: Float64Array): { kind: Uint8Array; table: (Float64Array | null)[]; ptrs: (PtrsConstants | null)[] } {
  const kind = new Uint8Array(weights.length);
  const table: (Float64Array | null)[] = new Array(weights.length).fill(null);
  const ptrs: (PtrsConstants | null)[] = new Array(weights.length).fill(null);
  const tables = new Map<number, Float64Array>();
  weights.forEach((w, j) => {
    if (w === 1) kind[j] = UNIT;
    else if (w > 0 && w < 10) {
      kind[j] = TABLE;
      let t = tables.get(w);
      if (!t) tables.set(w, (t = poissonInversionTable(w)));
      table[j] = t;
    } else if (w >= 10 && Number.isFinite(w)) {
      kind[j] = PTRS;
      ptrs[j] = ptrsConstants(w);
    } else kind[j] = OTHER;
  });
  return { kind, table, ptrs };
}

/** a before b in the order of Float64Array.prototype.sort (ascending, NaN last). */
function before(a: number, b: number): boolean {
  return a < b || (a === a && b !== b);
}

/**
 * The value at position `rank` (from 0) of `values` sorted ascending (NaN
 * last), as `Float64Array.from(values).sort()[rank]` gives it, in linear
 * expected time: Hoare's selection (Find, Commun. ACM 4, 321 (1961); from
 * memory) with a median-of-three pivot, on a copy.
 */
export function selectRank(values: Float64Array, rank: number): number {
  const a = Float64Array.from(values);
  let lo = 0;
  let hi = a.length - 1;
  while (hi > lo) {
    const mid = (lo + hi) >>> 1;
    // Median of three as the pivot, moved to a[mid].
    if (before(a[mid], a[lo])) swap(a, mid, lo);
    if (before(a[hi], a[lo])) swap(a, hi, lo);
    if (before(a[hi], a[mid])) swap(a, hi, mid);
    const pivot = a[mid];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (before(a[i], pivot)) i++;
      while (before(pivot, a[j])) j--;
      if (i <= j) swap(a, i++, j--);
    }
    // Now a[lo..j] ≤ pivot ≤ a[i..hi], and a[j+1..i−1] equal the pivot.
    if (rank <= j) hi = j;
    else if (rank >= i) lo = i;
    else return a[rank];
  }
  return a[rank];
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i];
  a[i] = a[j];
  a[j] = t;
}

/** Indices of the `k` largest values of `score` (ties broken by index). */
function largestIndices(score: Float64Array, k: number): Uint32Array {
  if (k >= score.length) {
    const all = new Uint32Array(score.length);
    for (let i = 0; i < all.length; i++) all[i] = i;
    return all;
  }
  const threshold = selectRank(score, score.length - k);
  const out = new Uint32Array(k);
  let m = 0;
  for (let i = 0; i < score.length && m < k; i++) if (score[i] > threshold) out[m++] = i;
  for (let i = 0; i < score.length && m < k; i++) if (score[i] === threshold) out[m++] = i;
  return out;
}

export function bootstrapRatio(
  u: ArrayLike<number>,
  v: ArrayLike<number> | null,
  weight: ArrayLike<number> | null,
  rng: Rng,
  options: BootstrapOptions,
): RatioBootstrap {
  const n = u.length;
  const B = options.resamples;
  // Dense typed copies keep the loops below monomorphic (and fast at 10^6 rows).
  const vArr = v ? Float64Array.from(v) : new Float64Array(n).fill(1);
  const wArr = weight ? Float64Array.from(weight) : new Float64Array(n).fill(1);
  const vAt = (i: number) => vArr[i];
  const wAt = (i: number) => wArr[i];
  let su = 0;
  let sv = 0;
  for (let i = 0; i < n; i++) {
    su += wAt(i) * u[i];
    sv += wAt(i) * vAt(i);
  }
  const estimate = su / sv;
  // Empirical influence of one realisation in cell i, and the BCa acceleration.
  const influence = new Float64Array(n);
  let m2 = 0;
  let m3 = 0;
  for (let i = 0; i < n; i++) {
    const l = (u[i] - estimate * vAt(i)) / sv;
    influence[i] = Math.abs(l);
    const w = wAt(i);
    m2 += w * l * l;
    m3 += w * l * l * l;
  }
  const acceleration = m2 > 0 ? m3 / (6 * (m2 * Math.sqrt(m2))) : 0;

  const exact = largestIndices(influence, options.exactCells ?? 1024);
  const isExact = new Uint8Array(n);
  for (const i of exact) isExact[i] = 1;
  // Moments of the light part under Poisson(w_i) resampling.
  let mu = 0;
  let mv = 0;
  let cuu = 0;
  let cuv = 0;
  let cvv = 0;
  for (let i = 0; i < n; i++) {
    if (isExact[i]) continue;
    const w = wAt(i);
    const ui = u[i];
    const vi = vAt(i);
    mu += w * ui;
    mv += w * vi;
    cuu += w * ui * ui;
    cuv += w * ui * vi;
    cvv += w * vi * vi;
  }
  // Cholesky factor of the 2×2 covariance (guarding the degenerate cases).
  const l11 = Math.sqrt(Math.max(cuu, 0));
  const l21 = l11 > 0 ? cuv / l11 : 0;
  const l22 = Math.sqrt(Math.max(cvv - l21 * l21, 0));
  const replicates = new Float64Array(B);
  const exactU = Float64Array.from(exact, (i) => u[i]);
  const exactV = Float64Array.from(exact, (i) => vAt(i));
  const exactW = Float64Array.from(exact, (i) => wAt(i));
  const light = exact.length < n;
  const draw = exactDraws(exactW);
  for (let b = 0; b < B; b++) {
    let num = 0;
    let den = 0;
    for (let j = 0; j < exactU.length; j++) {
      const kind = draw.kind[j];
      const c =
        kind === UNIT ? poissonOne(rng) : kind === TABLE ? poissonFromTable(rng.uniform(), draw.table[j]!) : kind === PTRS ? ptrsDeviate(rng, draw.ptrs[j]!) : poissonDeviate(rng, exactW[j]);
      if (c === 0) continue;
      num += c * exactU[j];
      den += c * exactV[j];
    }
    if (light) {
      const z1 = rng.normal();
      const z2 = rng.normal();
      num += mu + l11 * z1;
      den += mv + l21 * z1 + l22 * z2;
    }
    replicates[b] = num / den;
  }
  replicates.sort();
  return { estimate, replicates, acceleration, exactCells: exact.length };
}

/**
 * The p-th sample quantile of sorted replicates by linear interpolation between
 * order statistics (Hyndman & Fan, Am. Stat. 50, 361 (1996), definition 7).
 */
export function sortedQuantile(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const h = (n - 1) * Math.min(1, Math.max(0, p));
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** Percentile interval (Efron & Tibshirani, An Introduction to the Bootstrap (1993), ch. 13). */
export function percentileInterval(boot: RatioBootstrap, confidence: number): [number, number] {
  const tail = (1 - confidence) / 2;
  return [sortedQuantile(boot.replicates, tail), sortedQuantile(boot.replicates, 1 - tail)];
}

/** Bias correction z0 = Φ^{-1}(#{θ* < θ̂}/B), counting ties as half (Efron & Tibshirani 1993, eq. 14.14). */
function biasCorrection(boot: RatioBootstrap): number {
  const r = boot.replicates;
  let below = 0;
  for (let i = 0; i < r.length; i++) {
    if (r[i] < boot.estimate) below++;
    else if (r[i] === boot.estimate) below += 0.5;
  }
  const frac = Math.min(1 - 0.5 / r.length, Math.max(0.5 / r.length, below / r.length));
  return normalQuantile(frac);
}

/**
 * Bias-corrected and accelerated interval (Efron & Tibshirani 1993, ch. 14):
 * α1 = Φ(z0 + (z0 + z_α)/(1 − a(z0 + z_α))), α2 likewise with z_{1−α}.
 */
export function bcaInterval(boot: RatioBootstrap, confidence: number): [number, number] {
  const z0 = biasCorrection(boot);
  const a = boot.acceleration;
  const adjust = (zAlpha: number) => normalCdf(z0 + (z0 + zAlpha) / (1 - a * (z0 + zAlpha)));
  const tail = (1 - confidence) / 2;
  return [sortedQuantile(boot.replicates, adjust(normalQuantile(tail))), sortedQuantile(boot.replicates, adjust(normalQuantile(1 - tail)))];
}

/**
 * Two-sided p-value of H0: θ = θ0 by inverting the BCa interval: the smallest
 * α at which θ0 falls outside the (1 − α) BCa interval. The bootstrap cdf at θ0,
 * G, maps to z_α = w/(1 + a w) − z0 with w = Φ^{-1}(G) − z0. Resolution is
 * limited to about 1/B.
 */
export function bcaPValue(boot: RatioBootstrap, theta0: number): number {
  const r = boot.replicates;
  const B = r.length;
  let below = 0;
  for (let i = 0; i < B; i++) {
    if (r[i] < theta0) below++;
    else if (r[i] === theta0) below += 0.5;
  }
  const G = Math.min(1 - 0.5 / B, Math.max(0.5 / B, below / B));
  const z0 = biasCorrection(boot);
  const a = boot.acceleration;
  const w = normalQuantile(G) - z0;
  const denom = 1 + a * w;
  // Beyond the pole of the BCa map θ0 lies outside every interval on that side.
  if (denom <= 0) return 1 / (B + 1);
  const zAlpha = w / denom - z0;
  const oneSided = Math.min(normalCdf(zAlpha), 1 - normalCdf(zAlpha));
  return Math.min(1, Math.max(2 * oneSided, 1 / (B + 1)));
}
