/**
 * Figures of merit of a two-terminal thermoelectric (information, no verdict):
 * G, S, Π, K, the power factor G S², ZT = G S² T/K, the maximum efficiency and
 * the efficiency at maximum power relative to Carnot in linear response and,
 * with a magnetic field, the asymmetry parameters x = L12/L21 and
 * y = L12 L21/det L of Benenti, Saito & Casati, PRL 106, 230602 (2011), which
 * replace ZT there. Uncertainties by seeded Monte Carlo (JCGM 101:2008).
 */
import type { CoefficientsDataset } from "../../ingest/types.ts";
import {
  asymmetryX,
  asymmetryY,
  efficiencyAtMaxPowerOverCarnot,
  efficiencyAtMaxPowerOverCarnotXY,
  figureOfMeritZT,
  maxEfficiencyOverCarnot,
  maxEfficiencyOverCarnotXY,
  onsagerFromInputs,
  powerFactor,
  SIGN_CONVENTION,
  thermoelectricFromOnsager,
} from "../../physics/thermoelectric.ts";
import { propagateUncertainty } from "../../stats/monteCarlo.ts";
import { fmt, notApplicableResult, perDataset } from "../helpers.ts";
import type { CheckContext, CheckDefinition, CheckResult, TableSpec } from "../types.ts";
import type { PlotSpec, Series } from "../plotSpec.ts";
import { groupBy, pointLabel, sortedBy, sweepAxisLabel } from "../reciprocity/points.ts";
import { decidePositivity, evaluatePoints, type PointPositivity } from "../positivity/positivity.ts";

export const FIGURE_NAMES = ["G", "S", "Pi", "K", "power_factor", "ZT", "eta_max_rel", "eta_max_power_rel", "x", "y"] as const;
export type FigureName = (typeof FIGURE_NAMES)[number];

/**
 * All figures from Callen's matrix at T. With broken time reversal
 * (`field` true) the efficiencies use x and y; otherwise ZT.
 */
export function figuresFromOnsager(L: readonly (readonly number[])[], T: number, field: boolean): number[] {
  const c = thermoelectricFromOnsager(L, T);
  const zt = figureOfMeritZT(c, T);
  const x = asymmetryX(L);
  const y = asymmetryY(L);
  return [
    c.G,
    c.S,
    c.Pi,
    c.K,
    powerFactor(c),
    zt,
    field ? maxEfficiencyOverCarnotXY(x, y) : maxEfficiencyOverCarnot(zt),
    field ? efficiencyAtMaxPowerOverCarnotXY(x, y) : efficiencyAtMaxPowerOverCarnot(zt),
    x,
    y,
  ];
}

interface PointFigures {
  index: number;
  value: Record<FigureName, number>;
  u: Record<FigureName, number> | null;
  /** The second law at this row: "violated" (significant, Holm), "doubtful" (λ_min < 0, not significant), "ok". */
  secondLaw: "violated" | "doubtful" | "ok";
  /** Why the efficiency figures are withheld or doubtful, for a person. */
  note: string | null;
}

/** Figures that presume a positive semi-definite symmetric part (an engine obeying the second law). */
const ENGINE_FIGURES: readonly FigureName[] = ["ZT", "eta_max_rel", "eta_max_power_rel", "y"];

/**
 * Positivity at each row, by the test of the positivity check (smallest eigenvalue of the normalised
 * symmetric part, Holm over rows; physics.md §4): where the second law is significantly violated, ZT and
 * the efficiencies describe no possible device and are withheld.
 */
function secondLawAtRows(d: CoefficientsDataset, ctx: CheckContext): PointPositivity[] {
  const pts = evaluatePoints(d, ctx.rngFor(d.sha256, "positivity"), ctx.settings.resamples, ctx.settings.confidence);
  decidePositivity(d, pts, ctx.settings.alpha, ctx.settings.confidence);
  return pts;
}

function evaluate(d: CoefficientsDataset, ctx: CheckContext): PointFigures[] {
  const rng = ctx.rngFor(d.sha256, "figures-of-merit");
  const law = secondLawAtRows(d, ctx);
  return d.points.map((p, index) => {
    const field = p.B !== null && p.B !== 0;
    const f = (x: readonly number[]) => figuresFromOnsager(onsagerFromInputs(d.form, x, p.T, d.n), p.T, field);
    const est = f(p.inputs.values);
    const value = Object.fromEntries(FIGURE_NAMES.map((n, k) => [n, est[k]])) as Record<FigureName, number>;
    let u: Record<FigureName, number> | null = null;
    if (p.inputs.u) {
      const mc = propagateUncertainty(f, p.inputs.values, p.inputs.u, rng, ctx.settings.resamples);
      u = Object.fromEntries(FIGURE_NAMES.map((n, k) => [n, mc.outputs[k].sd])) as Record<FigureName, number>;
    }
    const pos = law[index];
    const flags = pos.flags.length ? `; ${pos.flags.join(", ")}` : "";
    if (pos.rejected) {
      // Withheld: a figure of merit of a matrix the second law forbids is not a property of any device.
      for (const n of ENGINE_FIGURES) {
        value[n] = Number.NaN;
        if (u) u[n] = Number.NaN;
      }
      return { index, value, u, secondLaw: "violated" as const, note: `meaningless: positivity is significantly violated here (λ_min = ${fmt(pos.lambda, 3)}${flags}), so the second law forbids these coefficients` };
    }
    if (Number.isFinite(pos.lambda) && pos.lambda < 0) {
      return { index, value, u, secondLaw: "doubtful" as const, note: `doubtful: λ_min = ${fmt(pos.lambda, 3)} < 0${flags}, not significantly${d.hasUncertainties ? "" : " (no uncertainties to test it)"}; the second law would forbid these figures if it were` };
    }
    return { index, value, u, secondLaw: "ok" as const, note: null };
  });
}

const finiteOrNull = (v: number | undefined): number | null => (v !== undefined && Number.isFinite(v) ? v : null);

function ztPlot(d: CoefficientsDataset, pts: readonly PointFigures[]): PlotSpec {
  const series: Series[] = [];
  const usable = pts.filter((p) => Number.isFinite(p.value.ZT));
  for (const [name, ps] of groupBy(usable, (p) => (d.points[p.index].B !== null ? `B = ${fmt(d.points[p.index].B as number)} ${d.fieldUnit}` : "ZT"))) {
    const s = sortedBy(ps.map((p) => d.points[p.index].sweep)).map((k) => ps[k]);
    series.push({
      type: "points",
      name,
      x: s.map((p) => d.points[p.index].sweep),
      y: s.map((p) => p.value.ZT),
      ...(d.hasUncertainties ? { yErr: s.map((p) => (p.u && Number.isFinite(p.u.ZT) ? p.u.ZT : 0)) } : {}),
    });
  }
  return {
    id: "zt",
    title: "Figure of merit ZT across the sweep",
    alt: `ZT = G S² T/K at each row against ${sweepAxisLabel(d)}${d.hasUncertainties ? ", with Monte Carlo standard uncertainties as error bars" : ""}.`,
    x: { label: sweepAxisLabel(d) },
    y: { label: "ZT" },
    series,
  };
}

function table(d: CoefficientsDataset, pts: readonly PointFigures[]): TableSpec {
  const withField = d.hasField;
  const cols: TableSpec["columns"] = [
    { key: "point", label: "Operating point" },
    { key: "G", label: "G", unit: "S" },
    { key: "S", label: "S", unit: "V/K" },
    { key: "Pi", label: "Π", unit: "V" },
    { key: "K", label: "K", unit: "W/K" },
    { key: "power_factor", label: "G S²", unit: "W/K²" },
    { key: "ZT", label: "ZT" },
    { key: "u_ZT", label: "u(ZT)" },
    { key: "eta_max_rel", label: "η_max/η_C" },
    { key: "eta_max_power_rel", label: "η(P_max)/η_C" },
  ];
  if (withField) cols.push({ key: "x", label: "x = L12/L21" }, { key: "y", label: "y = L12 L21/det L" });
  cols.push({ key: "second_law", label: "Second law at this row" });
  return {
    id: "figures",
    title: "Figures of merit at each row",
    columns: cols,
    rows: pts.map((p) => {
      const row: Record<string, number | string | null> = { point: pointLabel(d, d.points[p.index]) };
      for (const c of cols) if (c.key !== "point" && c.key !== "u_ZT" && c.key !== "second_law") row[c.key] = finiteOrNull(p.value[c.key as FigureName]);
      row.u_ZT = p.u ? finiteOrNull(p.u.ZT) : null;
      row.second_law = p.note ?? "obeyed";
      return row;
    }),
  };
}

export function figuresOfMeritForDataset(d: CoefficientsDataset, ctx: CheckContext): CheckResult {
  const references = [
    "H. B. Callen, Phys. Rev. 73, 1349 (1948)",
    "A. F. Ioffe, Semiconductor Thermoelements and Thermoelectric Cooling (Infosearch 1957)",
    "C. Van den Broeck, Phys. Rev. Lett. 95, 190602 (2005)",
    "G. Benenti, K. Saito and G. Casati, Phys. Rev. Lett. 106, 230602 (2011)",
    "JCGM 101:2008, Evaluation of measurement data — Supplement 1: propagation of distributions using a Monte Carlo method",
  ];
  const equations = [
    String.raw`G = \frac{L_{11}}{T},\quad S = \frac{L_{12}}{T L_{11}},\quad \Pi = \frac{L_{21}}{L_{11}},\quad K = \frac{\det L}{T^2 L_{11}},\quad ZT = \frac{G S^2 T}{K}`,
    String.raw`\frac{\eta_{\max}}{\eta_C} = \frac{\sqrt{1+ZT}-1}{\sqrt{1+ZT}+1}, \qquad \frac{\eta(P_{\max})}{\eta_C} = \frac{ZT}{2\,(ZT+2)}`,
  ];
  if (d.hasField) {
    equations.push(
      String.raw`x = \frac{L_{12}}{L_{21}},\quad y = \frac{L_{12} L_{21}}{\det L},\quad \frac{\eta_{\max}}{\eta_C} = x\,\frac{\sqrt{y+1}-1}{\sqrt{y+1}+1},\quad \frac{\eta(P_{\max})}{\eta_C} = \frac{x}{2}\,\frac{y}{2+y}`,
    );
  }
  if (d.n !== 2) {
    return notApplicableResult({
      check: "figures-of-merit",
      dataset: d.id,
      summary: `Not applicable: figures of merit are defined for the two-flux charge–heat matrix, and this table has ${d.n} fluxes.`,
      reason: "Give the 2×2 charge–heat block (L11 L12 L21 L22) as its own dataset to see G, S, Π, K and ZT.",
      references,
    });
  }
  const pts = evaluate(d, ctx);
  const zts = pts.map((p) => p.value.ZT).filter(Number.isFinite);
  const violated = pts.filter((p) => p.secondLaw === "violated");
  const doubtful = pts.filter((p) => p.secondLaw === "doubtful");
  const lawText =
    (violated.length
      ? ` At ${violated.length} row${violated.length === 1 ? "" : "s"} (${violated.slice(0, 4).map((p) => pointLabel(d, d.points[p.index])).join("; ")}${violated.length > 4 ? "; …" : ""}) positivity is significantly violated, so ZT and the efficiencies there are meaningless (the second law forbids them) and are not reported.`
      : "") +
    (doubtful.length ? ` At ${doubtful.length} row${doubtful.length === 1 ? "" : "s"} the symmetric part has a negative eigenvalue that is not significant; the figures there are doubtful.` : "");
  const best = pts.reduce((m, p) => (Number.isFinite(p.value.ZT) && (!Number.isFinite(m.value.ZT) || p.value.ZT > m.value.ZT) ? p : m), pts[0]);
  const assumptions = [
    SIGN_CONVENTION,
    "Linear response; the efficiencies are those of a heat engine operating close to equilibrium (η_C = ΔT/T to first order).",
    d.hasField
      ? "At B ≠ 0 the efficiencies use the Benenti–Saito–Casati parameters x and y; at B = 0 they use ZT (x = 1 when the Kelvin relation holds)."
      : "No field: the efficiencies use ZT, which presumes the Kelvin relation Π = T S.",
  ];
  assumptions.push(
    "Figures of merit presume an engine the second law allows: where positivity (the smallest eigenvalue of the normalised symmetric part, the test of the positivity check, Holm over rows) is significantly violated, ZT, y and the efficiencies are withheld as meaningless.",
  );
  if (d.hasUncertainties) assumptions.push(`Uncertainties are standard deviations of ${ctx.settings.resamples} Monte Carlo draws of the independent normal inputs, seeded from the data digest.`);
  return {
    check: "figures-of-merit",
    dataset: d.id,
    status: "info",
    summary: zts.length
      ? `ZT ranges from ${fmt(Math.min(...zts), 3)} to ${fmt(Math.max(...zts), 3)} over ${zts.length} of ${pts.length} rows; the largest at ${pointLabel(d, d.points[best.index])}, where η_max/η_C = ${fmt(best.value.eta_max_rel, 3)}.${lawText}`
      : `ZT is undefined at every row (K = 0 or G = 0, or positivity violated).${lawText}`,
    values: {
      max_ZT: zts.length ? Math.max(...zts) : null,
      points: pts.length,
      per_point: pts.map((p) => ({
        point: d.points[p.index].point,
        B: d.points[p.index].B,
        row: d.points[p.index].row,
        T: d.points[p.index].T,
        ...Object.fromEntries(FIGURE_NAMES.map((n) => [n, finiteOrNull(p.value[n])])),
        u: p.u ? Object.fromEntries(FIGURE_NAMES.map((n) => [n, finiteOrNull(p.u![n])])) : null,
        second_law: p.secondLaw,
        ...(p.note ? { note: p.note } : {}),
      })),
      rows_violating_positivity: violated.map((p) => d.points[p.index].row),
    },
    criteria: {},
    assumptions,
    references,
    equations,
    tables: [table(d, pts)],
    plots: zts.length ? [ztPlot(d, pts)] : [],
  };
}

export const figuresOfMerit: CheckDefinition = {
  id: "figures-of-merit",
  title: "Figures of merit: ZT, efficiencies and the field asymmetry",
  verdictBearing: false,
  options: {},
  run: perDataset("coefficients", figuresOfMeritForDataset),
};
