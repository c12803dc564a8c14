import type { IngestedAudit, SamplesDataset } from "../../ingest/types.ts";
import { fitExchangeLogistic } from "../../stats/logisticFit.ts";
import { weightedLeastSquares, type WlsObservation } from "../../stats/weightedLeastSquares.ts";
import { normalQuantile, normalTwoSidedP } from "../../stats/normal.ts";
import { chiSquareSf } from "../../stats/chiSquare.ts";
import { datasetsOfKind, fmt, fmtInterval, notApplicableResult, numberOption } from "../helpers.ts";
import { withCountingCovariance } from "../countingCovariance.ts";
import { CARLSTEIN_1986, countingAssumptions, KUNSCH_1989 } from "../resamplingUnits.ts";
import type { CheckContext, CheckDefinition, CheckResult, Status, TableSpec } from "../types.ts";
import type { PlotSpec } from "../plotSpec.ts";
import { effectiveLead, perElectron, type PerElectron } from "./perElectron.ts";
import { jointBootstrap, type JointBootstrap } from "./jointBootstrap.ts";

/**
 * The long-time (Gallavotti–Cohen) symmetry of counted transfers: the scaled
 * cumulant generating function of the net count obeys K(λ) = K(A − λ)
 * (Lebowitz & Spohn, J. Stat. Phys. 95, 333 (1999)), so that
 * ln P(n, τ)/P(−n, τ) = A(τ) n with A(τ) → A, the affinity per electron,
 * approached roughly as 1/τ (the boundary term of the conductor's states is
 * bounded while the count grows). Experiments report exactly this, and an
 * effective affinity when a detector drives the conductor (Utsumi et al.,
 * PRB 81, 125331 (2010); Küng et al., PRX 2, 011001 (2012)).
 *
 * Per window length τ: A(τ) by maximum likelihood without bins (the logistic
 * form conditioned on the pair {n, −n}: Shirts et al., PRL 91, 140601 (2003)),
 * with a sandwich covariance over blocks for windows cut from one trace. Then
 * a generalised least-squares fit A(τ) = A_∞ + b/τ over the series: slopes of
 * windows cut from one trace at several τ are correlated (the windows overlap
 * in time), and their joint covariance comes from a block bootstrap of the
 * trace's time axis shared by every τ (jointBootstrap.ts); slopes from separate
 * datasets are independent, each with its own variance.
 */
const REFERENCES = [
  "J. L. Lebowitz and H. Spohn, J. Stat. Phys. 95, 333 (1999)",
  "D. A. Bagrets and Yu. V. Nazarov, Phys. Rev. B 67, 085316 (2003)",
  "M. Esposito, U. Harbola and S. Mukamel, Rev. Mod. Phys. 81, 1665 (2009)",
  "Y. Utsumi, D. S. Golubev, M. Marthaler, K. Saito, T. Fujisawa and G. Schön, Phys. Rev. B 81, 125331 (2010)",
  "B. Küng, C. Rössler, M. Beck, M. Marthaler, D. S. Golubev, Y. Utsumi, T. Ihn and K. Ensslin, Phys. Rev. X 2, 011001 (2012)",
  "M. R. Shirts, E. Bair, G. Hooker and V. S. Pande, Phys. Rev. Lett. 91, 140601 (2003)",
  "D. Schuirmann, J. Pharmacokinet. Biopharm. 15, 657 (1987)",
];

const BOOTSTRAP_REFERENCES = [
  CARLSTEIN_1986,
  KUNSCH_1989,
  "S. N. Lahiri, Resampling Methods for Dependent Data (Springer, 2003)",
  "A. C. Aitken, Proc. R. Soc. Edinb. 55, 42 (1935)",
];

const EQUATIONS = [
  String.raw`K(\lambda) = \lim_{\tau\to\infty} \frac{1}{\tau} \ln \left\langle e^{-\lambda n} \right\rangle, \qquad K(\lambda) = K(A - \lambda)`,
  String.raw`\ln \frac{P(n,\tau)}{P(-n,\tau)} = A(\tau)\, n, \qquad A(\tau) = A_\infty + \frac{b}{\tau}`,
  String.raw`u(A_\infty)^2 = u_{\text{stat}}^2 + \bigl(A_\infty - A_\infty^{(1/\sqrt{\tau})}\bigr)^2`,
  String.raw`A = \beta_B(\varepsilon_B - \mu_B) - \beta_A(\varepsilon_A - \mu_A)`,
];

/** Fewer windows with n ≠ 0 of the rarer sign than this cannot pin A(τ). */
const MIN_AGAINST = 10;

interface WindowSlope {
  dataset: string;
  source: SamplesDataset;
  tau: number;
  windows: number;
  against: number;
  slope: number;
  se: number;
}

/** The count: particles gained by lead B (per-lead columns), or the dataset's ΔN. */
function countOf(d: SamplesDataset): Float64Array {
  return d.leadParticles ? d.leadParticles.B : d.dN;
}

function slopeAt(d: SamplesDataset): WindowSlope | string {
  const n = countOf(d);
  let pos = 0;
  let neg = 0;
  for (let i = 0; i < n.length; i++) {
    const w = d.weight ? d.weight[i] : 1;
    if (n[i] > 0) pos += w;
    else if (n[i] < 0) neg += w;
  }
  const against = Math.min(pos, neg);
  if (against < MIN_AGAINST) return `${d.id} (τ = ${fmt(d.tau!)} s) has ${fmt(against)} windows against the mean current; at least ${MIN_AGAINST} are needed`;
  // Block structure of trace windows enters the covariance; the states do not (this relation uses n alone).
  const fit = withCountingCovariance({ ...d, states: null }, fitExchangeLogistic([n], d.weight), [n], "offset");
  if (fit.status !== "converged") return `${d.id}: ${fit.message ?? "the fit of ln P(n)/P(−n) failed"}`;
  return { dataset: d.id, source: d, tau: d.tau!, windows: d.realisations, against, slope: fit.coefficients[0], se: fit.standardErrors[0] };
}

function groups(audit: IngestedAudit): Map<string, SamplesDataset[]> {
  const out = new Map<string, SamplesDataset[]>();
  for (const d of datasetsOfKind(audit, "samples")) {
    const name = d.config.series;
    if (!name) continue;
    out.set(name, [...(out.get(name) ?? []), d]);
  }
  return out;
}

function base(series: string, d: SamplesDataset, traced = false): Pick<CheckResult, "check" | "dataset" | "references" | "equations" | "assumptions"> {
  return {
    check: "steady-state-counting",
    dataset: series,
    references: traced ? [...REFERENCES, ...BOOTSTRAP_REFERENCES] : REFERENCES,
    equations: EQUATIONS,
    assumptions: countingAssumptions({ ...d, states: null }, [
      "Windows are cut from a stationary trajectory of a Markovian conductor whose rates obey local detailed balance with the leads.",
      "The count n is the net number of particles entering lead B in a window.",
      "The finite-τ slope approaches its limit as 1/τ over the window lengths used (A(τ) = A_∞ + b/τ); a significant lack of fit makes the extrapolation inconclusive, and the difference from an extrapolation in 1/√τ is added to the uncertainty of A_∞ as a systematic error of the extrapolation.",
      traced
        ? "Slopes at window lengths cut from one trace are correlated (the windows overlap in time): their joint covariance comes from a block bootstrap of the trace's time axis shared by every window length, and the extrapolation is a generalised least-squares fit with it; slopes from separate datasets are independent."
        : "Slopes at different window lengths come from separate datasets and are independent.",
      "One hypothesis is tested, A_∞ equal to the declared affinity per electron; the finite-τ slopes are not tested one by one (each carries the bias b/τ by construction), so no correction for multiplicity is needed.",
    ]),
  };
}

export function steadyStateCountingForSeries(series: string, datasets: SamplesDataset[], ctx: CheckContext): CheckResult {
  const first = datasets[0];
  const noTau = datasets.filter((d) => d.tau === null).map((d) => d.id);
  if (noTau.length) return notApplicableResult({ ...base(series, first), reason: `${noTau.join(", ")} declare${noTau.length > 1 ? "" : "s"} no window length tau; the long-time check needs one per dataset.` });
  const counted = datasets.filter((d) => d.hasParticleColumn);
  if (counted.length === 0) return notApplicableResult({ ...base(series, first), reason: "no dataset of the series counts particles (map dN, or dN_A and dN_B)." });
  const electron = perElectron(first);
  if (electron.affinity === null) return notApplicableResult({ ...base(series, first), reason: `${electron.problem}; the declared affinity per electron cannot be formed.` });
  const declared = electron.affinity;
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0);
  const z = normalQuantile(1 - (1 - confidence) / 2);
  const sorted = [...counted].sort((a, b) => a.tau! - b.tau!);
  const slopes: WindowSlope[] = [];
  const problems: string[] = [];
  for (const d of sorted) {
    const s = slopeAt(d);
    if (typeof s === "string") problems.push(s);
    else slopes.push(s);
  }
  // Slopes of windows cut from one trace at several τ: their joint covariance from the shared time axis.
  const sources = slopeSources(slopes);
  const bootstraps = sources.map((group, k) =>
    group.length > 1
      ? jointBootstrap(
          group.map((s) => s.source),
          group.map((s) => countOf(s.source)),
          ctx.settings.resamples,
          ctx.rngFor(group[0].source.sha256, `joint-bootstrap-${series}-${k}`),
        )
      : null,
  );
  sources.forEach((group, k) => {
    const boot = bootstraps[k];
    if (boot) group.forEach((s, j) => (s.se = Math.sqrt(boot.covariance[j][j])));
  });
  const traced = bootstraps.some((boot) => boot !== null);
  const table: TableSpec = {
    id: "slopes",
    title: "Slope of ln P(n)/P(−n) at each window length",
    columns: [
      { key: "dataset", label: "Dataset" },
      { key: "tau", label: "Window τ", unit: "s" },
      { key: "windows", label: "Windows" },
      { key: "against", label: "Windows against the current" },
      { key: "slope", label: "A(τ)" },
      { key: "se", label: "Standard error" },
    ],
    rows: slopes.map((s) => ({ dataset: s.dataset, tau: s.tau, windows: s.windows, against: s.against, slope: s.slope, se: s.se })),
  };
  const distinct = new Set(slopes.map((s) => s.tau)).size;
  if (distinct < 2) {
    const reason = `${problems.length ? `${problems.join("; ")}. ` : ""}The extrapolation A(τ) = A_∞ + b/τ needs slopes at two or more window lengths; ${slopes.length} usable. Cut the trace at further window lengths (longer ones approach the limit).`;
    return { ...base(series, first, traced), status: "inconclusive", summary: `Only ${slopes.length} usable window length${slopes.length === 1 ? "" : "s"}: the long-time slope cannot be extrapolated.`, reason, values: { declared_affinity: declared, slopes: table.rows }, criteria: { alpha, margin, confidence }, tables: [table], plots: [] };
  }
  const bootText = bootstrapText(bootstraps, sources);
  const starved = bootstraps.find((boot) => boot !== null && boot.used < boot.requested / 2);
  if (starved) {
    const reason = `${problems.length ? `${problems.join("; ")}. ` : ""}Record a longer trace (more blocks of time), or drop the shortest window lengths.`;
    return { ...base(series, first, traced), status: "inconclusive", summary: `The joint block bootstrap of the window lengths could fit every slope in only ${starved.used} of ${starved.requested} resamples of ${starved.blocks} blocks of time: too few windows against the current to estimate the slopes' covariance.`, reason, values: { declared_affinity: declared, slopes: table.rows, joint_bootstrap: bootText.values }, criteria: { alpha, margin, confidence }, tables: [table], plots: [] };
  }
  const fit = extrapolate(sources, bootstraps, (tau) => 1 / tau);
  const Ainf = fit.coefficients[0];
  const b = fit.coefficients[1];
  // Before the asymptotic 1/τ regime the slope approaches its limit more slowly (the informative counts
  // n ~ √τ make a bounded boundary term look like 1/√τ). The spread between the two extrapolations is
  // carried as a systematic uncertainty of the extrapolation, so an unfinished approach cannot pass for a
  // violation; it shrinks as longer windows bring both to the limit.
  const alternative = extrapolate(sources, bootstraps, (tau) => 1 / Math.sqrt(tau));
  const systematic = Math.abs(alternative.coefficients[0] - Ainf);
  const statistical = fit.standardErrors[0];
  const se = Math.hypot(statistical, systematic);
  const ci: [number, number] = [Ainf - z * se, Ainf + z * se];
  const p = normalTwoSidedP((Ainf - declared) / se);
  const lackOfFit = fit.dof > 0 ? chiSquareSf(fit.chiSquare, fit.dof) : null;
  const ratioCi: [number, number] = declared !== 0 ? ([ci[0] / declared, ci[1] / declared].sort((x, y) => x - y) as [number, number]) : [Number.NaN, Number.NaN];
  const eff = effectiveLead(first, electron, Ainf);
  const effLo = effectiveLead(first, electron, ci[0]);
  const effHi = effectiveLead(first, electron, ci[1]);
  const interval = (a: number | null, c: number | null): [number, number] | null => (a !== null && c !== null ? [Math.min(a, c), Math.max(a, c)] : null);
  const effective = {
    affinity: Ainf,
    affinity_ci: ci,
    T_A: eff.T_A,
    T_A_ci: interval(effLo.T_A, effHi.T_A),
    T_B: eff.T_B,
    T_B_ci: interval(effLo.T_B, effHi.T_B),
    mu_A: eff.mu_A,
    mu_A_ci: interval(effLo.mu_A, effHi.mu_A),
    mu_B: eff.mu_B,
    mu_B_ci: interval(effLo.mu_B, effHi.mu_B),
  };
  const longest = slopes[slopes.length - 1];
  const estimate = `A_∞ = ${fmt(Ainf)}, ${confidence * 100}% interval ${fmtInterval(ci[0], ci[1])}${bootText.sentence}, against the declared affinity per electron ${fmt(declared)}`;
  const effText = effectiveText(first, electron, effective);
  let status: Status;
  let summary: string;
  let reason: string | undefined;
  if (lackOfFit !== null && lackOfFit <= alpha) {
    status = "inconclusive";
    summary = `${estimate}, but A(τ) does not follow A_∞ + b/τ over these window lengths (χ² = ${fmt(fit.chiSquare)}, ${fit.dof} degrees of freedom, p = ${fmt(lackOfFit, 3)}).`;
    reason = `The shortest windows are still far from the limit; drop them, or add windows longer than ${fmt(2 * longest.tau)} s.`;
  } else if (p <= alpha) {
    status = "fail";
    summary = `${estimate}: significantly different (p = ${fmt(p, 3)} ≤ α = ${alpha}); the counting statistics obey the long-time symmetry with an effective affinity, not the declared one.${effText}`;
  } else if (declared !== 0 && ratioCi[0] >= 1 - margin && ratioCi[1] <= 1 + margin) {
    status = "pass";
    summary = `${estimate}: A_∞/A within 1 ± ${margin} (${fmtInterval(ratioCi[0], ratioCi[1])}).`;
  } else {
    status = "inconclusive";
    summary = `${estimate}: no significant difference, but the interval is not within ${margin * 100} % of the declared value.`;
    const allowed = Math.abs(declared) * margin - Math.abs(Ainf - declared);
    const windows = slopes.reduce((acc, s) => acc + s.windows, 0);
    const factor = allowed > 0 ? ((z * se) / allowed) ** 2 : Number.POSITIVE_INFINITY;
    reason =
      allowed > 0 && Number.isFinite(factor)
        ? `About ${Math.ceil(factor * windows).toLocaleString("en")} windows in all (now ${windows.toLocaleString("en")}) would resolve the margin at this spread; windows longer than ${fmt(2 * longest.tau)} s shorten the extrapolation.`
        : `The estimate sits at the edge of the margin; windows longer than ${fmt(2 * longest.tau)} s and more of them would settle it.`;
  }
  if (problems.length) reason = `${reason ? `${reason} ` : ""}Left out: ${problems.join("; ")}.`;
  return {
    ...base(series, first, traced),
    status,
    summary,
    ...(reason ? { reason } : {}),
    values: {
      declared_affinity: declared,
      affinity_infinite: Ainf,
      standard_error: se,
      statistical_error: statistical,
      extrapolation_error: systematic,
      affinity_infinite_inverse_sqrt: alternative.coefficients[0],
      ci,
      p_value: p,
      ratio_ci: ratioCi,
      b,
      b_standard_error: fit.standardErrors[1],
      chi_square: fit.chiSquare,
      dof: fit.dof,
      lack_of_fit_p: lackOfFit,
      energy_per_electron: { A: electron.energyA, B: electron.energyB },
      effective,
      slopes: table.rows,
      ...(traced ? { joint_bootstrap: bootText.values, slope_covariance: slopeCovariance(sources, bootstraps) } : {}),
    },
    criteria: { alpha, margin, confidence },
    tables: [table],
    plots: [slopePlot(slopes, Ainf, b, ci, declared, z)],
  };
}

/**
 * Slopes grouped by what they were cut from: windows of one trace file (same file and content digest) at
 * several τ form one group; every other slope is a group of its own. Groups are independent of each other.
 */
function slopeSources(slopes: WindowSlope[]): WindowSlope[][] {
  const out = new Map<string, WindowSlope[]>();
  slopes.forEach((s, k) => {
    const key = s.source.windows ? `trace|${s.source.file}|${s.source.sha256}` : `dataset|${k}`;
    out.set(key, [...(out.get(key) ?? []), s]);
  });
  return [...out.values()];
}

/**
 * A(τ) = A_∞ + b g(τ) by generalised least squares (Aitken, Proc. R. Soc. Edinb. 55, 42 (1935)): one
 * observation per group, its covariance the joint bootstrap's or the slope's own variance. With only
 * independent slopes this is the weighted fit with weights 1/se².
 */
function extrapolate(sources: WindowSlope[][], bootstraps: (JointBootstrap | null)[], g: (tau: number) => number) {
  const observations: WlsObservation[] = sources.map((group, k) => ({
    design: group.map((s) => [1, g(s.tau)]),
    y: group.map((s) => s.slope),
    covariance: bootstraps[k]?.covariance ?? [[group[0].se * group[0].se]],
  }));
  return weightedLeastSquares(observations);
}

/** The slopes' covariance in the order of the table (zero between independent groups). */
function slopeCovariance(sources: WindowSlope[][], bootstraps: (JointBootstrap | null)[]): number[][] {
  const order = sources.flat();
  const out = order.map(() => order.map(() => 0));
  sources.forEach((group, k) => {
    group.forEach((s, j) => {
      group.forEach((t, l) => {
        out[order.indexOf(s)][order.indexOf(t)] = bootstraps[k] ? bootstraps[k]!.covariance[j][l] : j === l ? s.se * s.se : 0;
      });
    });
  });
  return out;
}

/** How the slopes' covariance was found, for the summary and the values. */
function bootstrapText(bootstraps: (JointBootstrap | null)[], sources: WindowSlope[][]): { sentence: string; values: Record<string, unknown>[] } {
  const used = bootstraps.map((boot, k) => ({ boot, group: sources[k] })).filter((x) => x.boot !== null);
  if (used.length === 0) return { sentence: "", values: [] };
  const parts = used.map(({ boot, group }) => `${boot!.blocks} blocks of ${fmt(boot!.blockSeconds)} s of the trace resampled jointly for the ${group.length} window lengths, ${boot!.used} resamples`);
  return {
    sentence: ` (covariance of the slopes by a joint block bootstrap: ${parts.join("; ")})`,
    values: used.map(({ boot, group }) => ({
      datasets: group.map((s) => s.dataset),
      method: "non-overlapping blocks of the trace's time axis drawn with replacement once per resample, the windows of every length starting in the drawn blocks (Carlstein 1986; Künsch 1989)",
      block_seconds: boot!.blockSeconds,
      blocks: boot!.blocks,
      resamples: boot!.requested,
      resamples_used: boot!.used,
    })),
  };
}

function effectiveText(d: SamplesDataset, e: PerElectron, eff: Record<string, unknown>): string {
  const T = (key: string) => {
    const v = eff[key] as number | null;
    const c = eff[`${key}_ci`] as [number, number] | null;
    return v !== null ? `${fmt(v)} K${c ? ` ${fmtInterval(c[0], c[1])}` : ""}` : null;
  };
  const parts: string[] = [];
  const ta = T("T_A");
  const tb = T("T_B");
  if (ta) parts.push(`lead A at ${ta} (declared ${fmt(d.reservoirs.A.T)} K)`);
  if (tb) parts.push(`lead B at ${tb} (declared ${fmt(d.reservoirs.B.T)} K)`);
  const mu = eff.mu_A as number | null;
  if (mu !== null && e.energyA !== null) {
    const c = eff.mu_A_ci as [number, number] | null;
    const u = d.energyUnit;
    parts.push(`μ_A = ${fmt(mu / u.joules)} ${u.name}${c ? ` ${fmtInterval(c[0] / u.joules, c[1] / u.joules)}` : ""} (declared ${fmt(d.reservoirs.A.mu / u.joules)} ${u.name})`);
  }
  return parts.length ? ` One lead at a time, the data behave as if ${parts.join("; or ")} (back-action of a detector, or a wrong declaration).` : "";
}

function slopePlot(slopes: WindowSlope[], Ainf: number, b: number, ci: [number, number], declared: number, z: number): PlotSpec {
  const xs = slopes.map((s) => 1 / s.tau);
  const xMax = Math.max(...xs);
  const line = Array.from({ length: 21 }, (_, k) => (xMax * k) / 20);
  return {
    id: "slope-against-inverse-window",
    title: "Slope of ln P(n)/P(−n) against 1/τ",
    alt: `The fitted slope A(τ) of ln P(n)/P(−n) at ${slopes.length} window lengths, plotted against 1/τ with ${fmt(z, 3)}-standard-error bars, the weighted straight line A_∞ + b/τ through them and its intercept A_∞ = ${fmt(Ainf)} at 1/τ = 0 with its interval; the dashed line is the declared affinity per electron ${fmt(declared)}. An intercept away from the dashed line means the counts obey the symmetry with another affinity.`,
    x: { label: "Inverse window length 1/τ", unit: "1/s" },
    y: { label: "Slope A(τ)" },
    series: [
      { type: "points", name: "A(τ) per window length", x: xs, y: slopes.map((s) => s.slope), yErr: slopes.map((s) => z * s.se) },
      { type: "line", name: "A_∞ + b/τ", x: line, y: line.map((x) => Ainf + b * x) },
      { type: "points", name: "extrapolated A_∞", x: [0], y: [Ainf], yErrLow: [Ainf - ci[0]], yErrHigh: [ci[1] - Ainf] },
      { type: "rule", name: "declared affinity per electron", axis: "y", value: declared, style: "dashed" },
    ],
  };
}

export const steadyStateCounting: CheckDefinition = {
  id: "steady-state-counting",
  title: "Long-time symmetry of counted transfers",
  verdictBearing: true,
  // Series of samples datasets that count particles; other series (heat only) are not counting data.
  run: (audit, ctx) => [...groups(audit)].filter(([, ds]) => ds.some((d) => d.hasParticleColumn)).map(([name, ds]) => steadyStateCountingForSeries(name, ds, ctx)),
};
