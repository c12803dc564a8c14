import type { SamplesDataset } from "../../ingest/types.ts";
import type { FittedAffinities } from "../../physics/affinities.ts";
import { explanationSentence, explanationsOf, quantityText, type Explanation } from "./explanations.ts";
import { fitExchangeLogistic, logisticScoreTest, type LogisticFit } from "../../stats/logisticFit.ts";
import { columnDependence, identifiableCombinations } from "../../stats/columnDependence.ts";
import { normalQuantile, normalTwoSidedP } from "../../stats/normal.ts";
import { holm } from "../../stats/holm.ts";
import { resolveSentence } from "../../stats/sampleSize.ts";
import { fmt, fmtInterval, notApplicableResult, numberOption, perDataset } from "../helpers.ts";
import { ROW_UNIT, type CheckContext, type CheckDefinition, type CheckResult, type Status, type TableSpec } from "../types.ts";
import { binnedLogRatio, type LogRatio } from "./binnedLogRatio.ts";
import { jointHistogramPlot, logRatioPlot, mirrorHistogramPlot } from "./plots.ts";
import { mirrorSymmetryResult } from "./mirrorSymmetry.ts";
import { marginOption, countOption } from "../options.ts";
import { countingAssumptions, countingOffset, countingSources } from "../resamplingUnits.ts";
import { countingScoreTest, withCountingCovariance } from "../countingCovariance.ts";
import { blockBinnedTest } from "./blockBinnedTest.ts";

/** Fewer negative-Σ realisations than this cannot pin the slope (the rare side carries the information). */
export const MIN_NEGATIVE = 20;
/** Fewer realisations than this: no verdict at all. */
export const MIN_REALISATIONS = 100;

export const REFERENCES = [
  "C. Jarzynski and D. K. Wójcik, Phys. Rev. Lett. 92, 230602 (2004)",
  "D. Andrieux, P. Gaspard, T. Monnai and S. Tasaki, New J. Phys. 11, 043014 (2009)",
  "M. Campisi, P. Hänggi and P. Talkner, Rev. Mod. Phys. 83, 771 (2011)",
  "M. Esposito, U. Harbola and S. Mukamel, Rev. Mod. Phys. 81, 1665 (2009)",
  "M. R. Shirts, E. Bair, G. Hooker and V. S. Pande, Phys. Rev. Lett. 91, 140601 (2003)",
  "K. Saito and Y. Utsumi, Phys. Rev. B 78, 115429 (2008)",
  "S. Holm, Scand. J. Stat. 6, 65 (1979)",
];

export const EQUATIONS = [
  String.raw`\frac{P(W, Q, \Delta N)}{P(-W, -Q, -\Delta N)} = e^{\Sigma}, \qquad \Sigma = \bar\beta\, W + a_Q\, Q + a_N\, \Delta N`,
  String.raw`\ln\frac{P(\Sigma)}{P(-\Sigma)} = c\,\Sigma, \qquad c = 1`,
  String.raw`\hat\theta = \arg\max_{\theta} \sum_i w_i \ln \frac{1}{1 + e^{-\theta\cdot z_i}}, \qquad z = (W, Q, \Delta N),\; \theta = (\bar\beta, a_Q, a_N)`,
];

interface Channel {
  key: "beta_bar" | "a_Q" | "a_N";
  /** The coefficient's symbol and the variable it multiplies, for sentences. */
  symbol: string;
  variable: string;
  label: string;
  feature: Float64Array;
  declared: number;
  unit: string;
  /** What the variable counts: energies carry the dataset's energy unit in sentences. */
  dimension: "energy" | "count";
}

/**
 * Channels of the joint fit: W only when work is measured, ΔN only when a particle column was given
 * (otherwise ΔN = 0 is an assumption, stated). A channel may be zero in every realisation or a fixed
 * combination of the others; identifiableJoint sorts that out.
 */
function channelsOf(d: SamplesDataset): Channel[] {
  const out: Channel[] = [];
  if (d.config.work === "measured") out.push({ key: "beta_bar", symbol: "β̄", variable: "W", label: "β̄ (work)", feature: d.W, declared: d.affinity.beta_bar, unit: "1/J", dimension: "energy" });
  out.push({ key: "a_Q", symbol: "a_Q", variable: "Q", label: "a_Q (heat)", feature: d.Q, declared: d.affinity.a_Q, unit: "1/J", dimension: "energy" });
  if (d.hasParticleColumn) out.push({ key: "a_N", symbol: "a_N", variable: "ΔN", label: "a_N (particles)", feature: d.dN, declared: d.affinity.a_N, unit: "", dimension: "count" });
  return out;
}

/** Relative residuals below this are floating-point rounding of an exact relation: not worth a mention. */
const ROUNDING = 1e-12;

/** Preferred basis: ΔN (integer counts) first, then Q, then W, so that Q = εΔN keeps ΔN and fits a_Q·ε + a_N. */
const BASIS_PREFERENCE: Channel["key"][] = ["a_N", "a_Q", "beta_bar"];

/** One identifiable combination φ = θ_basis + Σ_k c_k θ_k, the coefficient of one basis variable. */
interface Combination {
  channel: Channel;
  /** Dependent channels entering φ with their factor c_k (SI) and the symbol used for c_k in sentences. */
  terms: { channel: Channel; factor: number; symbol: string }[];
  label: string;
  declared: number;
}

interface Identifiability {
  basis: Channel[];
  combinations: Combination[];
  /** Channels whose coefficient the data cannot identify on its own. */
  notIdentified: Channel["key"][];
  /** For a person: which relation holds in every realisation and what it leaves identifiable; "" when none. */
  explanation: string;
  relations: { variable: string; relation: string; residual: number }[];
}

/** A factor c in x_k = c·x_j, in the dataset's units. */
function factorText(d: SamplesDataset, c: number, k: Channel, j: Channel): string {
  const u = d.energyUnit;
  if (k.dimension === j.dimension) return fmt(c);
  if (k.dimension === "energy") return `${fmt(c / u.joules)} ${u.name}`;
  return `${fmt(c * u.joules)} per ${u.name}`;
}

/**
 * Which coefficients of θ·z the data identify. When the channels are exactly linearly dependent in every
 * realisation (e.g. Q = εΔN through a single level, or measured work that is zero), θ·z depends on θ only
 * through the coefficients of a basis of the column space, φ_j = θ_j + Σ_k c_jk θ_k; the likelihood is flat
 * along the rest, whatever the sample size. Golub & Van Loan, Matrix Computations (2013), §5.4.2 (rank
 * from QR with column pivoting); the model is the logistic form of physics.md §2 restricted to the span.
 */
function identifiableJoint(d: SamplesDataset, channels: Channel[], weight: Float64Array | null): Identifiability {
  const order = BASIS_PREFERENCE.map((k) => channels.findIndex((c) => c.key === k)).filter((i) => i >= 0);
  const dep = columnDependence(channels.map((c) => c.feature), weight, { order });
  const declared = identifiableCombinations(dep, channels.map((c) => c.declared));
  const symbols = ["ε", "κ", "λ", "ν"];
  const nonzeroFactors = dep.dependent.reduce((acc, k) => acc + k.coefficients.filter((c) => c !== 0).length, 0);
  let used = 0;
  const symbolFor = new Map<string, string>();
  const relations: Identifiability["relations"] = [];
  const sentences: string[] = [];
  for (const k of dep.dependent) {
    const ck = channels[k.index];
    const parts: string[] = [];
    const defs: string[] = [];
    k.coefficients.forEach((c, j) => {
      if (c === 0) return;
      const sym = nonzeroFactors === 1 ? symbols[0] : `${symbols[0]}${"₁₂₃₄₅₆₇₈₉"[used] ?? used + 1}`;
      used++;
      symbolFor.set(`${k.index}:${j}`, sym);
      parts.push(`${sym}·${channels[dep.basis[j]].variable}`);
      defs.push(`${sym} = ${factorText(d, c, ck, channels[dep.basis[j]])}`);
    });
    if (parts.length === 0) {
      relations.push({ variable: ck.variable, relation: `${ck.variable} = 0`, residual: k.residual });
      sentences.push(`${ck.variable} = 0 in every realisation, so ${ck.symbol} multiplies nothing and is not identifiable`);
      continue;
    }
    const relation = `${ck.variable} = ${parts.join(" + ")} with ${defs.join(", ")}`;
    relations.push({ variable: ck.variable, relation, residual: k.residual });
    const involved = [ck, ...k.coefficients.flatMap((c, j) => (c !== 0 ? [channels[dep.basis[j]]] : []))];
    const combos = k.coefficients.flatMap((c, j) => (c !== 0 ? [j] : []));
    sentences.push(
      `${relation} in every realisation${k.residual > ROUNDING ? ` (to ${fmt(k.residual, 2)} of its root-mean-square)` : ""}, so ${involved.map((c) => c.symbol).join(" and ")} are identifiable only as ${combos.length > 1 ? "the combinations" : "the combination"} ${combos.map((j) => "{" + j + "}").join(" and ")}`,
    );
  }
  const combinations: Combination[] = dep.basis.map((b, j) => {
    const terms = dep.dependent.flatMap((k) => (k.coefficients[j] !== 0 ? [{ channel: channels[k.index], factor: k.coefficients[j], symbol: symbolFor.get(`${k.index}:${j}`)! }] : []));
    const channel = channels[b];
    const label = terms.length ? [...terms.map((t) => `${t.channel.symbol}·${t.symbol}`), channel.symbol].join(" + ") : channel.symbol;
    return { channel, terms, label, declared: declared[j] };
  });
  const explanation = sentences.map((t) => t.replace(/\{(\d+)\}/g, (_, j: string) => combinations[Number(j)].label)).join("; ");
  const notIdentified = channels.filter((c) => !combinations.some((m) => m.channel === c && m.terms.length === 0)).map((c) => c.key);
  return { basis: dep.basis.map((b) => channels[b]), combinations, notIdentified, explanation: explanation ? `${explanation}.` : "", relations };
}

function cubed(x: Float64Array): Float64Array {
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) out[i] = x[i] * x[i] * x[i];
  return out;
}

/** The binned test on windows of one trajectory: Hotelling's T² of block sums (blockBinnedTest.ts). */
const HOTELLING_1931 = "H. Hotelling, Ann. Math. Stat. 2, 360 (1931)";

function base(d: SamplesDataset): Pick<CheckResult, "check" | "dataset" | "references" | "equations"> {
  return { check: "exchange-fluctuation", dataset: d.id, ...countingSources(d, EQUATIONS, d.windows ? [...REFERENCES, HOTELLING_1931] : REFERENCES) };
}

export function assumptionsFor(d: SamplesDataset): string[] {
  const out = [
    "Both reservoirs start in independent grand-canonical states at the declared temperatures and chemical potentials.",
    "Energies and particle numbers are two-point measurements of the isolated reservoirs (before and after the contact).",
    "The switching protocol is time-reversal symmetric and there is no magnetic field (or it is reversed in the backward process).",
    "Realisations are independent and identically prepared.",
  ];
  out.push(d.config.work === "zero" ? "The switching work is declared zero (W = 0 in every realisation)." : "The switching work W is measured and enters Σ.");
  if (!d.hasParticleColumn) out.push("No particle-number column: no particles are exchanged (ΔN = 0).");
  return countingAssumptions(d, out);
}

function notApplicable(d: SamplesDataset, reason: string): CheckResult {
  return notApplicableResult({ ...base(d), reason, assumptions: assumptionsFor(d) });
}

interface Test {
  name: string;
  p: number;
  describe: string;
}

export function exchangeFluctuationForDataset(d: SamplesDataset, ctx: CheckContext): CheckResult {
  const field = d.config.field ?? 0;
  if (field !== 0) {
    return notApplicable(
      d,
      `the dataset was taken at a magnetic field of ${fmt(field)} T; the detailed exchange relation links the process at B to the one at −B (Saito & Utsumi 2008), so a single dataset at B ≠ 0 cannot test it. The integral relation still applies.`,
    );
  }
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0);
  const minBinCount = numberOption(ctx, "min_bin_count", 10, (v) => Number.isInteger(v) && v >= 5);
  const z = normalQuantile(1 - (1 - confidence) / 2);
  const n = d.realisations;
  const weight = d.weight;
  const sigma = d.sigma;

  let negative = 0;
  let positive = 0;
  for (let i = 0; i < sigma.length; i++) {
    const w = weight ? weight[i] : 1;
    if (sigma[i] < 0) negative += w;
    else if (sigma[i] > 0) positive += w;
  }
  // Σ ≡ 0 (the zero-affinity point of a sweep): the relation is the mirror symmetry P(z) = P(−z), tested as such.
  if (negative + positive === 0) return mirrorSymmetryResult(d, ctx.settings, margin, assumptionsFor(d));

  // (1) Contracted relation: slope c of ln P(Σ)/P(−Σ), fitted without bins.
  const contracted: LogisticFit = withCountingCovariance(d, fitExchangeLogistic([sigma], weight), [sigma], "features");
  const slopeOk = contracted.status === "converged";
  const slope = slopeOk ? contracted.coefficients[0] : Number.NaN;
  const slopeSe = slopeOk ? contracted.standardErrors[0] : Number.NaN;
  const slopeCi: [number, number] = [slope - z * slopeSe, slope + z * slopeSe];
  // Windows of one trajectory: the score's variance from block sums (and the estimated p), not the model's information.
  const cubic = !slopeOk ? null : d.windows ? countingScoreTest(d, contracted, [sigma], [cubed(sigma)], [Float64Array.from(sigma, (s) => 3 * s * s)]) : logisticScoreTest(contracted!, [sigma], [cubed(sigma)], weight);
  const plainRatio: LogRatio = binnedLogRatio(sigma, weight, minBinCount, d.reduction?.steps.sigma ?? null);
  // Windows of one trajectory: the binned test and the bins' error bars from block sums (blockBinnedTest.ts).
  const blocked = blockBinnedTest(d, plainRatio);
  const ratio: LogRatio = blocked
    ? { ...plainRatio, chiSquare: blocked.statistic, dof: blocked.groups, pValue: blocked.pValue, bins: plainRatio.bins.map((b, k) => ({ ...b, yErr: blocked.yErr[k] })) }
    : plainRatio;

  // (2) Joint relation: the coefficients of (W, Q, ΔN), or the combinations of them the data identify.
  const channels = channelsOf(d);
  const ident = identifiableJoint(d, channels, weight);
  // Counted data through a conductor: the part of Σ_tot no channel carries (boundary term) enters as an offset.
  const offset = countingOffset(d, channels);
  const joint = ident.basis.length ? withCountingCovariance(d, fitExchangeLogistic(ident.basis.map((c) => c.feature), weight, offset ? { offset } : {}), ident.basis.map((c) => c.feature), "offset") : null;
  const jointOk = joint?.status === "converged";
  const fitted: FittedAffinities = { beta_bar: null, a_Q: null, a_N: null };
  const fittedSe: Record<string, number | null> = Object.fromEntries(channels.map((c) => [c.key, null]));
  const coefficientRows: TableSpec["rows"] = [];
  const combinationValues: Record<string, unknown>[] = [];
  const tests: Test[] = [];
  if (slopeOk) tests.push({ name: "slope", p: normalTwoSidedP((slope - 1) / slopeSe), describe: `slope ${fmt(slope)} ≠ 1` });
  ident.combinations.forEach((m, j) => {
    const est = jointOk ? joint!.coefficients[j] : null;
    const se = jointOk ? joint!.standardErrors[j] : null;
    const zScore = est !== null && se !== null ? (est - m.declared) / se : null;
    const p = zScore !== null ? normalTwoSidedP(zScore) : null;
    const unit = m.channel.unit ? ` ${m.channel.unit}` : "";
    if (m.terms.length === 0 && est !== null) {
      fitted[m.channel.key] = est;
      fittedSe[m.channel.key] = se;
    }
    combinationValues.push({
      combination: m.label,
      multiplies: m.channel.variable,
      terms: Object.fromEntries([[m.channel.key, 1], ...m.terms.map((t) => [t.channel.key, t.factor])]),
      fitted: est,
      standard_error: se,
      declared: m.declared,
      z: zScore,
      p_value: p,
    });
    if (est === null || p === null) return;
    tests.push({ name: m.label, p, describe: `fitted ${m.label} = ${fmt(est)}${unit} differs from the declared ${fmt(m.declared)}${unit}` });
    // Each row names its unit (1/J for the energy channels, 1 for ΔN), so the report can show it in 1/meV.
    coefficientRows.push({ coefficient: m.terms.length ? `${m.label} (coefficient of ${m.channel.variable})` : m.channel.label, unit: m.channel.unit || "1", declared: m.declared, fitted: est, se, z: zScore, p });
  });
  // A χ² that is not a number (weights beyond double precision) is no test rather than a crash.
  if (blocked) {
    if (Number.isFinite(blocked.pValue)) tests.push({ name: "binned", p: blocked.pValue, describe: `the binned log-ratio departs from the line y = Σ (Hotelling T² = ${fmt(blocked.statistic)} over ${blocked.groups} ${blocked.groups < blocked.bins ? `groups of ${blocked.bins} bins` : "bins"} from ${blocked.blocks} blocks of ${d.windows!.blockLength} windows, F(${blocked.dof}, ${blocked.denominatorDof}) = ${fmt(blocked.f)})` });
  } else if (ratio.dof > 0 && !Number.isNaN(ratio.chiSquare)) tests.push({ name: "binned", p: ratio.pValue, describe: `the binned log-ratio departs from the line y = Σ (χ² = ${Number.isFinite(ratio.chiSquare) ? fmt(ratio.chiSquare) : "beyond double precision"}, ${ratio.dof} bins)` });
  if (cubic && Number.isFinite(cubic.pValue)) tests.push({ name: "cubic", p: cubic.pValue, describe: "a cubic term in ln P(Σ)/P(−Σ) is significant (the ratio is not exponential in Σ)" });
  const family = holm(tests.map((t) => t.p), alpha);
  ident.combinations.forEach((m, j) => {
    const k = tests.findIndex((t) => t.name === m.label);
    if (k < 0) return;
    const row = coefficientRows.find((r) => r.coefficient === (m.terms.length ? `${m.label} (coefficient of ${m.channel.variable})` : m.channel.label));
    if (row) row.p_holm = family.adjusted[k];
    combinationValues[j].p_holm = family.adjusted[k];
  });
  // Which reservoir states reproduce the fitted coefficients: single-lead alternatives and the joint state.
  const explanations: Explanation[] = jointOk
    ? explanationsOf(
        d,
        {
          combinations: ident.combinations.map((m, j) => ({
            weights: Object.fromEntries([[m.channel.key, 1], ...m.terms.map((t) => [t.channel.key, t.factor])]),
            estimate: joint!.coefficients[j],
          })),
          covariance: joint!.covariance,
          particles: channels.some((c) => c.key === "a_N"),
          work: channels.some((c) => c.key === "beta_bar"),
        },
        alpha,
        z,
      )
    : [];

  const rejected = tests.filter((_, k) => family.rejected[k]);
  let status: Status;
  let summary: string;
  let reason: string | undefined;
  const effectiveText = explanations.length ? ` ${explanationSentence(d, explanations, confidence, alpha)}` : "";
  const identText = ident.explanation ? ` ${ident.explanation}${describeCombinations(ident.combinations.filter((m) => m.terms.length > 0), combinationValues)}` : "";
  if (n < MIN_REALISATIONS) {
    status = "inconclusive";
    summary = `Only ${n} realisations: too few to test the exchange relation.`;
    reason = `At least ${MIN_REALISATIONS} realisations, ${MIN_NEGATIVE} of them with Σ < 0, are needed; record more runs.`;
  } else if (rejected.length > 0) {
    status = "fail";
    summary = `The exchange fluctuation relation is violated: ${rejected.map((t) => t.describe).join("; ")} (Holm-adjusted p ≤ ${alpha}).${effectiveText}${identText}`;
  } else if (negative >= MIN_NEGATIVE && positive < negative && contracted.status === "separable") {
    // The mirror image of the usual shortage: Σ < 0 in (nearly) every realisation, so P(Σ) has no partner P(−Σ).
    status = "inconclusive";
    summary = `${positive === 0 ? "No realisation has" : `Only ${fmt(positive)} of ${n} realisations ${positive === 1 ? "has" : "have"}`} Σ > 0 while ${fmt(negative)} have Σ < 0: without mirrored events the slope of ln P(Σ)/P(−Σ) cannot be estimated.`;
    reason = `The ratio needs realisations of both signs. Σ < 0 in nearly every run contradicts the declared affinities (are reservoirs A and B, or the sign of Q, swapped?); the second-law check judges the mean.`;
  } else if (negative < MIN_NEGATIVE || contracted.status === "separable") {
    status = "inconclusive";
    summary = `Only ${fmt(negative)} of ${n} realisations have Σ < 0: too few to estimate the slope of ln P(Σ)/P(−Σ).`;
    reason = `At least ${MIN_NEGATIVE} realisations with negative Σ are needed; a shorter contact time or smaller affinities make them more frequent, or record about ${Math.ceil((MIN_NEGATIVE / Math.max(negative, 0.5)) * n).toLocaleString("en")} runs.`;
  } else if (!slopeOk) {
    status = "inconclusive";
    summary = "The slope of ln P(Σ)/P(−Σ) could not be estimated.";
    reason = `${contracted.message ?? "The fit failed"}; please report this dataset if it has many realisations of both signs.`;
  } else if (ident.basis.length > 0 && !jointOk) {
    // The channels left are linearly independent in the data, so this is a fit that more data can rescue.
    status = "inconclusive";
    summary = `The slope ${fmt(slope)} with ${confidence * 100}% interval ${fmtInterval(slopeCi[0], slopeCi[1])} is consistent with 1, but the coefficients of (W, Q, ΔN) could not be fitted.${identText}`;
    reason = `${joint?.message ?? "joint fit failed"}; more realisations with opposite signs in each channel would allow the joint test.`;
  } else if (slopeCi[0] >= 1 - margin && slopeCi[1] <= 1 + margin) {
    status = "pass";
    summary = `The slope of ln P(Σ)/P(−Σ) is ${fmt(slope)}, ${confidence * 100}% interval ${fmtInterval(slopeCi[0], slopeCi[1])} within 1 ± ${margin}, and no fitted coefficient differs significantly from its declared value.${identText}`;
  } else {
    status = "inconclusive";
    const half = (slopeCi[1] - slopeCi[0]) / 2;
    summary = `No significant violation, but the slope's ${confidence * 100}% interval ${fmtInterval(slopeCi[0], slopeCi[1])} does not lie within 1 ± ${margin}.${identText}`;
    reason = `The slope is known to ±${fmt(half, 2)}. ${resolveSentence(n, half, slope - 1, margin)}`;
  }

  const declaredTemps = { T_A: d.reservoirs.A.T, T_B: d.reservoirs.B.T, delta_mu: d.reservoirs.A.mu - d.reservoirs.B.mu };
  return {
    ...base(d),
    status,
    summary,
    ...(reason ? { reason } : {}),
    values: {
      slope,
      slope_ci: slopeCi,
      slope_standard_error: slopeSe,
      effective_affinity: { a_Q: fitted.a_Q, a_N: fitted.a_N, ...(fitted.beta_bar !== null ? { beta_bar: fitted.beta_bar } : {}) },
      effective_affinity_standard_error: fittedSe,
      identifiable_combinations: combinationValues,
      not_identifiable: ident.notIdentified,
      identifiability: ident.explanation || null,
      exact_relations: ident.relations,
      declared_affinity: { a_Q: d.affinity.a_Q, a_N: d.affinity.a_N, beta_bar: d.affinity.beta_bar },
      explanations: explanations.map((e) => ({
        id: e.id,
        kind: e.kind,
        frees: e.label,
        identified: e.identified,
        consistent: e.consistent,
        chi_square: e.chiSquare,
        dof: e.dof,
        p_value: e.p,
        quantities: e.quantities.map((q) => ({ name: q.name, value: q.value, interval: q.interval, declared: q.declared, unit: q.unit, interval_method: q.method })),
      })),
      interval_method: d.windows
        ? `Wald intervals from a sandwich covariance whose middle sums each fit's scores over ${d.windows.blocks} non-overlapping blocks of ${d.windows.blockLength} consecutive windows (block length ${d.windows.rule}; Carlstein 1986, Künsch 1989), temperatures mapped from β through T = 1/(k_B β)`
        : "Wald intervals from the logistic fit's inverse Fisher information (delta method), temperatures mapped from β through T = 1/(k_B β)",
      declared_reservoirs: declaredTemps,
      bins_used: ratio.bins.length,
      binned_chi_square: blocked
        ? { statistic: blocked.statistic, dof: blocked.dof, p_value: blocked.pValue, exact_values: ratio.discrete, method: "Hotelling T² of the bins' moment residuals summed over blocks of windows, referred to F(dof, denominator_dof)", f_statistic: blocked.f, denominator_dof: blocked.denominatorDof, blocks: blocked.blocks, block_length: d.windows!.blockLength, bins: blocked.bins }
        : ratio.dof > 0
          ? { statistic: ratio.chiSquare, dof: ratio.dof, p_value: ratio.pValue, exact_values: ratio.discrete }
          : null,
      cubic_score_test: cubic && Number.isFinite(cubic.pValue) ? { statistic: cubic.statistic, dof: cubic.dof, p_value: cubic.pValue, ...(d.windows ? { method: "score variance from block sums (robust score test)" } : {}) } : null,
      tests: tests.map((t, k) => ({ test: t.name, p_value: t.p, p_holm: family.adjusted[k], rejected: family.rejected[k] })),
      realisations: n,
      negative_sigma: negative,
    },
    criteria: { alpha, margin, confidence },
    assumptions: assumptionsFor(d),
    tables: [
      {
        id: "coefficients",
        title: "Fitted coefficients of ln P(z)/P(−z) = θ·z next to the declared ones",
        columns: [
          { key: "coefficient", label: "Coefficient" },
          { key: "unit", label: "Unit" },
          { key: "declared", label: "Declared", unit: ROW_UNIT },
          { key: "fitted", label: "Fitted", unit: ROW_UNIT },
          { key: "se", label: "Standard error", unit: ROW_UNIT },
          { key: "z", label: "z" },
          { key: "p", label: "p" },
          { key: "p_holm", label: "p (Holm)" },
        ],
        rows: coefficientRows,
      },
      {
        id: "explanations",
        title: "Reservoir states that reproduce the fitted coefficients (alternatives, not one state)",
        columns: [
          { key: "explanation", label: "Explanation" },
          { key: "quantities", label: "Implied values (95 % intervals)" },
          { key: "chi_square", label: "χ² left unexplained" },
          { key: "dof", label: "Degrees of freedom" },
          { key: "p", label: "p" },
          { key: "verdict", label: "Verdict" },
        ],
        rows: explanations.map((e) => ({
          explanation: e.label,
          quantities: e.identified ? e.quantities.map((q) => quantityText(d, q)).join("; ") : "not identified by these data",
          chi_square: e.chiSquare,
          dof: e.dof,
          p: e.p,
          verdict: !e.identified ? "not identified" : e.consistent ? (e.dof === 0 ? "reproduces the fit exactly" : "consistent") : "excluded",
        })),
      },
    ],
    plots: [
      mirrorHistogramPlot(d),
      logRatioPlot(ratio, slopeOk ? slope : null),
      ...(d.hasParticleColumn && d.dN.some((v) => v !== 0) ? [jointHistogramPlot(d)] : []),
    ],
  };
}

/** " Fitted: a_Q·ε + a_N = 0.58 ± 0.01 (declared 0.58)." for the combinations that are not single coefficients. */
function describeCombinations(combos: Combination[], values: Record<string, unknown>[]): string {
  const parts = combos.flatMap((m) => {
    const v = values.find((x) => x.combination === m.label);
    if (!v || typeof v.fitted !== "number" || typeof v.standard_error !== "number") return [];
    const unit = m.channel.unit ? ` ${m.channel.unit}` : "";
    return [`${m.label} = ${fmt(v.fitted)} ± ${fmt(v.standard_error, 2)}${unit} (declared ${fmt(m.declared)}${unit})`];
  });
  return parts.length ? ` Fitted: ${parts.join("; ")}.` : "";
}

export const exchangeFluctuation: CheckDefinition = {
  id: "exchange-fluctuation",
  title: "Detailed exchange fluctuation relation",
  verdictBearing: true,
  options: { margin: marginOption, min_bin_count: countOption(5) },
  run: perDataset("samples", exchangeFluctuationForDataset),
};

