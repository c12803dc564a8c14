import type { SamplesDataset } from "../ingest/types.ts";
import { estimatedStateInfluence, stateAssumptions } from "../ingest/conductorStates.ts";

/**
 * What a bootstrap of a ratio of sums R = Σ w u / Σ w v resamples, given a
 * samples dataset:
 * - with conductor states and an estimated stationary distribution, each row's
 *   u and v carry the first-order effect of re-estimating p in the resample
 *   (estimatedStateInfluence, the delta method);
 * - with windows cut from one trajectory, rows are summed into blocks of
 *   consecutive windows and the blocks are the resampled units (the moving
 *   block idea of Künsch, Ann. Stat. 17, 1217 (1989), here with
 *   non-overlapping blocks: Carlstein, Ann. Stat. 14, 1171 (1986)), so that
 *   the correlation between neighbouring windows stays inside a unit.
 * Otherwise the rows and their weights are returned as they are.
 */
export interface ResamplingUnits {
  u: Float64Array;
  v: Float64Array | null;
  weight: Float64Array | null;
}

export function resamplingUnits(
  d: SamplesDataset,
  u: Float64Array,
  du: Float64Array | null,
  v: Float64Array | null = null,
  dv: Float64Array | null = null,
): ResamplingUnits {
  let uu = u;
  let vv = v;
  if (d.states && d.states.source === "estimated") {
    if (du) uu = addInto(u, estimatedStateInfluence(d.states, du, d.weight));
    if (v && dv) vv = addInto(v, estimatedStateInfluence(d.states, dv, d.weight));
  }
  if (!d.windows) return { u: uu, v: vv, weight: d.weight };
  const { block, blocks } = d.windows;
  const bu = new Float64Array(blocks);
  const bv = new Float64Array(blocks);
  for (let i = 0; i < uu.length; i++) {
    const w = d.weight ? d.weight[i] : 1;
    bu[block[i]] += w * uu[i];
    bv[block[i]] += w * (vv ? vv[i] : 1);
  }
  return { u: bu, v: bv, weight: null };
}

function addInto(a: Float64Array, b: Float64Array): Float64Array {
  const out = new Float64Array(a.length);
  for (let i = 0; i < a.length; i++) out[i] = a[i] + b[i];
  return out;
}

/**
 * Mean and standard error of a row value under the same resampling units:
 * blocks give the between-block variance of block sums (Carlstein 1986).
 */
export function unitMean(d: SamplesDataset, x: Float64Array, dx: Float64Array | null): { mean: number; standardError: number; n: number } {
  const r = resamplingUnits(d, x, dx);
  const v = r.v;
  let W = 0;
  let S = 0;
  for (let i = 0; i < r.u.length; i++) {
    const w = r.weight ? r.weight[i] : 1;
    W += w * (v ? v[i] : 1);
    S += w * r.u[i];
  }
  const mean = S / W;
  // Linearised ratio: Var(ΣU/ΣV) ≈ Σ (U − mean V)² / (ΣV)² over independent units.
  let ss = 0;
  let units = 0;
  for (let i = 0; i < r.u.length; i++) {
    const w = r.weight ? r.weight[i] : 1;
    const e = r.u[i] - mean * (v ? v[i] : 1);
    ss += w * e * e;
    units += w;
  }
  const correction = units > 1 ? units / (units - 1) : NaN;
  return { mean, standardError: Math.sqrt((ss * correction) / (W * W)), n: units };
}

/**
 * The assumptions of a check, adapted to windows counted through a conductor: the two-point preparation
 * of isolated reservoirs gives way to the stationary, Markovian conductor (with its states), and
 * independence to the block resampling of windows cut from one trajectory.
 */
export function countingAssumptions(d: SamplesDataset, assumptions: string[]): string[] {
  if (!d.states && !d.windows) return assumptions;
  const twoPoint = /^(Both reservoirs start|Energies and particle numbers|Realisations are independent)/;
  const out = assumptions.filter((a) => !(twoPoint.test(a) && (d.states || /^Realisations/.test(a))));
  if (d.states) out.unshift(...stateAssumptionsOf(d));
  else out.unshift("Counting starts in the conductor's stationary state; without its states at the window ends only the long-time symmetry holds (Lebowitz & Spohn 1999).");
  if (d.traceNotes) out.push(...d.traceNotes);
  if (d.windows) {
    out.push(
      `Realisations are consecutive windows of one trajectory: every interval and every test takes its spread from ${d.windows.blocks} non-overlapping blocks of ${d.windows.blockLength} windows (${d.windows.rule}; Carlstein 1986, Künsch 1989), never from single windows.`,
    );
  }
  return out;
}

function stateAssumptionsOf(d: SamplesDataset): string[] {
  return d.states ? stateAssumptions(d.states) : [];
}

/** Seifert's total entropy production, shown beside a law when the data carry the conductor's states. */
export const TOTAL_ENTROPY_EQUATION = String.raw`\Sigma = \Sigma_{\text{res}} + \ln p(x_0) - \ln p(x_\tau), \qquad \Sigma_{\text{res}} = \sum_{X=A,B} \beta_X\,(\Delta E_X - \mu_X \Delta N_X)`;
export const SEIFERT_2005 = "U. Seifert, Phys. Rev. Lett. 95, 040602 (2005)";
export const KUNSCH_1989 = "H. R. Künsch, Ann. Stat. 17, 1217 (1989)";
export const CARLSTEIN_1986 = "E. Carlstein, Ann. Stat. 14, 1171 (1986)";

/** Equations and references of a check, extended for counted data (states, windows) and unchanged otherwise. */
export function countingSources(d: SamplesDataset, equations: string[], references: string[]): { equations: string[]; references: string[] } {
  return {
    equations: d.states ? [...equations, TOTAL_ENTROPY_EQUATION] : equations,
    references: [...references, ...(d.states ? [SEIFERT_2005] : []), ...(d.windows ? [CARLSTEIN_1986, KUNSCH_1989] : [])],
  };
}

/**
 * The part of each row's Σ that the fitted channels (coefficient × current) do not carry, for the exchange
 * fit's offset: the boundary term ln p(x₀) − ln p(x_τ) and, with per-lead particle counts, the particles the
 * conductor keeps. Null for two-point data (no offset, so their fit is unchanged to the last digit).
 */
export function countingOffset(d: SamplesDataset, channels: { feature: Float64Array; declared: number }[]): Float64Array | null {
  if (!d.states && d.config.columns.dN_A === undefined) return null;
  const out = Float64Array.from(d.sigma);
  for (const c of channels) for (let i = 0; i < out.length; i++) out[i] -= c.declared * c.feature[i];
  return out;
}
