import { cbrt } from "../math/index.ts";
/** Weighted histogram on fixed edges. */
export interface Histogram {
  edges: number[]; // length bins + 1
  counts: number[]; // total weight per bin
  total: number;
}

/**
 * Number of bins by the Freedman–Diaconis rule (bin width 2·IQR·n^(−1/3)),
 * Freedman & Diaconis, Z. Wahrscheinlichkeitstheorie verw. Geb. 57, 453 (1981),
 * clamped to [minBins, maxBins] so that plots stay readable.
 */
export function freedmanDiaconisBins(sorted: ArrayLike<number>, n: number, minBins = 10, maxBins = 80): number {
  const len = sorted.length;
  if (len < 2) return minBins;
  const q = (p: number) => sorted[Math.min(len - 1, Math.max(0, Math.round(p * (len - 1))))];
  const iqr = q(0.75) - q(0.25);
  const range = sorted[len - 1] - sorted[0];
  if (!(iqr > 0) || !(range > 0)) return minBins;
  const width = 2 * iqr * cbrt(1 / n);
  return Math.max(minBins, Math.min(maxBins, Math.ceil(range / width)));
}

export function histogram(x: ArrayLike<number>, edges: number[], weight: ArrayLike<number> | null = null): Histogram {
  const bins = edges.length - 1;
  const counts = new Array<number>(bins).fill(0);
  const lo = edges[0];
  const hi = edges[bins];
  let total = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    const w = weight ? weight[i] : 1;
    total += w;
    if (!(v >= lo && v <= hi)) continue;
    // Binary search keeps uneven edges exact; the last edge closes the last bin.
    let a = 0;
    let b = bins;
    while (b - a > 1) {
      const m = (a + b) >> 1;
      if (v >= edges[m]) a = m;
      else b = m;
    }
    counts[a] += w;
  }
  return { edges, counts, total };
}

/** Evenly spaced edges covering [lo, hi]. */
export function linearEdges(lo: number, hi: number, bins: number): number[] {
  if (!(hi > lo)) {
    const half = Math.abs(lo) > 0 ? Math.abs(lo) * 0.5 : 0.5;
    lo -= half;
    hi += half;
  }
  return Array.from({ length: bins + 1 }, (_, k) => lo + ((hi - lo) * k) / bins);
}
