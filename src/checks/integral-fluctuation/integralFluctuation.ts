import type { SamplesDataset } from "../../ingest/types.ts";
import { exponentialConvergence } from "../../physics/exponentialConvergence.ts";
import { bcaInterval, bcaPValue, bootstrapRatio } from "../../stats/bootstrap.ts";
import { normalQuantile } from "../../stats/normal.ts";
import { resolveSentence } from "../../stats/sampleSize.ts";
import { fmt, fmtInterval, numberOption, perDataset } from "../helpers.ts";
import { sigmaVanishesIdentically, trivialAtEquilibrium } from "../equilibriumGuard.ts";
import type { CheckContext, CheckDefinition, CheckResult, Status } from "../types.ts";
import type { PlotSpec } from "../plotSpec.ts";
import type { Rng } from "../../stats/rng.ts";
import { countingAssumptions, countingSources, resamplingUnits } from "../resamplingUnits.ts";
import { exp, log } from "../../math/index.ts";

export const MIN_REALISATIONS = 30;

/**
 * Exponents above this are shifted before exp() so that no term overflows —
 * nor its cube, which the bootstrap's jackknife acceleration forms
 * (Efron & Tibshirani 1993, eq. 14.15): (e^100)^3 = e^300 stays below the
 * largest double, e^709.78.
 */
const MAX_EXPONENT = 100;

/**
 * The order in which realisations enter the running estimate: file order for
 * raw data; for a histogram, a seeded random order of its realisations, drawn
 * from the cells without replacement (an urn, sampled through a Fenwick tree of
 * remaining counts: Fenwick, Softw. Pract. Exp. 24, 327 (1994)), so that the
 * curve looks as it would for the raw data. At most `cap` draws; the last point
 * is then the full average.
 */
function realisationOrder(d: SamplesDataset, rng: Rng, cap: number): Uint32Array {
  const m = d.sigma.length; // rows, or cells of a reduced file
  if (!d.weight) {
    const order = new Uint32Array(Math.min(m, cap));
    for (let i = 0; i < order.length; i++) order[i] = i;
    return order;
  }
  const tree = new Float64Array(m + 1);
  for (let i = 0; i < m; i++) {
    for (let j = i + 1; j <= m; j += j & -j) tree[j] += d.weight[i];
  }
  let remaining = d.realisations;
  let size = 1;
  while (size * 2 <= m) size *= 2;
  const draws = Math.min(remaining, cap);
  const order = new Uint32Array(draws);
  for (let k = 0; k < draws; k++) {
    // Find the cell holding the realisation with rank `target` among those left.
    let target = Math.floor(rng.uniform() * remaining);
    let pos = 0;
    for (let step = size; step > 0; step >>= 1) {
      if (pos + step <= m && tree[pos + step] <= target) {
        pos += step;
        target -= tree[pos];
      }
    }
    order[k] = pos;
    for (let j = pos + 1; j <= m; j += j & -j) tree[j] -= 1;
    remaining--;
  }
  return order;
}

/**
 * Running estimate of ⟨e^−Σ⟩ against the number of realisations used, with a
 * band of ± z standard errors from Welford's running variance (Welford,
 * Technometrics 4, 419 (1962)), sampled at about 120 logarithmically spaced counts.
 */
function runningEstimatePlot(d: SamplesDataset, shift: number, z: number, confidence: number, rng: Rng, fullMean: number): PlotSpec {
  const sigma = d.sigma;
  const total = d.realisations;
  // A summarised file (10^7 realisations and more) draws fewer: the curve's shape is set by then, and
  // the last point is the full average anyway.
  const order = realisationOrder(d, rng, d.reduction ? 1 << 18 : 2_000_000);
  const marks: number[] = [];
  for (let k = 0; k <= 120; k++) marks.push(Math.round(exp(log(Math.min(10, total)) + ((log(total) - log(Math.min(10, total))) * k) / 120)));
  const xs: number[] = [];
  const ys: number[] = [];
  const lo: number[] = [];
  const hi: number[] = [];
  const scale = exp(shift);
  let n = 0;
  let mean = 0;
  let m2 = 0;
  let next = 0;
  for (let k = 0; k < order.length && next < marks.length; k++) {
    const i = order[k];
    const x = exp(-sigma[i] - shift);
    n += 1;
    const delta = x - mean;
    mean += delta / n;
    m2 += delta * (x - mean);
    while (next < marks.length && n >= marks[next]) {
      const se = n > 1 ? Math.sqrt(m2 / (n - 1) / n) : 0;
      xs.push(n);
      ys.push(mean * scale);
      lo.push((mean - z * se) * scale);
      hi.push((mean + z * se) * scale);
      next++;
    }
  }
  if (n < total) {
    // Beyond the cap: close the curve at the full average, with the last band width scaled by √(n/N).
    const se = n > 1 ? Math.sqrt(m2 / (n - 1) / total) : 0;
    xs.push(total);
    ys.push(fullMean);
    lo.push(fullMean - z * se * scale);
    hi.push(fullMean + z * se * scale);
  }
  return {
    id: "running-exp-average",
    title: "Running estimate of ⟨e^−Σ⟩",
    alt: `The average of e^−Σ over the first n realisations${d.weight ? " (the histogram's realisations drawn in a seeded random order)" : " in file order"}, for n from ${xs[0] ?? 0} to ${total} on a logarithmic axis, with a ${confidence * 100}% normal band from the running standard error; the dashed line is the exact value 1. A curve that still drifts or jumps at large n has not converged; sudden upward jumps are rare realisations with negative Σ.`,
    x: { label: "Realisations used", scale: "log" },
    y: { label: "⟨e^−Σ⟩" },
    series: [
      { type: "band", name: `${confidence * 100}% band (normal)`, x: xs, lower: lo, upper: hi },
      { type: "line", name: "running estimate", x: xs, y: ys },
      { type: "rule", name: "exact value 1", axis: "y", value: 1, style: "dashed" },
    ],
  };
}

const REFERENCES = [
  "C. Jarzynski and D. K. Wójcik, Phys. Rev. Lett. 92, 230602 (2004)",
  "M. Campisi, P. Hänggi and P. Talkner, Rev. Mod. Phys. 83, 771 (2011)",
  "C. Jarzynski, Phys. Rev. E 73, 046105 (2006)",
  "B. Efron and R. J. Tibshirani, An Introduction to the Bootstrap (Chapman & Hall, 1993)",
  "J. A. Hanley and B. MacGibbon, Comput. Methods Programs Biomed. 83, 57 (2006)",
];

const EQUATIONS = [
  String.raw`\left\langle e^{-\Sigma} \right\rangle = 1`,
  String.raw`N \gtrsim e^{\langle \Sigma \rangle} \quad\text{(sample size needed to resolve the average)}`,
];

export function integralFluctuationForDataset(d: SamplesDataset, ctx: CheckContext): CheckResult {
  if (sigmaVanishesIdentically(d)) return trivialAtEquilibrium("integral-fluctuation", d, EQUATIONS, REFERENCES);
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0);
  const sigma = d.sigma;
  let maxExp = -Infinity;
  for (let i = 0; i < sigma.length; i++) if (-sigma[i] > maxExp) maxExp = -sigma[i];
  const shift = maxExp > MAX_EXPONENT ? maxExp - MAX_EXPONENT : 0;
  const u = new Float64Array(sigma.length);
  for (let i = 0; i < sigma.length; i++) u[i] = exp(-sigma[i] - shift);
  // With conductor states, u depends on p̂ through the boundary term: ∂u/∂b = −u.
  const units = resamplingUnits(d, u, d.states ? u.map((x) => -x) : null);
  const boot = bootstrapRatio(units.u, units.v, units.weight, ctx.rngFor(d.sha256, "exp-average"), { resamples: ctx.settings.resamples });
  const scale = exp(shift);
  const mean = boot.estimate * scale;
  const ciScaled = bcaInterval(boot, confidence);
  const ci: [number, number] = [ciScaled[0] * scale, ciScaled[1] * scale];
  const pValue = bcaPValue(boot, 1 / scale);
  // Windows cut from one trace count as N/g independent realisations (g from the trace's autocorrelation).
  const conv = exponentialConvergence(sigma, d.weight, d.windows?.correlationWindows ?? 1);
  const n = d.realisations;
  // Beyond double precision once scaled back: keep the logarithm (the bootstrap itself ran on scaled values).
  if (!Number.isFinite(mean) || !Number.isFinite(ci[0]) || !Number.isFinite(ci[1])) return overflowingAverage(d, ctx, boot.estimate, boot.replicates, shift, conv);

  let status: Status;
  let summary: string;
  let reason: string | undefined;
  const estimateText = `⟨e^−Σ⟩ = ${fmt(mean)}, ${confidence * 100}% BCa interval ${fmtInterval(ci[0], ci[1])}`;
  if (n < MIN_REALISATIONS) {
    status = "inconclusive";
    summary = `Only ${n} realisations: too few to estimate ⟨e^−Σ⟩.`;
    reason = `At least ${MIN_REALISATIONS} realisations are needed; record more runs.`;
  } else if (pValue <= alpha && mean > 1) {
    // Undersampling biases a typical estimate downwards, never upwards: an excess is a violation at any sample size.
    status = "fail";
    summary = `${estimateText}: significantly above 1 (p = ${fmt(pValue, 3)} ≤ α = ${alpha}); the integral relation is violated.`;
  } else if (!conv.resolved) {
    status = "inconclusive";
    summary = `${estimateText}, but the sample cannot resolve the exponential average.`;
    reason = `${conv.reason}. More realisations, or a shorter contact (smaller ⟨Σ⟩), would settle it.`;
  } else if (pValue <= alpha) {
    status = "fail";
    summary = `${estimateText}: significantly below 1 (p = ${fmt(pValue, 3)} ≤ α = ${alpha}) although the sample resolves the average; the integral relation is violated.`;
  } else if (ci[0] >= 1 - margin && ci[1] <= 1 + margin) {
    status = "pass";
    summary = `${estimateText}, within 1 ± ${margin}; the sample resolves the average (⟨Σ⟩ = ${fmt(conv.meanSigma)} k_B < ${conv.inefficiency > 1 ? `ln(N/g) = ${fmt(conv.logN)}, with g = ${fmt(conv.inefficiency, 2)} windows per independent realisation` : `ln N = ${fmt(conv.logN)}`}).`;
  } else {
    status = "inconclusive";
    const half = (ci[1] - ci[0]) / 2;
    summary = `${estimateText}: consistent with 1 but not within 1 ± ${margin}.`;
    reason = resolveSentence(n, half, mean - 1, margin);
  }
  const z = normalQuantile(1 - (1 - confidence) / 2);
  return {
    check: "integral-fluctuation",
    dataset: d.id,
    status,
    summary,
    ...(reason ? { reason } : {}),
    values: {
      mean,
      ci,
      p_value: pValue,
      log_mean: log(boot.estimate) + shift,
      mean_sigma: conv.meanSigma,
      ln_N: conv.logN,
      ...(d.windows ? { windows_per_realisation: conv.inefficiency } : {}),
      mirror_realisations: conv.mirrorCount,
      effective_sample_size: conv.effectiveSampleSize,
      tail_shape: conv.tailShape,
      resolved: conv.resolved,
      resamples: boot.replicates.length,
      exactly_resampled_cells: boot.exactCells,
      realisations: n,
    },
    criteria: { alpha, margin, confidence },
    assumptions: countingAssumptions(d, [
      "Both reservoirs start in independent grand-canonical states at the declared temperatures and chemical potentials.",
      "Energies and particle numbers are two-point measurements of the isolated reservoirs.",
      "Realisations are independent and identically prepared.",
      "The integral relation holds with or without a magnetic field: it needs the forward process only.",
      d.config.work === "zero" ? "The switching work is declared zero (W = 0 in every realisation)." : "The switching work W is measured and enters Σ.",
    ]),
    ...countingSources(d, EQUATIONS, REFERENCES),
    tables: [],
    plots: [runningEstimatePlot(d, shift, z, confidence, ctx.rngFor(d.sha256, "running-order"), mean)],
  };
}

/**
 * ⟨e^−Σ⟩ beyond the range of double precision (some −Σ > ~709 k_B, e.g. an
 * energy unit declared a thousand times too large): the average and its
 * bootstrap replicates are kept as logarithms, ln⟨e^−Σ⟩ = ln⟨e^{−Σ−s}⟩ + s
 * (the log-sum-exp shift s; Press et al., Numerical Recipes, 3rd ed., §16.1).
 * An average that every resample puts above 1 is a violation at any sample
 * size, as in the finite case (undersampling biases the estimate downwards);
 * its p-value is bounded by the resolution 1/(B+1) of B resamples.
 */
function overflowingAverage(
  d: SamplesDataset,
  ctx: CheckContext,
  estimate: number,
  replicates: ArrayLike<number>,
  shift: number,
  conv: ReturnType<typeof exponentialConvergence>,
): CheckResult {
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0);
  const logMean = log(estimate) + shift;
  let lowest = Infinity;
  for (let i = 0; i < replicates.length; i++) lowest = Math.min(lowest, log(replicates[i]) + shift);
  const pFloor = 1 / (replicates.length + 1);
  const n = d.realisations;
  const decimal = `≈ 10^${fmt(logMean / Math.LN10)}`;
  let status: Status;
  let summary: string;
  let reason: string | undefined;
  if (n < MIN_REALISATIONS) {
    status = "inconclusive";
    summary = `Only ${n} realisations: too few to estimate ⟨e^−Σ⟩.`;
    reason = `At least ${MIN_REALISATIONS} realisations are needed; record more runs.`;
  } else if (lowest > 0 && pFloor <= alpha) {
    status = "fail";
    summary = `ln⟨e^−Σ⟩ = ${fmt(logMean)} (⟨e^−Σ⟩ ${decimal}, beyond double precision; computed in log space), above 0 in every one of ${replicates.length} bootstrap resamples (p ≤ ${fmt(pFloor, 3)} ≤ α = ${alpha}): the integral relation is violated, or the declared affinities or energy unit do not describe the data.`;
  } else {
    status = "inconclusive";
    summary = `ln⟨e^−Σ⟩ = ${fmt(logMean)} (⟨e^−Σ⟩ ${decimal}, beyond double precision; computed in log space), but the bootstrap cannot tell it from 0.`;
    reason = `${conv.reason ?? "The exponential average is dominated by a few realisations"}. Check the energy unit and the declared reservoirs; more realisations would settle it.`;
  }
  return {
    check: "integral-fluctuation",
    dataset: d.id,
    status,
    summary,
    ...(reason ? { reason } : {}),
    values: {
      mean: null,
      ci: [null, null],
      p_value: status === "fail" ? pFloor : null,
      log_mean: logMean,
      log_min_resample: lowest,
      mean_sigma: conv.meanSigma,
      ln_N: conv.logN,
      ...(d.windows ? { windows_per_realisation: conv.inefficiency } : {}),
      mirror_realisations: conv.mirrorCount,
      resolved: conv.resolved,
      resamples: replicates.length,
      realisations: n,
    },
    criteria: { alpha, margin, confidence },
    assumptions: countingAssumptions(d, [
      "Both reservoirs start in independent grand-canonical states at the declared temperatures and chemical potentials.",
      "Realisations are independent and identically prepared.",
      d.config.work === "zero" ? "The switching work is declared zero (W = 0 in every realisation)." : "The switching work W is measured and enters Σ.",
    ]),
    ...countingSources(d, EQUATIONS, REFERENCES),
    tables: [],
    plots: [],
  };
}

export const integralFluctuation: CheckDefinition = {
  id: "integral-fluctuation",
  title: "Integral fluctuation relation ⟨e^−Σ⟩ = 1",
  verdictBearing: true,
  run: perDataset("samples", integralFluctuationForDataset),
};
