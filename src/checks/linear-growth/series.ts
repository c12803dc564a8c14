import type { CumulantsDataset, SamplesDataset } from "../../ingest/types.ts";
import { joulesPerEnergyUnit, type EnergyUnit } from "../../physics/energyUnits.ts";
import { weightedMoments } from "../../stats/weightedMoments.ts";

/** One channel's mean transfer against contact time: times in s, values in J or particles. */
export interface ChannelCurve {
  channel: "Q" | "dN";
  t: number[];
  y: number[];
  /** Standard uncertainties, or null when the source gives none. */
  u: number[] | null;
}

/** A series ready for the linear-growth check. */
export interface GrowthSeries {
  name: string;
  source: "samples" | "cumulants";
  datasets: string[];
  curves: ChannelCurve[];
  /** The energy unit to plot in. */
  energyUnit: { name: string; joules: number };
}

export type SeriesOrProblem = { series: GrowthSeries } | { name: string; problem: string; datasets: string[] };

const nonZero = (y: ArrayLike<number>) => Array.prototype.some.call(y, (v: number) => v !== 0);

/**
 * Standard errors a weighted fit can use. A dataset whose transfers are all
 * equal (e.g. nothing has crossed yet at a short contact time) has a zero
 * standard error; it gets the smallest positive one of the series instead,
 * so that it neither dominates the fit nor drops out. With no positive error
 * at all the noise is estimated from the curve (null).
 */
function usableErrors(se: number[]): number[] | null {
  const positive = se.filter((x) => x > 0 && Number.isFinite(x));
  if (positive.length === 0) return null;
  const floor = Math.min(...positive);
  return se.map((x) => (x > 0 && Number.isFinite(x) ? x : floor));
}

/**
 * Whether a weighted straight-line fit of the curve stays within double
 * precision: its sums hold t², x², t·x and the same divided by u²
 * (Bevington & Robinson, Data Reduction and Error Analysis, 3rd ed., §6.3).
 */
export function fitsInDoublePrecision(curve: ChannelCurve): boolean {
  const n = curve.t.length;
  const T = Math.max(...curve.t.map(Math.abs));
  const Y = Math.max(...curve.y.map(Math.abs));
  const finite = (x: number) => Number.isFinite(x * n);
  if (!finite(T * T) || !finite(Y * Y) || !finite(T * Y)) return false;
  return (curve.u ?? []).every((u) => u * u > 0 && finite((T / u) ** 2) && finite((Y / u) ** 2) && finite((T * Y) / (u * u)));
}

/** A problem when some curve of the series cannot be fitted in double precision. */
function precisionProblem(name: string, curves: ChannelCurve[], ids: string[]): SeriesOrProblem | null {
  const bad = curves.filter((c) => !fitsInDoublePrecision(c)).map((c) => (c.channel === "Q" ? "heat" : "particle"));
  if (bad.length === 0) return null;
  return { name, problem: `series "${name}": the mean ${bad.join(" and ")} transfers are so large relative to their uncertainties that a weighted fit overflows double precision; check the units`, datasets: ids };
}

/** Samples datasets sharing `series:`: the mean transfer of each with its standard error, ordered by contact time. */
export function seriesFromSamples(name: string, datasets: SamplesDataset[]): SeriesOrProblem {
  const ids = datasets.map((d) => d.id);
  const missing = datasets.filter((d) => d.tau === null).map((d) => d.id);
  if (missing.length) return { name, problem: `series "${name}": ${missing.join(", ")} declare no contact time tau`, datasets: ids };
  const sorted = [...datasets].sort((a, b) => a.tau! - b.tau!);
  for (let k = 1; k < sorted.length; k++) {
    if (sorted[k].tau === sorted[k - 1].tau) {
      return { name, problem: `series "${name}": ${sorted[k - 1].id} and ${sorted[k].id} share the contact time ${sorted[k].tau} s; a series needs one dataset per contact time`, datasets: ids };
    }
  }
  const t = sorted.map((d) => d.tau!);
  const curves: ChannelCurve[] = [];
  const channels: { channel: "Q" | "dN"; of: (d: SamplesDataset) => Float64Array; present: boolean }[] = [
    { channel: "Q", of: (d) => d.Q, present: sorted.some((d) => nonZero(d.Q)) },
    { channel: "dN", of: (d) => d.dN, present: sorted.some((d) => d.hasParticleColumn && nonZero(d.dN)) },
  ];
  for (const c of channels) {
    if (!c.present) continue;
    const m = sorted.map((d) => weightedMoments(c.of(d), d.weight));
    curves.push({ channel: c.channel, t, y: m.map((x) => x.mean), u: usableErrors(m.map((x) => x.standardError)) });
  }
  if (curves.length === 0) return { name, problem: `series "${name}": every recorded transfer is zero`, datasets: ids };
  const precision = precisionProblem(name, curves, ids);
  if (precision) return precision;
  return { series: { name, source: "samples", datasets: ids, curves, energyUnit: sorted[0].energyUnit } };
}

/** A cumulants table is a series by itself, named by its `series:` or its id. */
export function seriesFromCumulants(d: CumulantsDataset): SeriesOrProblem {
  const name = d.config.series ?? d.id;
  const t = Array.from(d.tau);
  const curves: ChannelCurve[] = [];
  if (d.Q && nonZero(d.Q)) curves.push({ channel: "Q", t, y: Array.from(d.Q), u: d.u_Q ? Array.from(d.u_Q) : null });
  if (d.dN && nonZero(d.dN)) curves.push({ channel: "dN", t, y: Array.from(d.dN), u: d.u_dN ? Array.from(d.u_dN) : null });
  if (curves.length === 0) return { name, problem: `series "${name}" (${d.file}): every mean transfer is zero`, datasets: [d.id] };
  const precision = precisionProblem(name, curves, [d.id]);
  if (precision) return precision;
  const unit = d.config.energy_unit as EnergyUnit;
  return {
    series: {
      name,
      source: "cumulants",
      datasets: [d.id],
      curves,
      energyUnit: { name: unit, joules: joulesPerEnergyUnit(unit, d.config.reference_temperature, `datasets ${d.id}.energy_unit`) },
    },
  };
}
