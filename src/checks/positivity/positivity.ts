/**
 * Positivity of entropy production in linear response: σ = Xᵀ L X ≥ 0 for
 * every force X, i.e. the symmetric part (L + Lᵀ)/2 is positive semi-definite
 * (second law; Onsager, Phys. Rev. 37, 405 (1931); de Groot & Mazur,
 * Non-Equilibrium Thermodynamics (1962), ch. IV). For the charge–heat matrix
 * this means G ≥ 0, K ≥ 0 and, with broken time reversal,
 * K ≥ (L12 − L21)²/(4 G T³) (Benenti, Saito & Casati, PRL 106, 230602 (2011)).
 *
 * The tested number is the smallest eigenvalue of the diagonally normalised
 * symmetric part, Ls_ij/√(|Ls_ii| |Ls_jj|): dimensionless, 1 − |r| for 2×2,
 * and ≤ −1 whenever a diagonal entry is negative (that entry becomes −1), so a
 * violation of any kind shows in the same number. Its standard uncertainty
 * comes from seeded Monte Carlo propagation of the inputs' uncertainties
 * (JCGM 101:2008).
 */
import type { CoefficientPoint, CoefficientsDataset } from "../../ingest/types.ts";
import { symmetricPart } from "../../linalg/symmetricPart.ts";
import { smallestEigenvalue } from "../../linalg/symmetricEigenvalues.ts";
import { determinant } from "../../linalg/determinant.ts";
import { onsagerFromInputs, onsagerInEntropyUnits, onsagerUncertaintyInEntropyUnits, thermalConductanceBound } from "../../physics/thermoelectric.ts";
import { propagateUncertainty } from "../../stats/monteCarlo.ts";
import { holm } from "../../stats/holm.ts";
import { normalCdf, normalQuantile } from "../../stats/normal.ts";
import type { Rng } from "../../stats/rng.ts";
import { fmt, perDataset } from "../helpers.ts";
import { ROW_UNIT, type CheckContext, type CheckDefinition, type CheckResult, type Status, type TableSpec } from "../types.ts";
import type { PlotSpec, Series } from "../plotSpec.ts";
import { groupBy, pointLabel, sortedBy, sweepAxisLabel } from "../reciprocity/points.ts";

/**
 * Smallest eigenvalue of Ls_ij/√(|Ls_ii| |Ls_jj|) with Ls = (L + Lᵀ)/2. NaN
 * when a diagonal entry is exactly zero (no scale).
 */
export function smallestNormalisedEigenvalue(L: readonly (readonly number[])[]): number {
  const n = L.length;
  if (n === 2) {
    // Closed form: [[s1, r], [r, s2]] with s_i = sign(L_ii), r = Ls12/√(|L11 L22|); λ_min = (s1 + s2)/2 − √(((s1 − s2)/2)² + r²).
    const a = L[0][0];
    const d = L[1][1];
    if (a === 0 || d === 0 || !Number.isFinite(a) || !Number.isFinite(d)) return Number.NaN;
    const r = (L[0][1] + L[1][0]) / 2 / Math.sqrt(Math.abs(a * d));
    const s1 = Math.sign(a);
    const s2 = Math.sign(d);
    return (s1 + s2) / 2 - Math.hypot((s1 - s2) / 2, r);
  }
  const s = symmetricPart(L);
  const d = s.map((row, i) => Math.sqrt(Math.abs(row[i])));
  if (d.some((v) => !(v > 0) || !Number.isFinite(v))) return Number.NaN;
  return smallestEigenvalue(s.map((row, i) => row.map((v, j) => v / (d[i] * d[j]))));
}

export interface PointPositivity {
  index: number;
  lambda: number;
  u: number | null;
  lower: number | null;
  upper: number | null;
  p: number | null;
  pHolm: number | null;
  rejected: boolean;
  /** Named negative diagonal quantities, e.g. "G < 0". */
  flags: string[];
  /** Thermal conductance at open circuit and the broken-time-reversal bound (2×2 only). */
  K: number | null;
  KBound: number | null;
}

function negativeFlags(d: CoefficientsDataset, p: CoefficientPoint): string[] {
  const flags: string[] = [];
  if (d.form === "thermoelectric") {
    if (p.inputs.values[0] < 0) flags.push("G < 0");
    if (p.inputs.values[3] < 0) flags.push("K < 0");
    if (p.L[1][1] < 0) flags.push("K + G S Π < 0");
    return flags;
  }
  p.L.forEach((row, i) => {
    if (row[i] < 0) flags.push(`L${i + 1}${i + 1} < 0`);
  });
  if (d.n === 2 && p.L[0][0] > 0 && determinant(p.L) < 0) flags.push("K < 0");
  return flags;
}

/** λ_min at every row with its Monte Carlo standard uncertainty. */
export function evaluatePoints(d: CoefficientsDataset, rng: Rng, draws: number, confidence: number): PointPositivity[] {
  const z = normalQuantile(confidence);
  return d.points.map((p, index) => {
    const lambda = smallestNormalisedEigenvalue(p.L);
    let u: number | null = null;
    if (p.inputs.u) {
      const mc = propagateUncertainty((x) => [smallestNormalisedEigenvalue(onsagerFromInputs(d.form, x, p.T, d.n))], p.inputs.values, p.inputs.u, rng, draws);
      u = mc.outputs[0].sd;
    }
    let KValue: number | null = null;
    let KBound: number | null = null;
    if (d.n === 2) {
      KValue = d.form === "thermoelectric" ? p.inputs.values[3] : determinant(p.L) / (p.T * p.T * p.L[0][0]);
      KBound = p.L[0][0] > 0 ? thermalConductanceBound(p.L, p.T) : null;
    }
    const flags = negativeFlags(d, p);
    if (KValue !== null && KBound !== null && KValue >= 0 && KValue < KBound) flags.push("K below the broken-time-reversal bound (L12 − L21)²/(4 G T³)");
    let pValue: number | null = null;
    if (u !== null && Number.isFinite(lambda)) {
      // One-sided test of H0: λ_min ≥ 0 against a violation λ_min < 0.
      pValue = u > 0 ? normalCdf(lambda / u) : lambda < 0 ? 0 : 1;
    }
    return {
      index,
      lambda,
      u,
      lower: u !== null ? lambda - z * u : null,
      upper: u !== null ? lambda + z * u : null,
      p: pValue,
      pHolm: null,
      rejected: false,
      flags,
      K: KValue,
      KBound,
    };
  });
}

/** "… uncertainty 2.1× too large: about 4.5× as many repeats averaged" (uncertainties fall as 1/√repeats). */
function moreRepeats(where: string, p: PointPositivity, factor: number): string {
  return `${where} (λ = ${fmt(p.lambda, 3)} ± ${fmt(p.u as number, 2)}; uncertainty ${fmt(factor, 2)}× too large: about ${fmt(Math.ceil(factor * factor * 10) / 10, 2)}× as many repeats averaged)`;
}

export function decidePositivity(d: CoefficientsDataset, pts: PointPositivity[], alpha: number, confidence: number): { status: Status; summary: string; reason?: string } {
  const finite = pts.filter((p) => Number.isFinite(p.lambda));
  const minLambda = finite.length ? Math.min(...finite.map((p) => p.lambda)) : Number.NaN;
  const label = (p: PointPositivity) => pointLabel(d, d.points[p.index]);
  const flagged = pts.filter((p) => p.flags.length > 0);
  const flagText = flagged.length ? ` Flags: ${flagged.slice(0, 6).map((p) => `${label(p)}: ${p.flags.join(", ")}`).join("; ")}${flagged.length > 6 ? "; …" : ""}.` : "";
  const noScale = pts.filter((p) => !Number.isFinite(p.lambda));
  if (noScale.length === pts.length) {
    return {
      status: "inconclusive",
      summary: "No row has non-zero diagonal entries, so the normalised symmetric part is undefined everywhere.",
      reason: "A diagonal entry of exactly zero gives no scale; check the G and L22 columns.",
    };
  }
  if (!d.hasUncertainties) {
    return {
      status: "inconclusive",
      summary: `Smallest normalised eigenvalue ${fmt(minLambda, 3)} over ${pts.length} points, but the table gives no standard uncertainties.${flagText}`,
      reason: "Without u_ columns neither a violation nor positivity can be established at any confidence; add a standard uncertainty for every coefficient.",
    };
  }
  const tested = pts.filter((p) => p.p !== null);
  const h = holm(tested.map((p) => p.p as number), alpha);
  tested.forEach((p, k) => {
    p.pHolm = h.adjusted[k];
    p.rejected = h.rejected[k];
  });
  const rejected = tested.filter((p) => p.rejected);
  if (rejected.length > 0) {
    const worst = rejected.reduce((m, p) => ((p.pHolm as number) < (m.pHolm as number) ? p : m), rejected[0]);
    return {
      status: "fail",
      summary: `The symmetric part of L is significantly not positive semi-definite at ${rejected.length} of ${pts.length} points: at ${label(worst)} the smallest normalised eigenvalue is ${fmt(worst.lambda, 3)} ± ${fmt(worst.u as number, 2)} (Holm-adjusted p = ${fmt(worst.pHolm as number, 3)} < α = ${alpha}).${flagText}`,
    };
  }
  const unsure = pts.filter((p) => !(p.lower !== null && p.lower > 0));
  if (unsure.length === 0) {
    return {
      status: "pass",
      summary: `The symmetric part of L is positive definite at all ${pts.length} points at ${confidence * 100} % confidence; the smallest normalised eigenvalue is ${fmt(minLambda, 3)}.`,
    };
  }
  const describe = (p: PointPositivity) =>
    !Number.isFinite(p.lambda)
      ? `${label(p)} (a zero diagonal entry)`
      : p.lambda <= 0
        ? `${label(p)} (λ = ${fmt(p.lambda, 3)} ± ${fmt(p.u as number, 2)}: at or below zero but not significantly)`
        : moreRepeats(label(p), p, ((p.u as number) * normalQuantile(confidence)) / p.lambda);
  return {
    status: "inconclusive",
    summary: `No significant violation of positivity at ${pts.length} points, but ${unsure.length} cannot be shown positive at ${confidence * 100} % confidence.${flagText}`,
    reason: `The ${confidence * 100} % lower bound of the smallest normalised eigenvalue is not above zero at ${unsure
      .slice(0, 6)
      .map(describe)
      .join("; ")}${unsure.length > 6 ? "; …" : ""}. Smaller uncertainties there (more averaging; the uncertainty falls as one over the square root of the number of repeats) would settle it; a point with λ = 0 exactly (a perfectly coupled, reversible device) can never be shown positive.`,
  };
}

function eigenvaluePlot(d: CoefficientsDataset, pts: readonly PointPositivity[], confidence: number): PlotSpec {
  const series: Series[] = [];
  const finite = pts.filter((p) => Number.isFinite(p.lambda));
  const sweepOf = (p: PointPositivity) => d.points[p.index].sweep;
  if (d.hasUncertainties) {
    // One band: at each sweep value the envelope of λ ± z u over the fields measured there.
    const groups = [...groupBy(finite, (p) => String(sweepOf(p))).values()];
    const xs = groups.map((g) => sweepOf(g[0]));
    const order = sortedBy(xs);
    series.push({
      type: "band",
      name: `${Math.round((2 * confidence - 1) * 100)} % interval (envelope over the fields)`,
      x: order.map((k) => xs[k]),
      lower: order.map((k) => Math.min(...groups[k].map((p) => p.lower as number))),
      upper: order.map((k) => Math.max(...groups[k].map((p) => p.upper as number))),
    });
  }
  for (const [name, ps] of groupBy(finite, (p) => (d.points[p.index].B !== null ? `B = ${fmt(d.points[p.index].B as number)} ${d.fieldUnit}` : "λ_min"))) {
    const s = sortedBy(ps.map(sweepOf)).map((k) => ps[k]);
    series.push({ type: "points", name, x: s.map(sweepOf), y: s.map((p) => p.lambda) });
  }
  series.push({ type: "rule", name: "positivity boundary", axis: "y", value: 0, style: "dashed" });
  return {
    id: "positivity-eigenvalue",
    title: "Smallest eigenvalue of the normalised symmetric part",
    alt: `The smallest eigenvalue of Ls_ij/√(Ls_ii Ls_jj) at each row against ${sweepAxisLabel(d)}${d.hasUncertainties ? ", with the envelope of its Monte Carlo intervals" : ""}; the second law requires it to stay at or above the dashed line at zero.`,
    x: { label: sweepAxisLabel(d) },
    y: { label: "Smallest normalised eigenvalue λ_min" },
    series,
  };
}

function pointTable(d: CoefficientsDataset, pts: readonly PointPositivity[]): TableSpec {
  const two = d.n === 2;
  return {
    id: "points",
    title: "Positivity at each row",
    columns: [
      { key: "point", label: "Operating point" },
      { key: "T", label: "T", unit: "K" },
      { key: "lambda", label: "λ_min", unit: "1" },
      { key: "u", label: "u(λ_min)", unit: "1" },
      { key: "lower", label: "Lower bound", unit: "1" },
      { key: "p_holm", label: "Holm p" },
      ...(two ? [{ key: "K", label: "K", unit: "W/K" }, { key: "bound", label: "(L12 − L21)²/(4GT³)", unit: "W/K" }] : []),
      { key: "flags", label: "Flags" },
    ],
    rows: pts.map((p) => ({
      point: pointLabel(d, d.points[p.index]),
      T: d.points[p.index].T,
      lambda: Number.isFinite(p.lambda) ? p.lambda : null,
      u: p.u,
      lower: p.lower,
      p_holm: p.pHolm,
      ...(two ? { K: p.K, bound: p.KBound } : {}),
      flags: p.flags.join("; "),
    })),
  };
}

/** A row's matrix in entropy units N = D L D (W/K, see onsagerInEntropyUnits) with its uncertainties. */
interface EntropyUnitMatrix {
  N: number[][];
  uN: number[][] | null;
}

/** The row's matrix in entropy units; null beyond two fluxes. */
function entropyUnitMatrix(d: CoefficientsDataset, p: CoefficientPoint): EntropyUnitMatrix | null {
  if (d.n !== 2 || !(p.T > 0) || !Number.isFinite(p.T)) return null;
  return { N: onsagerInEntropyUnits(p.L, p.T), uN: p.uL ? onsagerUncertaintyInEntropyUnits(p.uL, p.T) : null };
}

/**
 * Each row's matrix in entropy units, one row a matrix: all four entries share
 * the unit W/K, so the report writes them with one SI prefix per matrix and
 * they can be compared by eye (L itself mixes S K, A K and W K).
 */
function entropyUnitTable(d: CoefficientsDataset, matrices: readonly (EntropyUnitMatrix | null)[]): TableSpec {
  const entries = ["11", "12", "21", "22"] as const;
  const withU = d.hasUncertainties;
  return {
    id: "entropy-units",
    title: "Onsager matrix in entropy units at each row (one prefix per matrix)",
    columns: [
      { key: "point", label: "Operating point" },
      { key: "T", label: "T", unit: "K" },
      ...entries.flatMap((ij) => [
        { key: `N${ij}`, label: `N${ij}`, unit: ROW_UNIT },
        ...(withU ? [{ key: `u_N${ij}`, label: `u(N${ij})`, unit: ROW_UNIT }] : []),
      ]),
      { key: "unit", label: "Unit" },
    ],
    rows: d.points.map((p, k) => {
      const m = matrices[k];
      const cells: Record<string, number | string | null> = { point: pointLabel(d, p), T: p.T };
      entries.forEach((ij) => {
        const [i, j] = [Number(ij[0]) - 1, Number(ij[1]) - 1];
        cells[`N${ij}`] = m ? m.N[i][j] : null;
        if (withU) cells[`u_N${ij}`] = m?.uN ? m.uN[i][j] : null;
      });
      cells.unit = "W/K";
      return cells;
    }),
  };
}

export function positivityForDataset(d: CoefficientsDataset, ctx: CheckContext): CheckResult {
  const { alpha, confidence, resamples } = ctx.settings;
  const pts = evaluatePoints(d, ctx.rngFor(d.sha256, "positivity"), resamples, confidence);
  // Each row's matrix in entropy units, computed once for the values and the table.
  const matrices = d.points.map((p) => entropyUnitMatrix(d, p));
  const decision = decidePositivity(d, pts, alpha, confidence);
  const finite = pts.filter((p) => Number.isFinite(p.lambda));
  const broken = d.hasField && d.points.some((p) => p.B !== null && p.B !== 0);
  const assumptions = [
    "Linear response: entropy production is the quadratic form Xᵀ L X in the forces, so only the symmetric part of L enters.",
    d.hasUncertainties
      ? `Inputs are normally distributed and independent with the given standard uncertainties; λ_min's uncertainty is the standard deviation of ${resamples} Monte Carlo draws seeded from the data digest.`
      : "No standard uncertainties are given.",
    "The diagonal normalisation uses |Ls_ii|, so a negative diagonal entry appears as −1 on the diagonal and drives λ_min to −1 or below.",
  ];
  if (broken) assumptions.push("With B ≠ 0 the antisymmetric part of L is allowed; it enters only through the bound K ≥ (L12 − L21)²/(4 G T³), which λ_min ≥ 0 contains.");
  if (d.kelvinAssumed) assumptions.push("Π was set from the Kelvin relation Π(B) = T S(−B) (no Pi column).");
  if (d.n === 2) {
    assumptions.push(
      "The matrix in entropy units, N = D L D with D = diag(k_B/e, 1/T), is the same law written for the entropy currents (k_B/e) I and J_Q/T and the dimensionless forces eΔV/(k_B T) and ΔT/T: every entry is in W/K, N12 = N21 exactly when L12 = L21, and N is positive semi-definite exactly when L is. It is shown for reading; the verdict is computed from L.",
    );
  }
  const equations = [
    String.raw`\dot S = X^{\mathsf T} L\, X = X^{\mathsf T} L^{s} X \ge 0, \qquad L^{s} = \tfrac12\,(L + L^{\mathsf T})`,
    String.raw`\lambda_{\min}\!\left( \frac{L^{s}_{ij}}{\sqrt{L^{s}_{ii} L^{s}_{jj}}} \right) \ge 0 \quad\Longleftrightarrow\quad G \ge 0,\;\; K \ge \frac{(L_{12} - L_{21})^2}{4\, G\, T^3}`,
  ];
  if (d.n === 2) {
    equations.push(
      String.raw`N = D\,L\,D, \quad D = \operatorname{diag}\!\left(\frac{k_B}{e}, \frac{1}{T}\right), \quad \dot S = x^{\mathsf T} N\, x, \quad x = \left(\frac{e\,\Delta V}{k_B T}, \frac{\Delta T}{T}\right)`,
      String.raw`N = \begin{pmatrix} (k_B/e)^2\, G T & (k_B/e)\, G S T \\ (k_B/e)\, G \Pi & K + G S \Pi \end{pmatrix}`,
    );
  }
  return {
    check: "positivity",
    dataset: d.id,
    status: decision.status,
    summary: decision.summary,
    ...(decision.reason ? { reason: decision.reason } : {}),
    values: {
      min_eigenvalue: finite.length ? Math.min(...finite.map((p) => p.lambda)) : null,
      points: pts.length,
      p_value: pts.some((p) => p.pHolm !== null) ? Math.min(...pts.filter((p) => p.pHolm !== null).map((p) => p.pHolm as number)) : null,
      flagged: pts.filter((p) => p.flags.length > 0).map((p) => ({ row: d.points[p.index].row, flags: p.flags })),
      per_point: pts.map((p) => ({
        point: d.points[p.index].point,
        B: d.points[p.index].B,
        row: d.points[p.index].row,
        T: d.points[p.index].T,
        min_eigenvalue: Number.isFinite(p.lambda) ? p.lambda : null,
        u: p.u,
        lower: p.lower,
        p: p.p,
        p_holm: p.pHolm,
        K: p.K,
        K_bound: p.KBound,
        flags: p.flags,
        L: d.points[p.index].L,
        u_L: d.points[p.index].uL,
        N: matrices[p.index]?.N ?? null,
        u_N: matrices[p.index]?.uN ?? null,
      })),
    },
    criteria: { alpha, confidence },
    assumptions,
    references: [
      "L. Onsager, Phys. Rev. 37, 405 (1931)",
      "H. B. Callen, Phys. Rev. 73, 1349 (1948)",
      "S. R. de Groot and P. Mazur, Non-Equilibrium Thermodynamics (North-Holland 1962)",
      "G. Benenti, K. Saito and G. Casati, Phys. Rev. Lett. 106, 230602 (2011)",
      "JCGM 101:2008, Evaluation of measurement data — Supplement 1: propagation of distributions using a Monte Carlo method",
      "S. Holm, Scand. J. Stat. 6, 65 (1979)",
    ],
    equations,
    tables: [pointTable(d, pts), ...(d.n === 2 ? [entropyUnitTable(d, matrices)] : [])],
    plots: finite.length ? [eigenvaluePlot(d, pts, confidence)] : [],
  };
}

export const positivity: CheckDefinition = {
  id: "positivity",
  title: "Positivity: the symmetric part of the Onsager matrix",
  verdictBearing: true,
  options: {},
  run: perDataset("coefficients", positivityForDataset),
};
