import type { SamplesDataset } from "../../ingest/types.ts";
import { normalQuantile, normalTwoSidedP } from "../../stats/normal.ts";
import { resolveSentence } from "../../stats/sampleSize.ts";
import { currentMoments, fmt, fmtInterval, numberOption, perDataset, withinCellScatter } from "../helpers.ts";
import type { CheckContext, CheckDefinition, CheckResult, Status } from "../types.ts";
import { unitMean } from "../resamplingUnits.ts";

/**
 * Work done by switching the contact, W = ΔE_A + ΔE_B. Reports its mean, spread,
 * the fraction of realisations with non-zero work and its correlation with Q
 * and ΔN, and says whether the fluctuation–dissipation derivation of the
 * Onsager matrix without work applies (it needs W = 0 in every realisation:
 * Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11, 043014 (2009); with work,
 * a spontaneous flux and a non-symmetric response appear).
 *
 * A `work: zero` declaration is itself tested when the data carry work (a W
 * column or both energy changes): it is contradicted when ⟨β̄W⟩ differs
 * significantly from 0 or the realisations' work is larger than the margin in
 * units of k_B (rms of β̄W).
 */

/** |W| below this fraction of the typical energy change is the rounding of printed numbers, not work. */
const ROUNDING = 1e-7;

function rmsOf(x: Float64Array | null, weight: Float64Array | null): number {
  if (!x) return 0;
  let s = 0;
  let n = 0;
  for (let i = 0; i < x.length; i++) {
    const w = weight ? weight[i] : 1;
    s += w * x[i] * x[i];
    n += w;
  }
  return Math.sqrt(s / n);
}

/** Weighted Pearson correlation (two passes: means, then centred sums). */
export function weightedCorrelation(x: Float64Array, y: Float64Array, weight: Float64Array | null): number | null {
  let n = 0;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < x.length; i++) {
    const w = weight ? weight[i] : 1;
    n += w;
    mx += w * x[i];
    my += w * y[i];
  }
  mx /= n;
  my /= n;
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  for (let i = 0; i < x.length; i++) {
    const w = weight ? weight[i] : 1;
    const dx = x[i] - mx;
    const dy = y[i] - my;
    sxx += w * dx * dx;
    syy += w * dy * dy;
    sxy += w * dx * dy;
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : null;
}

export function workForDataset(d: SamplesDataset, ctx: CheckContext): CheckResult {
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0);
  const refs = [
    "D. Andrieux, P. Gaspard, T. Monnai and S. Tasaki, New J. Phys. 11, 043014 (2009)",
    "M. Campisi, P. Hänggi and P. Talkner, Rev. Mod. Phys. 83, 771 (2011)",
  ];
  const equations = [
    String.raw`W = \Delta E_A + \Delta E_B, \qquad \Sigma = \bar\beta\, W + a_Q\, Q + a_N\, \Delta N`,
    String.raw`W = 0:\quad L = \frac{\langle x\, x^{\mathsf T} \rangle_0}{2\tau}\;\text{(symmetric, positive semi-definite)}`,
  ];
  const declared = d.config.work;
  const base = {
    check: "work" as const,
    dataset: d.id,
    references: refs,
    equations,
    assumptions: ["Energies are two-point measurements of the isolated reservoirs, so ΔE_A + ΔE_B is the work of switching the contact on and off."],
    tables: [],
    plots: [],
  };
  if (!d.W_data) {
    return {
      ...base,
      status: "info",
      summary: "The data carry no work (no W column, no energy changes of both reservoirs); W = 0 is declared, so the Onsager derivation without work applies by that declaration.",
      values: { mean_W: 0, fraction_nonzero: 0, declared: declared, work_in_data: false, onsager_without_work_applies: true },
      criteria: {},
    };
  }
  const W = d.W_data;
  const weight = d.weight;
  const typical = Math.max(rmsOf(d.dE_A, weight), rmsOf(d.dE_B, weight), rmsOf(d.Q, weight));
  const threshold = ROUNDING * typical;
  let nonzero = 0;
  for (let i = 0; i < W.length; i++) if (Math.abs(W[i]) > threshold) nonzero += weight ? weight[i] : 1;
  const fraction = nonzero / d.realisations;
  const plain = currentMoments(d, W, "W");
  // Windows of one trajectory: the standard error from blocks of windows (resamplingUnits.ts), not from single windows.
  const m = d.windows ? { ...plain, standardError: unitMean(d, W, null).standardError } : plain;
  const bb = d.affinity.beta_bar;
  const meanBW = bb * m.mean;
  const seBW = bb * m.standardError;
  const scatterW = withinCellScatter(d, "W", "W");
  const rmsBW = bb * (scatterW > 0 ? Math.sqrt(rmsOf(W, weight) ** 2 + scatterW / m.n) : rmsOf(W, weight));
  const z = normalQuantile(1 - (1 - confidence) / 2);
  const ciBW: [number, number] = [meanBW - z * seBW, meanBW + z * seBW];
  const pMean = seBW > 0 ? normalTwoSidedP(meanBW / seBW) : meanBW === 0 ? 1 : 0;
  const corrQ = weightedCorrelation(W, d.Q, weight);
  const corrN = d.hasParticleColumn ? weightedCorrelation(W, d.dN, weight) : null;
  const applies = fraction === 0;
  const values = {
    mean_W: m.mean,
    sd_W: Math.sqrt(m.variance),
    standard_error_W: m.standardError,
    fraction_nonzero: fraction,
    mean_beta_bar_W: meanBW,
    mean_beta_bar_W_ci: ciBW,
    rms_beta_bar_W: rmsBW,
    p_value_mean: pMean,
    correlation_W_Q: corrQ,
    correlation_W_dN: corrN,
    declared,
    work_in_data: true,
    onsager_without_work_applies: applies,
    realisations: d.realisations,
  };
  const stats = `⟨β̄W⟩ = ${fmt(meanBW)} k_B ${fmtInterval(ciBW[0], ciBW[1])}, rms ${fmt(rmsBW)} k_B, non-zero in ${fmt(100 * fraction)} % of realisations`;
  if (declared === "measured") {
    return {
      ...base,
      status: "info",
      summary: applies
        ? "The measured work is zero in every realisation: the Onsager derivation without work applies."
        : d.states || d.leadParticles
          ? // Counted through a conductor, ΔE_A + ΔE_B is the energy the conductor (or a bath the leads do not see) gave the leads, not switching work.
            `The leads' total energy change ΔE_A + ΔE_B is not zero: ${stats}. Counted through a conductor, it is the energy the conductor kept or gave back between the window's ends (and any energy a bath the leads do not see supplied), not work done by switching a contact; it enters Σ through the leads' energies.`
          : `Work is done by switching the contact: ${stats}; correlation with Q ${corrQ === null ? "undefined" : fmt(corrQ, 3)}${corrN !== null ? `, with ΔN ${fmt(corrN, 3)}` : ""}. The fluctuation–dissipation form without work does not apply; use the weighted flux and report the spontaneous part.`,
      values,
      criteria: { alpha, confidence },
    };
  }
  // work: zero declared, but the data carry work: test the declaration.
  let status: Status;
  let summary: string;
  let reason: string | undefined;
  if (pMean <= alpha || rmsBW > margin) {
    status = "fail";
    summary = `work: zero is declared, but the data carry work: ${stats}${pMean <= alpha ? ` (mean significantly non-zero, p = ${fmt(pMean, 3)})` : ""}${rmsBW > margin ? ` (rms β̄W above the margin of ${margin} k_B)` : ""}. Declare work: measured so that W enters Σ.`;
  } else if (ciBW[0] >= -margin && ciBW[1] <= margin) {
    status = "pass";
    summary = `The work in the data is consistent with the declared W = 0: ${stats}, within ±${margin} k_B.`;
  } else {
    status = "inconclusive";
    summary = `The work in the data is not significantly non-zero, but its mean is not pinned within ±${margin} k_B: ${stats}.`;
    reason = resolveSentence(d.realisations, (ciBW[1] - ciBW[0]) / 2, meanBW, margin);
  }
  return { ...base, status, summary, ...(reason ? { reason } : {}), values, criteria: { alpha, margin, confidence } };
}

export const work: CheckDefinition = {
  id: "work",
  title: "Switching work",
  verdictBearing: true,
  run: perDataset("samples", workForDataset),
};
