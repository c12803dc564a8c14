import type { SamplesDataset } from "../../ingest/types.ts";
import { normalQuantile, normalCdf } from "../../stats/normal.ts";
import { weightedMeanOf, weightedMoments } from "../../stats/weightedMoments.ts";
import { freedmanDiaconisBins, histogram, linearEdges } from "../../stats/histogram.ts";
import { fmt, numberOption, perDataset } from "../helpers.ts";
import { sigmaVanishesIdentically, trivialAtEquilibrium } from "../equilibriumGuard.ts";
import type { CheckContext, CheckDefinition, CheckResult, Status } from "../types.ts";
import type { PlotSpec } from "../plotSpec.ts";
import { countingAssumptions, countingSources, unitMean } from "../resamplingUnits.ts";

/** Fewer realisations than this cannot support a normal-theory bound on the mean. */
export const MIN_REALISATIONS = 30;

export interface SecondLawDecision {
  status: Status;
  summary: string;
  reason?: string;
}

/**
 * The verdict from the mean and its standard error alone (physics §6):
 * fail when <Sigma> is significantly negative (one-sided test at alpha);
 * pass when the lower confidence bound lies above −margin (a violation of the
 * declared size would have been seen); inconclusive otherwise.
 */
export function decideSecondLaw(n: number, mean: number, se: number, alpha: number, confidence: number, margin: number): SecondLawDecision {
  if (n < MIN_REALISATIONS || !Number.isFinite(se)) {
    return {
      status: "inconclusive",
      summary: `Only ${n} realisations: too few to bound the mean entropy production.`,
      reason: `At least ${MIN_REALISATIONS} realisations are needed for a confidence bound on ⟨Σ⟩; record more runs.`,
    };
  }
  const pViolation = se > 0 ? normalCdf(mean / se) : mean < 0 ? 0 : 1; // P(Z <= mean/se) tests H0: <Sigma> >= 0
  const lower = mean - normalQuantile(confidence) * se;
  if (pViolation < alpha) {
    return {
      status: "fail",
      summary: `The mean entropy production ⟨Σ⟩ = ${fmt(mean)} k_B is significantly negative (one-sided p = ${fmt(pViolation, 3)} < α = ${alpha}).`,
    };
  }
  if (lower >= -margin) {
    return {
      status: "pass",
      summary: `⟨Σ⟩ = ${fmt(mean)} ± ${fmt(se, 2)} k_B; the ${confidence * 100}% lower bound ${fmt(lower)} k_B excludes a violation larger than ${margin} k_B per realisation.`,
    };
  }
  const needed = Math.ceil(n * ((normalQuantile(confidence) * se) / Math.max(margin + mean, 1e-300)) ** 2);
  return {
    status: "inconclusive",
    summary: `⟨Σ⟩ = ${fmt(mean)} ± ${fmt(se, 2)} k_B: no significant violation, but the data cannot exclude one of ${margin} k_B.`,
    reason: `The ${confidence * 100}% lower bound ${fmt(lower)} k_B lies below −${margin} k_B; roughly ${needed.toLocaleString("en")} realisations would resolve the margin at this spread.`,
  };
}

function sigmaHistogramPlot(d: SamplesDataset): PlotSpec {
  const sorted = Float64Array.from(d.sigma).sort();
  const bins = freedmanDiaconisBins(sorted, d.realisations);
  const h = histogram(d.sigma, linearEdges(sorted[0], sorted[sorted.length - 1], bins), d.weight);
  const width = h.edges[1] - h.edges[0];
  const density = h.counts.map((c) => c / (h.total * width));
  const mean = weightedMoments(d.sigma, d.weight).mean;
  return {
    id: "sigma-histogram",
    title: "Entropy production per realisation",
    alt: `Histogram of the entropy production Σ of ${d.realisations} realisations in ${bins} bins from ${fmt(h.edges[0])} to ${fmt(h.edges[bins])} k_B; the dashed line marks the mean ${fmt(mean)} k_B and the dotted line Σ = 0. Mass to the left of zero is allowed; only the mean must be non-negative.`,
    x: { label: "Entropy production Σ", unit: "k_B" },
    y: { label: "Probability density", unit: "1/k_B" },
    series: [
      { type: "bars", name: "realisations", x0: h.edges.slice(0, -1), x1: h.edges.slice(1), y: density },
      { type: "rule", name: "mean ⟨Σ⟩", axis: "x", value: mean, style: "dashed" },
      { type: "rule", name: "Σ = 0", axis: "x", value: 0, style: "dotted" },
    ],
  };
}

const REFERENCES = [
  "C. Jarzynski and D. K. Wójcik, Phys. Rev. Lett. 92, 230602 (2004)",
  "D. Andrieux, P. Gaspard, T. Monnai and S. Tasaki, New J. Phys. 11, 043014 (2009)",
  "U. Seifert, Rep. Prog. Phys. 75, 126001 (2012)",
];

const EQUATIONS = [
  String.raw`\Sigma = \beta_A\,(\Delta E_A - \mu_A \Delta N_A) + \beta_B\,(\Delta E_B - \mu_B \Delta N_B) = \bar\beta\, W + a_Q\, Q + a_N\, \Delta N`,
  String.raw`\langle \Sigma \rangle \;\ge\; 0 \qquad \text{(from } \langle e^{-\Sigma}\rangle = 1 \text{ and Jensen's inequality)}`,
];

export function secondLawForDataset(d: SamplesDataset, ctx: CheckContext): CheckResult {
  if (sigmaVanishesIdentically(d)) return trivialAtEquilibrium("second-law", d, EQUATIONS, REFERENCES);
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0);
  const plain = weightedMoments(d.sigma, d.weight);
  // Counted data: the estimated p's uncertainty (∂Σ/∂b = 1) and the block structure of windows enter the standard error.
  const m = d.states || d.windows ? { ...plain, standardError: unitMean(d, d.sigma, d.states ? new Float64Array(d.sigma.length).fill(1) : null).standardError } : plain;
  const z = normalQuantile(confidence);
  const lower = m.mean - z * m.standardError;
  const decision = decideSecondLaw(m.n, m.mean, m.standardError, alpha, confidence, margin);
  const a = d.affinity;
  // Per-channel contributions to <Sigma> (information): beta_bar<W>, a_Q<Q>, a_N<dN>.
  const channel = (f: (i: number) => number) => channelMean(d, f);
  const work = channel((i) => a.beta_bar * d.W[i]);
  const heat = channel((i) => a.a_Q * d.Q[i]);
  const particles = channel((i) => a.a_N * d.dN[i]);
  const assumptions = [
    "Both reservoirs start in grand-canonical (Gibbs) states at the declared temperatures and chemical potentials, prepared independently.",
    "Energies and particle numbers come from two-point measurements of the isolated reservoirs before and after the contact.",
    "Realisations are independent and identically prepared.",
    d.config.work === "zero" ? "The switching work is declared zero (W = 0 for every realisation)." : "The switching work W enters Σ as measured.",
  ];
  if (!d.hasParticleColumn) assumptions.push("No particle-number column: no particles are exchanged (dN = 0).");
  return {
    check: "second-law",
    dataset: d.id,
    status: decision.status,
    summary: decision.summary,
    ...(decision.reason ? { reason: decision.reason } : {}),
    values: {
      mean_sigma: m.mean,
      ci: [lower, m.mean + z * m.standardError],
      lower_bound: lower,
      standard_error: m.standardError,
      sd_sigma: Math.sqrt(m.variance),
      realisations: m.n,
      contributions: { beta_bar_W: work.mean, a_Q_Q: heat.mean, a_N_dN: particles.mean },
    },
    criteria: { alpha, margin, confidence },
    assumptions: countingAssumptions(d, assumptions),
    ...countingSources(d, EQUATIONS, REFERENCES),
    tables: [
      {
        id: "contributions",
        title: "Contributions to the mean entropy production",
        columns: [
          { key: "channel", label: "Channel" },
          { key: "mean", label: "Mean", unit: "k_B" },
          { key: "se", label: "Standard error", unit: "k_B" },
        ],
        rows: [
          { channel: "work  β̄⟨W⟩", mean: work.mean, se: work.standardError },
          { channel: "heat  a_Q⟨Q⟩", mean: heat.mean, se: heat.standardError },
          { channel: "particles  a_N⟨ΔN⟩", mean: particles.mean, se: particles.standardError },
          ...(d.states ? stateRows(d) : []),
          { channel: "total  ⟨Σ⟩", mean: m.mean, se: m.standardError },
        ],
      },
    ],
    plots: [sigmaHistogramPlot(d)],
  };
}

/** The mean of a per-realisation quantity with its standard error; for windows of one trajectory, from blocks of windows. */
function channelMean(d: SamplesDataset, f: (i: number) => number): { mean: number; standardError: number } {
  const m = weightedMeanOf(d.sigma.length, f, d.weight);
  if (!d.windows) return m;
  return { ...m, standardError: unitMean(d, Float64Array.from({ length: d.sigma.length }, (_, i) => f(i)), null).standardError };
}

/** With the conductor's states: the rest of Σ_res (particles the conductor keeps) and the boundary term, each with its mean. */
function stateRows(d: SamplesDataset): { channel: string; mean: number; se: number }[] {
  const states = d.states!;
  const a = d.affinity;
  const rest = channelMean(d, (i) => states.sigmaReservoirs[i] - a.beta_bar * d.W[i] - a.a_Q * d.Q[i] - a.a_N * d.dN[i]);
  const boundary = channelMean(d, (i) => states.boundary[i]);
  return [
    { channel: "particles kept by the conductor", mean: rest.mean, se: rest.standardError },
    { channel: "boundary  ln p(x₀) − ln p(x_τ)", mean: boundary.mean, se: boundary.standardError },
  ];
}

export const secondLaw: CheckDefinition = {
  id: "second-law",
  title: "Second law: non-negative mean entropy production",
  verdictBearing: true,
  run: perDataset("samples", secondLawForDataset),
};
