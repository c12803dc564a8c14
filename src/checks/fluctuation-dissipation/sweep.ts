import type { SamplesDataset } from "../../ingest/types.ts";
import { columnDependence } from "../../stats/columnDependence.ts";
import { fmt } from "../helpers.ts";

/** A flux channel and its conjugate affinity (physics: Sigma = beta_bar W + a_Q Q + a_N dN). */
export type Channel = "Q" | "dN";
export const AFFINITY_OF: Record<Channel, "a_Q" | "a_N"> = { Q: "a_Q", dN: "a_N" };

/** A sweep ready for the response fit: datasets, their common contact time and the channels that carry transfer. */
export interface Sweep {
  name: string;
  datasets: SamplesDataset[];
  tau: number;
  channels: Channel[];
  /** Whether any realisation of the sweep records non-zero switching work. */
  work: boolean;
  /** The magnetic field shared by the sweep (tesla), 0 when none is declared. */
  field: number;
}

export type SweepOrProblem = { sweep: Sweep } | { problem: string; datasets: string[] };

/** Samples datasets grouped by their `sweep:` name, in definition order. */
export function sweepGroups(samples: SamplesDataset[]): Map<string, SamplesDataset[]> {
  const groups = new Map<string, SamplesDataset[]>();
  for (const d of samples) {
    const name = d.config.sweep;
    if (name === undefined) continue;
    const list = groups.get(name) ?? [];
    list.push(d);
    groups.set(name, list);
  }
  return groups;
}

function anyNonZero(x: ArrayLike<number>, weight: ArrayLike<number> | null): boolean {
  for (let i = 0; i < x.length; i++) if (x[i] !== 0 && (!weight || weight[i] > 0)) return true;
  return false;
}

const list = (ids: string[]) => ids.join(", ");

/**
 * Check that a group can be audited as one sweep: at least three datasets, one
 * contact time, one field, transfer in some channel, and affinity vectors
 * that span the space of the channels that carry transfer (the plane when
 * both heat and particles flow). Each failure is a reason for not-applicable.
 */
export function prepareSweep(name: string, datasets: SamplesDataset[]): SweepOrProblem {
  const ids = datasets.map((d) => d.id);
  if (datasets.length < 3) {
    return {
      problem: `sweep "${name}" has ${datasets.length} dataset${datasets.length === 1 ? "" : "s"} (${list(ids)}); the response matrix needs at least three whose affinity vectors span the plane`,
      datasets: ids,
    };
  }
  const missing = datasets.filter((d) => d.tau === null).map((d) => d.id);
  if (missing.length) {
    return { problem: `sweep "${name}": ${list(missing)} declare no contact time tau, so no flux <x>/tau can be formed`, datasets: ids };
  }
  const tau = datasets[0].tau!;
  if (datasets.some((d) => Math.abs(d.tau! - tau) > 1e-9 * tau)) {
    return {
      problem: `sweep "${name}": the contact times differ (${datasets.map((d) => `${d.id}: ${d.tau} s`).join(", ")}); a sweep varies the affinities at one contact time (use series: for contact-time studies)`,
      datasets: ids,
    };
  }
  const fields = datasets.map((d) => d.config.field ?? 0);
  if (fields.some((f) => f !== fields[0])) {
    return {
      problem: `sweep "${name}": the magnetic fields differ (${datasets.map((d, i) => `${d.id}: ${fields[i]} T`).join(", ")}); a sweep shares one field`,
      datasets: ids,
    };
  }
  const channels: Channel[] = [];
  if (datasets.some((d) => anyNonZero(d.Q, d.weight))) channels.push("Q");
  if (datasets.some((d) => d.hasParticleColumn && anyNonZero(d.dN, d.weight))) channels.push("dN");
  if (channels.length === 0) return { problem: `sweep "${name}": every recorded transfer is zero`, datasets: ids };
  const noParticles = datasets.filter((d) => !d.hasParticleColumn).map((d) => d.id);
  if (channels.includes("dN") && noParticles.length) {
    return {
      problem: `sweep "${name}": ${list(noParticles)} map no particle column while other datasets record particle transfer; map dN in every dataset of the sweep (or in none)`,
      datasets: ids,
    };
  }
  const work = datasets.some((d) => anyNonZero(d.W, d.weight));
  if (work && fields[0] !== 0) {
    return {
      problem: `sweep "${name}" records switching work at field ${fields[0]} T; the weighted fluxes then need the same sweep at the reversed field, which this check does not pair`,
      datasets: ids,
    };
  }
  const tied = proportionalChannels(datasets, channels);
  if (tied) return { problem: `sweep "${name}": ${tied}`, datasets: ids };
  const span = affinitySpan(datasets, channels);
  if (span) return { problem: `sweep "${name}": ${span}`, datasets: ids };
  return { sweep: { name, datasets, tau, channels, work, field: fields[0] } };
}

/** null when the affinity vectors of the channels' conjugates span their space; otherwise why not. */
function affinitySpan(datasets: SamplesDataset[], channels: Channel[]): string | null {
  const a = datasets.map((d) => channels.map((c) => d.affinity[AFFINITY_OF[c]]));
  const d = channels.length;
  const mean = Array.from({ length: d }, (_, j) => a.reduce((s, r) => s + r[j], 0) / a.length);
  const S = Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => a.reduce((s, r) => s + (r[i] - mean[i]) * (r[j] - mean[j]), 0)));
  const flat = channels.filter((_, j) => !(S[j][j] > 0)).map((c) => AFFINITY_OF[c]);
  if (flat.length) {
    return `${flat.join(" and ")} ${flat.length > 1 ? "take" : "takes"} the same value in every dataset, so the response to ${flat.length > 1 ? "them" : "it"} cannot be separated from the spontaneous flux; vary ${flat.join(" and ")} between datasets`;
  }
  if (d === 2) {
    const r2 = (S[0][1] * S[0][1]) / (S[0][0] * S[1][1]);
    if (r2 > 1 - 1e-9) {
      return "the affinity vectors (a_Q, a_N) lie on one line, so they do not span the plane and the two columns of the response matrix cannot be separated; add a dataset off that line";
    }
  }
  return null;
}

/**
 * null unless heat and particles are proportional in every realisation of the sweep (Q = ε ΔN, transport
 * through a single level): then every second-moment and response matrix of (Q, ΔN) has rank one, the 2×2
 * fit is singular whatever the number of realisations, and only the combined affinity a_Q ε + a_N drives
 * the one independent current. Detected on the pooled data by rank-revealing QR (columnDependence).
 */
function proportionalChannels(datasets: SamplesDataset[], channels: Channel[]): string | null {
  if (channels.length < 2) return null;
  const total = datasets.reduce((s, d) => s + d.Q.length, 0);
  const Q = new Float64Array(total);
  const dN = new Float64Array(total);
  const w = new Float64Array(total);
  let k = 0;
  for (const d of datasets) {
    Q.set(d.Q, k);
    dN.set(d.dN, k);
    if (d.weight) w.set(d.weight, k);
    else w.fill(1, k, k + d.Q.length);
    k += d.Q.length;
  }
  const dep = columnDependence([dN, Q], w);
  const tiedQ = dep.dependent.find((c) => c.index === 1);
  if (!tiedQ || tiedQ.coefficients.length === 0) return null;
  const joulesPerUnit = datasets[0].energyUnit.joules;
  return `Q = ε·ΔN with ε = ${fmt(tiedQ.coefficients[0] / joulesPerUnit)} ${datasets[0].energyUnit.name} in every realisation (transport through a single level), so the heat and particle channels are one current driven by the combination a_Q·ε + a_N; the 2×2 response and fluctuation matrices are singular whatever the number of realisations, and this check does not fit the single combined channel`;
}
