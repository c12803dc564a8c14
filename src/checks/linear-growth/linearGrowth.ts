import type { IngestedAudit, SamplesDataset } from "../../ingest/types.ts";
import { datasetsOfKind, fmt, fmtInterval, notApplicableResult, numberOption } from "../helpers.ts";
import { ROW_UNIT, type CheckContext, type CheckDefinition, type CheckResult, type Status, type TableSpec } from "../types.ts";
import type { PlotSpec, Series } from "../plotSpec.ts";
import { texValue } from "../fluctuation-dissipation/presentation.ts";
import { seriesFromCumulants, seriesFromSamples, type GrowthSeries, type SeriesOrProblem } from "./series.ts";
import { analyseChannel, type ChannelGrowth, type GrowthOptions } from "./growthWindow.ts";
import { marginOption, countOption, openUnitOption } from "../options.ts";

const REFERENCES = [
  "D. J. Hudson, J. Am. Stat. Assoc. 61, 1097 (1966)",
  "T. Gasser, L. Sroka and C. Jennen-Steinmetz, Biometrika 73, 625 (1986)",
  "R. L. Berger, Technometrics 24, 295 (1982)",
  "D. J. Schuirmann, J. Pharmacokinet. Biopharm. 15, 657 (1987)",
  "M. Esposito, U. Harbola and S. Mukamel, Rev. Mod. Phys. 81, 1665 (2009)",
];

/** Default fewest contact times in a linear window: five leave three degrees of freedom for the residual test (common practice). */
export const DEFAULT_MIN_POINTS = 5;
/** Default noise floor for curves without uncertainties, relative to the largest |transfer|. */
export const DEFAULT_RELATIVE_TOLERANCE = 1e-3;

const NAME = { Q: "heat", dN: "particle" } as const;
const SYMBOL = { Q: "J_Q", dN: "J_N" } as const;

/** A readable time unit for plots and sentences. */
function timeUnit(tMax: number): { name: string; seconds: number } {
  const units: [string, number][] = [["s", 1], ["ms", 1e-3], ["µs", 1e-6], ["ns", 1e-9], ["ps", 1e-12], ["fs", 1e-15]];
  for (const [name, seconds] of units) if (tMax >= seconds) return { name, seconds };
  return { name: "fs", seconds: 1e-15 };
}

function channelSentence(g: ChannelGrowth, margin: number, confidence: number, minPoints: number): string {
  const c = g.curve.channel;
  const fluxUnit = c === "Q" ? "W" : "1/s";
  const w = g.search?.window;
  if (g.verdict === "unresolved" && !w) {
    return `${NAME[c]} transfer: no run of ${minPoints} or more contact times passes the linearity tests, though not every short run is rejected`;
  }
  switch (g.verdict) {
    case "too-few":
      return `${NAME[c]} transfer: only ${g.curve.t.length} contact times, fewer than the ${minPoints} a linear window needs`;
    case "nowhere-linear":
      return `${NAME[c]} transfer: every run of ${minPoints} consecutive contact times curves significantly, so the data contain no linear regime and no stationary ${NAME[c]} flux`;
    case "unresolved":
    case "no-growth":
    case "linear": {
      const t = g.curve.t;
      const base = `${NAME[c]} transfer grows linearly from τ = ${fmt(t[w!.start])} s to ${fmt(t[w!.end])} s (${w!.end - w!.start + 1} contact times) with ${SYMBOL[c]} = ${fmt(g.flux!)} ± ${fmt(g.fluxSe!, 2)} ${fluxUnit} (${fmt(confidence * 100, 3)} % interval ${fmtInterval(g.fluxCi![0], g.fluxCi![1])})`;
      if (g.verdict === "no-growth") return `${base}, not significantly different from zero`;
      if (g.verdict === "unresolved") return `${base}, but its slope change across the window is not yet bounded within ${fmt(margin * 100, 3)} %`;
      return `${base}; the slope changes by less than ${fmt(margin * 100, 3)} % across the window`;
    }
  }
}

function flagsSentence(g: ChannelGrowth): string[] {
  const out: string[] = [];
  const w = g.search?.window;
  if (!w) return out;
  if (w.onset) out.push(`a transient precedes the window (onset at τ ≈ ${fmt(w.onset.time)} s, between the samples at ${fmt(w.onset.bracket[0])} s and ${fmt(w.onset.bracket[1])} s)`);
  if (w.finish && g.finiteSize) out.push(`${g.finiteSize.description}, from τ ≈ ${fmt(w.finish.time)} s`);
  if (!w.finish) out.push("the window reaches the longest contact time sampled, so where finite-size effects set in is not yet seen");
  return out;
}

function channelValues(g: ChannelGrowth) {
  const w = g.search?.window ?? null;
  const t = g.curve.t;
  return {
    verdict: g.verdict,
    flux: g.flux,
    flux_se: g.fluxSe,
    flux_ci: g.fluxCi,
    window: w ? { from: t[w.start], to: t[w.end], points: w.end - w.start + 1, start_index: w.start, end_index: w.end } : null,
    onset: w?.onset ? { time: w.onset.time, bracket: w.onset.bracket, points_before: w.onset.points } : null,
    end: w?.finish ? { time: w.finish.time, bracket: w.finish.bracket, points_after: w.finish.points, slope_after: w.finish.slopeOutside } : null,
    residual: w ? { chi_square: w.fit.chiSquare, dof: w.fit.dof, p_value: w.fit.pValue } : null,
    slope_change: g.slopeChange ? { estimate: g.slopeChange.estimate, se: g.slopeChange.se, interval: g.slopeChange.interval, equivalent: g.slopeChange.equivalent } : null,
    growth_p: g.growthP,
    transient: g.transient,
    finite_size: g.finiteSize,
    noise: g.search ? g.search.noise : null,
    noise_scale: g.search && g.search.noise === "estimated" ? g.search.sigma[0] : null,
    contact_times: t.length,
    runs_of_min_points: g.search ? { total: g.search.minimalRuns, rejected: g.search.minimalRunsRejected } : null,
  };
}

function growthPlot(g: ChannelGrowth, series: GrowthSeries): PlotSpec {
  const c = g.curve.channel;
  const tMax = Math.max(...g.curve.t);
  const tu = timeUnit(tMax);
  const yf = c === "Q" ? 1 / series.energyUnit.joules : 1;
  const yUnit = c === "Q" ? series.energyUnit.name : undefined;
  const w = g.search?.window ?? null;
  const x = g.curve.t.map((t) => t / tu.seconds);
  const s: Series[] = [];
  if (w) s.push({ type: "span", name: "linear window", from: g.curve.t[w.start] / tu.seconds, to: g.curve.t[w.end] / tu.seconds });
  s.push({ type: "points", name: `mean ${c === "Q" ? "energy" : "particle"} transfer`, x, y: g.curve.y.map((y) => y * yf), ...(g.curve.u ? { yErr: g.curve.u.map((u) => u * yf) } : {}) });
  if (w) {
    const ends = [g.curve.t[0], tMax];
    s.push({ type: "line", name: "line fitted in the window (extended dashed)", x: ends.map((t) => t / tu.seconds), y: ends.map((t) => w.fit.at(t) * yf), style: "dashed" });
    const inside = [g.curve.t[w.start], g.curve.t[w.end]];
    s.push({ type: "line", name: `fitted line, slope ${SYMBOL[c]}`, x: inside.map((t) => t / tu.seconds), y: inside.map((t) => w.fit.at(t) * yf) });
    if (w.onset) s.push({ type: "rule", name: "onset (change point)", axis: "x", value: w.onset.time / tu.seconds, style: "dotted" });
    if (w.finish) s.push({ type: "rule", name: "end (change point)", axis: "x", value: w.finish.time / tu.seconds, style: "dotted" });
  }
  return {
    id: `growth-${c}`,
    title: `Mean ${NAME[c]} transfer against contact time`,
    alt: `Mean ${c === "Q" ? "energy carried from A to B" : "number of particles gained by B"} at ${x.length} contact times from ${fmt(x[0])} to ${fmt(x[x.length - 1])} ${tu.name}.${
      w
        ? ` The shaded span from ${fmt(x[w.start])} to ${fmt(x[w.end])} ${tu.name} is the linear window; the solid line is fitted there, its slope the flux ${fmt(g.flux!)} ${c === "Q" ? "W" : "1/s"}, and the dashed extension shows where the data leave it.`
        : " No linear window was found."
    }`,
    x: { label: "Contact time τ", unit: tu.name },
    y: { label: c === "Q" ? "Mean energy transfer ⟨Q⟩" : "Mean particle transfer ⟨ΔN⟩", ...(yUnit ? { unit: yUnit } : {}) },
    series: s,
  };
}

function seriesResult(series: GrowthSeries, ctx: CheckContext): CheckResult {
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0);
  const minPoints = Math.round(numberOption(ctx, "min_points", DEFAULT_MIN_POINTS, (v) => Number.isInteger(v) && v >= 3));
  const relativeFloor = numberOption(ctx, "relative_tolerance", DEFAULT_RELATIVE_TOLERANCE, (v) => v > 0 && v < 1);
  const options: GrowthOptions = { minPoints, alpha, confidence, margin, relativeFloor };
  const channels = series.curves.map((c) => analyseChannel(c, options));
  const verdicts = channels.map((g) => g.verdict);
  let status: Status;
  if (verdicts.includes("nowhere-linear")) status = "fail";
  else if (verdicts.includes("linear") && verdicts.every((v) => v === "linear" || v === "no-growth")) status = "pass";
  else status = "inconclusive";

  const sentences = channels.map((g) => {
    const flags = flagsSentence(g);
    return `${channelSentence(g, margin, confidence, minPoints)}${flags.length ? `; ${flags.join("; ")}` : ""}`;
  });
  const lead =
    status === "pass"
      ? `A stationary flux exists in series "${series.name}"`
      : status === "fail"
        ? `Series "${series.name}" shows no stationary flux`
        : `Series "${series.name}" does not yet establish a stationary flux`;
  const summary = `${lead}: ${sentences.join(". ")}.`;

  let reason: string | undefined;
  if (status === "inconclusive") {
    const needs: string[] = [];
    for (const g of channels) {
      if (g.verdict === "too-few") needs.push(`sample at least ${minPoints} contact times (${g.curve.t.length} now)`);
      if (g.verdict === "unresolved" && !g.search?.window) needs.push("sample contact times more densely, so that a run of linear growth holds enough points");
      if (g.verdict === "unresolved" && g.search?.window)
        needs.push(`more realisations per contact time or denser sampling inside the window would bound the ${NAME[g.curve.channel]} slope change within ${fmt(margin * 100, 3)} %`);
    }
    if (verdicts.every((v) => v === "no-growth")) needs.push("no channel grows measurably: apply a larger affinity or record more realisations per contact time");
    reason = `${[...new Set(needs)].join("; ")}.`.replace(/^./, (m) => m.toUpperCase());
  }

  const values: Record<string, unknown> = {
    series: series.name,
    source: series.source,
    datasets: series.datasets,
    min_points: minPoints,
    flux: Object.fromEntries(channels.map((g) => [g.curve.channel, g.flux])),
    flux_ci: Object.fromEntries(channels.map((g) => [g.curve.channel, g.fluxCi])),
    channels: Object.fromEntries(channels.map((g) => [g.curve.channel, channelValues(g)])),
  };
  if (series.source === "cumulants" && channels.some((g) => g.search?.noise === "estimated")) {
    values.relative_tolerance = relativeFloor;
  }

  const equations: string[] = [String.raw`\langle x\rangle(\tau) = c + J\,\tau \quad \text{for } \tau_{\mathrm{on}} \le \tau \le \tau_{\mathrm{end}}, \qquad J = \lim \frac{d\langle x\rangle}{d\tau}\ \text{(stationary flux)}`];
  for (const g of channels) {
    const w = g.search?.window;
    if (!w || g.flux === null) continue;
    const unit = g.curve.channel === "Q" ? String.raw`\mathrm{W}` : String.raw`\mathrm{s^{-1}}`;
    equations.push(
      String.raw`${g.curve.channel === "Q" ? "J_Q" : "J_N"} = ${texValue(g.flux, g.fluxSe!)}\ ${unit}, \qquad \tau \in [${texValue(g.curve.t[w.start], 0)},\ ${texValue(g.curve.t[w.end], 0)}]\ \mathrm{s}`,
    );
  }

  const tables: TableSpec[] = [
    {
      id: "window",
      title: "Linear window and flux per channel",
      columns: [
        { key: "channel", label: "Channel" },
        { key: "verdict", label: "Finding" },
        { key: "from", label: "Window from", unit: "s" },
        { key: "to", label: "Window to", unit: "s" },
        { key: "points", label: "Points" },
        { key: "flux", label: "Flux", unit: ROW_UNIT },
        { key: "se", label: "Standard error", unit: ROW_UNIT },
        { key: "unit", label: "Unit" },
        { key: "p", label: "Residual p" },
        { key: "flags", label: "Flags" },
      ],
      rows: channels.map((g) => {
        const w = g.search?.window;
        return {
          channel: NAME[g.curve.channel],
          verdict: g.verdict,
          from: w ? g.curve.t[w.start] : null,
          to: w ? g.curve.t[w.end] : null,
          points: w ? w.end - w.start + 1 : null,
          flux: g.flux,
          se: g.fluxSe,
          unit: g.curve.channel === "Q" ? "W" : "1/s",
          p: w ? w.fit.pValue : null,
          flags: [g.transient ? "transient" : "", g.finiteSize ? g.finiteSize.kind : ""].filter(Boolean).join(", ") || "—",
        };
      }),
    },
  ];

  const assumptions = [
    "The contact times are separate runs of the same protocol from the same initial state; only the contact time differs.",
    series.source === "samples"
      ? "Each mean transfer's uncertainty is its standard error from independent realisations."
      : channels.some((g) => g.search?.noise === "estimated")
        ? `The table gives no uncertainties: the noise is estimated from the curve itself (pseudo-residuals), floored at ${fmt(relativeFloor)} of the largest transfer, so a noise-free curve counts as linear to that relative tolerance.`
        : "The table's uncertainties are standard uncertainties of the mean transfers, independent between contact times.",
    "A stationary flux is the slope of the linear regime; its existence is read from the data, not assumed.",
  ];

  return {
    check: "linear-growth",
    dataset: series.name,
    status,
    summary,
    ...(reason ? { reason } : {}),
    values,
    criteria: { alpha, margin, confidence },
    assumptions,
    references: REFERENCES,
    equations,
    tables,
    plots: channels.map((g) => growthPlot(g, series)),
  };
}

function notApplicable(p: Extract<SeriesOrProblem, { problem: string }>): CheckResult {
  return notApplicableResult({ check: "linear-growth", dataset: p.name, reason: `${p.problem}.`, values: { datasets: p.datasets }, references: REFERENCES });
}

/** One result per series: samples datasets sharing `series:`, and each cumulants table. */
export function runLinearGrowth(audit: IngestedAudit, ctx: CheckContext): CheckResult[] {
  const groups = new Map<string, SamplesDataset[]>();
  for (const d of datasetsOfKind(audit, "samples")) {
    const name = d.config.series;
    if (name === undefined) continue;
    groups.set(name, [...(groups.get(name) ?? []), d]);
  }
  const prepared: SeriesOrProblem[] = [...groups].map(([name, ds]) => seriesFromSamples(name, ds));
  prepared.push(...datasetsOfKind(audit, "cumulants").map(seriesFromCumulants));
  return prepared.map((p) => ("series" in p ? seriesResult(p.series, ctx) : notApplicable(p)));
}

export const linearGrowth: CheckDefinition = {
  id: "linear-growth",
  title: "Linear growth of the mean transfer: the window of a stationary flux",
  verdictBearing: true,
  options: { margin: marginOption, min_points: countOption(3), relative_tolerance: openUnitOption },
  run: runLinearGrowth,
};
