import type { SamplesDataset } from "../../ingest/types.ts";
import { histogram, linearEdges } from "../../stats/histogram.ts";
import { sortedQuantile } from "../../stats/bootstrap.ts";
import { fmt } from "../helpers.ts";
import type { PlotSpec } from "../plotSpec.ts";
import type { LogRatio } from "./binnedLogRatio.ts";
import { exp } from "../../math/index.ts";

/**
 * Histogram of Σ and of its mirror −Σ on a logarithmic scale, with the
 * relation's prediction e^Σ P(−Σ) drawn over them: where the relation holds,
 * the points sit on the dashed curve.
 */
export function mirrorHistogramPlot(d: SamplesDataset): PlotSpec {
  const sigma = d.sigma;
  let R = 0;
  for (let i = 0; i < sigma.length; i++) R = Math.max(R, Math.abs(sigma[i]));
  if (!(R > 0)) R = 1;
  const bins = 60; // even, so that Σ = 0 is an edge and each bin has a mirror bin
  const edges = linearEdges(-R, R, bins);
  const h = histogram(sigma, edges, d.weight);
  const width = edges[1] - edges[0];
  const centres = edges.slice(0, -1).map((e) => e + width / 2);
  const density = h.counts.map((c) => c / (h.total * width));
  const mirror = density.slice().reverse();
  const keep = (ys: number[]) => centres.map((x, k) => [x, ys[k]] as const).filter(([, y]) => y > 0);
  const data = keep(density);
  const mirrored = keep(mirror);
  const predicted = keep(mirror.map((m, k) => m * exp(centres[k])));
  return {
    id: "sigma-mirror",
    title: "Σ and its mirror image on a logarithmic scale",
    alt: `Probability density of the entropy production Σ of ${d.realisations} realisations (points) and of −Σ (solid line), in ${bins} bins from ${fmt(-R)} to ${fmt(R)} k_B on a logarithmic axis. The dashed curve is e^Σ P(−Σ), which the detailed relation says equals P(Σ); empty bins are left out.`,
    x: { label: "Entropy production Σ", unit: "k_B" },
    y: { label: "Probability density", unit: "1/k_B", scale: "log" },
    series: [
      { type: "points", name: "P(Σ)", x: data.map((p) => p[0]), y: data.map((p) => p[1]) },
      { type: "line", name: "P(−Σ), mirror", x: mirrored.map((p) => p[0]), y: mirrored.map((p) => p[1]) },
      { type: "line", name: "e^Σ P(−Σ), relation", x: predicted.map((p) => p[0]), y: predicted.map((p) => p[1]), style: "dashed" },
    ],
  };
}

/** ln P(Σ)/P(−Σ) against Σ with Poisson error bars, the fitted line and the ideal line of slope 1. */
export function logRatioPlot(ratio: LogRatio, slope: number | null): PlotSpec {
  const xs = ratio.bins.map((b) => b.x);
  const top = xs.length ? Math.max(...xs) : 1;
  const line = [0, top];
  return {
    id: "log-ratio",
    title: "Log-ratio of opposite entropy productions",
    alt: `ln P(Σ)/P(−Σ) in ${ratio.bins.length} ${ratio.discrete ? "exact values of Σ" : "mirror-symmetric bins"} with at least the minimum count on both sides, with one-standard-error bars; the dashed line is the relation's y = Σ${slope !== null ? `, the solid line the fitted slope ${fmt(slope)}` : ""}. Points scattered about the dashed line within their bars support the relation.`,
    x: { label: "Entropy production Σ", unit: "k_B" },
    y: { label: "ln P(Σ)/P(−Σ)" },
    series: [
      { type: "points", name: ratio.discrete ? "exact values" : "bins", x: xs, y: ratio.bins.map((b) => b.y), yErr: ratio.bins.map((b) => b.yErr) },
      ...(slope !== null ? [{ type: "line" as const, name: `fitted slope ${fmt(slope)}`, x: line, y: line.map((v) => slope * v) }] : []),
      { type: "line", name: "relation, slope 1", x: line, y: line, style: "dashed" },
    ],
  };
}

/** Joint histogram of heat (in the dataset's energy unit) and particle number. */
export function jointHistogramPlot(d: SamplesDataset): PlotSpec {
  const unit = d.energyUnit.joules;
  const q = Float64Array.from(d.Q).sort();
  const lo = sortedQuantile(q, 0.002) / unit;
  const hi = sortedQuantile(q, 0.998) / unit;
  const xEdges = linearEdges(lo, hi, 40);
  let nMin = Infinity;
  let nMax = -Infinity;
  let integer = true;
  for (let i = 0; i < d.dN.length; i++) {
    const v = d.dN[i];
    if (v < nMin) nMin = v;
    if (v > nMax) nMax = v;
    if (integer && !Number.isInteger(v)) integer = false;
  }
  const yEdges =
    integer && nMax - nMin <= 60
      ? Array.from({ length: nMax - nMin + 2 }, (_, k) => nMin - 0.5 + k)
      : linearEdges(nMin, nMax, 30);
  const counts = Array.from({ length: yEdges.length - 1 }, () => new Array<number>(xEdges.length - 1).fill(0));
  const find = (edges: number[], v: number) => {
    if (!(v >= edges[0] && v <= edges[edges.length - 1])) return -1;
    let a = 0;
    let b = edges.length - 1;
    while (b - a > 1) {
      const m = (a + b) >> 1;
      if (v >= edges[m]) a = m;
      else b = m;
    }
    return a;
  };
  for (let i = 0; i < d.Q.length; i++) {
    const w = d.weight ? d.weight[i] : 1;
    const cx = find(xEdges, d.Q[i] / unit);
    const cy = find(yEdges, d.dN[i]);
    if (cx >= 0 && cy >= 0) counts[cy][cx] += w;
  }
  return {
    id: "joint-q-dn",
    title: "Joint histogram of heat and particle transfer",
    alt: `Counts of realisations by heat Q (${fmt(lo)} to ${fmt(hi)} ${d.energyUnit.name}, the central 99.6 % of the data) and particles transferred ΔN (${fmt(nMin)} to ${fmt(nMax)}); darker cells hold more realisations. The relation pairs each cell with its mirror (−Q, −ΔN), weighted by e^Σ.`,
    x: { label: "Heat Q", unit: d.energyUnit.name },
    y: { label: "Particles ΔN" },
    series: [{ type: "heatmap", name: "realisations", xEdges, yEdges, counts }],
  };
}
