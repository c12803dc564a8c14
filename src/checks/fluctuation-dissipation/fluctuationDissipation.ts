import type { IngestedAudit } from "../../ingest/types.ts";
import { RankDeficientError, SingularCovarianceError } from "../../stats/weightedLeastSquares.ts";
import { chiSquareSf } from "../../stats/chiSquare.ts";
import { normalTwoSidedP } from "../../stats/normal.ts";
import { diagonallyNormalised } from "../../linalg/diagonallyNormalised.ts";
import { smallestEigenvalue } from "../../linalg/symmetricEigenvalues.ts";
import { datasetsOfKind, fmt, numberOption } from "../helpers.ts";
import { ROW_UNIT, type CheckContext, type CheckDefinition, type CheckResult, type Status, type TableSpec } from "../types.ts";
import { prepareSweep, sweepGroups, AFFINITY_OF, type Sweep, type Channel } from "./sweep.ts";
import {
  difference,
  fitResponse,
  fluctuationMatrix,
  interceptVector,
  responseMatrix,
  symmetrised,
  type EstimatedMatrix,
  type EstimatedVector,
  type ResponseFit,
  WeightOverflowError,
} from "./responseFit.ts";
import { judgeComparisons, relationSentence, type Comparison, type RelationId } from "./relations.ts";
import { entryUnit, fluxUnit, sliceplots, texColumn, texMatrix, texUnits } from "./presentation.ts";
import { marginOption } from "../options.ts";

const REFERENCES = [
  "D. Andrieux and P. Gaspard, J. Chem. Phys. 121, 6167 (2004)",
  "D. Andrieux, P. Gaspard, T. Monnai and S. Tasaki, New J. Phys. 11, 043014 (2009)",
  "K. Saito and Y. Utsumi, Phys. Rev. B 78, 115429 (2008)",
  "M. Campisi, P. Hänggi and P. Talkner, Rev. Mod. Phys. 83, 771 (2011)",
  "L. Onsager, Phys. Rev. 37, 405 (1931)",
  "S. Holm, Scand. J. Stat. 6, 65 (1979)",
  "D. J. Schuirmann, J. Pharmacokinet. Biopharm. 15, 657 (1987)",
];

const CH = { Q: "Q", dN: "N" } as const;
const entry = (name: string, ci: Channel, cj: Channel) => `${name}[${CH[ci]},${CH[cj]}]`;

function base(sweepName: string): Omit<CheckResult, "status" | "summary"> {
  return { check: "fluctuation-dissipation", dataset: sweepName, values: {}, criteria: {}, assumptions: [], references: REFERENCES, equations: [], tables: [], plots: [] };
}

function notApplicable(name: string, reason: string, datasets: string[]): CheckResult {
  return { ...base(name), status: "not-applicable", summary: `Not applicable: ${reason}.`, reason: `${reason}.`, values: { datasets } };
}

/** Unit-free scales for the margins (physics §6): sqrt(Lf_ii Lf_jj) for entries; for fluxes the Cauchy–Schwarz bound sqrt(Lf_ii · a^T Lf a). */
function scales(Lf: EstimatedMatrix, r: ResponseFit) {
  const m = Lf.value.length;
  const entryScale = (i: number, j: number) => Math.sqrt(Math.abs(Lf.value[i][i] * Lf.value[j][j]));
  // RMS over the sweep of the linear-response entropy production rate a^T Lf a (k_B/s).
  const sigmaDot = Math.sqrt(
    r.points.reduce((acc, p) => {
      let q = 0;
      for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) q += p.a[i] * Lf.value[i][j] * p.a[j];
      return acc + q * q;
    }, 0) / r.points.length,
  );
  const fluxScale = (i: number) => Math.sqrt(Math.abs(Lf.value[i][i]) * sigmaDot);
  return { entryScale, fluxScale, sigmaDot };
}

function matrixValues(M: EstimatedMatrix) {
  return { value: M.value, se: M.se };
}

function comparisonsOf(sweep: Sweep, r: ResponseFit, L: EstimatedMatrix, Lw: EstimatedMatrix, s: EstimatedVector, sw: EstimatedVector, Lf: EstimatedMatrix): Comparison[] {
  const m = sweep.channels.length;
  const ch = sweep.channels;
  const { entryScale, fluxScale } = scales(Lf, r);
  const out: Comparison[] = [];
  const field = sweep.field !== 0;
  // With work the weighted matrix carries the fluctuation–dissipation relation; without, L itself (and L~ = L).
  const R = sweep.work ? Lw : L;
  const Rname = sweep.work ? "L~" : "L";
  const compared = field ? symmetrised(r, R, 1) : R;
  const diff = difference(r, compared, Lf);
  for (let i = 0; i < m; i++) {
    for (let j = field ? i : 0; j < m; j++) {
      out.push({
        relation: "fluctuation-response",
        label: `${field ? `sym ${entry(Rname, ch[i], ch[j])}` : entry(Rname, ch[i], ch[j])} − ${entry("L_fluct", ch[i], ch[j])}`,
        estimate: diff.value[i][j],
        se: diff.se[i][j],
        scale: entryScale(i, j),
        unit: entryUnit(ch[i], ch[j]),
      });
    }
  }
  if (!field && m === 2) {
    const anti = symmetrised(r, R, -1);
    out.push({ relation: "reciprocity", label: `${entry(Rname, ch[0], ch[1])} − ${entry(Rname, ch[1], ch[0])}`, estimate: 2 * anti.value[0][1], se: 2 * anti.se[0][1], scale: entryScale(0, 1), unit: entryUnit(ch[0], ch[1]) });
  }
  if (!field) {
    const v = sweep.work ? sw : s;
    for (let i = 0; i < m; i++) {
      out.push({ relation: "no-spontaneous-flux", label: `${sweep.work ? "s~" : "s"}[${CH[ch[i]]}]`, estimate: v.value[i], se: v.se[i], scale: fluxScale(i), unit: fluxUnit(ch[i]) });
    }
  }
  return out;
}

function statementsFor(sweep: Sweep): Record<RelationId, string> {
  if (sweep.work) {
    return {
      "fluctuation-response": "the weighted response matrix L~ (slopes of <x(1 + e^{−β̄W})>/(2τ)) equals the fluctuation matrix <x xᵀ>₀/(2τ)",
      reciprocity: "L~ is symmetric",
      "no-spontaneous-flux": "the weighted flux vanishes at zero affinity (s~ = 0, the weighted identity)",
    };
  }
  return {
    "fluctuation-response":
      sweep.field !== 0
        ? "the symmetric part of the response matrix L equals the fluctuation matrix <x xᵀ>₀/(2τ)"
        : "the response matrix L (slopes of the mean fluxes <x>/τ) equals the fluctuation matrix <x xᵀ>₀/(2τ)",
    reciprocity: "L is symmetric (Onsager reciprocity)",
    "no-spontaneous-flux": "the spontaneous flux vanishes (s = 0)",
  };
}

/** z and two-sided p of each entry against zero: the signature of switching work (reported, not a verdict). */
function significance(M: { value: number[][]; se: number[][] } | { value: number[]; se: number[] }) {
  const flat = (M.value as (number | number[])[]).flat() as number[];
  const se = (M.se as (number | number[])[]).flat() as number[];
  let chi2 = 0;
  let minP = 1;
  flat.forEach((v, k) => {
    if (se[k] > 0) {
      chi2 += (v / se[k]) ** 2;
      minP = Math.min(minP, normalTwoSidedP(v / se[k]));
    }
  });
  return { max_abs_z: Math.max(...flat.map((v, k) => (se[k] > 0 ? Math.abs(v / se[k]) : 0))), smallest_p: minP, entries: flat.length };
}

function sweepResult(sweep: Sweep, ctx: CheckContext): CheckResult {
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0);
  const ids = sweep.datasets.map((d) => d.id);
  let r: ResponseFit;
  try {
    r = fitResponse(sweep, ctx.settings.alpha);
  } catch (err) {
    if (err instanceof WeightOverflowError) {
      return {
        ...base(sweep.name),
        status: "inconclusive",
        summary: `The weighted fluxes of sweep "${sweep.name}" cannot be formed: ${err.message}.`,
        reason: `${err.message}; such work values make the exponential average meaningless at any sample size (Jarzynski, Phys. Rev. E 73, 046105 (2006)); check the work column's unit and sign.`,
        values: { datasets: ids },
        criteria: { alpha, margin, confidence },
      };
    }
    if (err instanceof RankDeficientError || err instanceof SingularCovarianceError) {
      return {
        ...base(sweep.name),
        status: "inconclusive",
        summary: `The response of sweep "${sweep.name}" could not be fitted: ${err.message}.`,
        reason: `The datasets do not determine the fit (${err.message}); record more realisations so that every observable varies in every dataset.`,
        values: { datasets: ids },
        criteria: { alpha, margin, confidence },
      };
    }
    throw err;
  }
  const few = sweep.datasets.filter((d) => d.realisations < 30).map((d) => d.id);
  const L = responseMatrix(r, r.outputs.J);
  const s = interceptVector(r, r.outputs.J);
  const Lw = r.outputs.Jw ? responseMatrix(r, r.outputs.Jw) : L;
  const sw = r.outputs.Jw ? interceptVector(r, r.outputs.Jw) : s;
  const Lf = fluctuationMatrix(r);
  // Without work J~ = J realisation by realisation, so L~ = L and D = 0 exactly.
  const D = r.outputs.Jw ? difference(r, L, Lw) : { value: L.value.map((row) => row.map(() => 0)), se: L.value.map((row) => row.map(() => 0)), combination: [] };
  const Lsym = symmetrised(r, L, 1);
  const Lanti = symmetrised(r, L, -1);
  const linearity = r.linearity;
  const comparisons = comparisonsOf(sweep, r, L, Lw, s, sw, Lf);
  const decision = judgeComparisons(comparisons, statementsFor(sweep), alpha, confidence, margin);
  const { sigmaDot } = scales(Lf, r);
  const normalised = diagonallyNormalised(Lf.value);
  const fitP = r.fit.dof > 0 ? chiSquareSf(r.fit.chiSquare, r.fit.dof) : null;

  const clauses = decision.relations.map((rel) => relationSentence(rel, margin, confidence));
  let status: Status = decision.status;
  let reason: string | undefined;
  const linearText =
    linearity.linear === null
      ? `linearity could not be tested (${linearity.note})`
      : linearity.linear
        ? `the sweep is in the linear regime: ${linearity.note}`
        : r.model === "quadratic"
          ? `the sweep is not in the linear regime (${linearity.note}), so the matrices are the first derivatives at zero affinity of a fit with quadratic terms`
          : `the sweep is not in the linear regime: ${linearity.note}`;
  const counts = (factor: number): string => {
    const n = sweep.datasets.map((d) => d.realisations);
    const text = (k: number) => Math.ceil(factor * k).toLocaleString("en");
    return n.every((k) => k === n[0]) ? `about ${text(n[0])} in each dataset (now ${n[0].toLocaleString("en")})` : sweep.datasets.map((d) => `${d.id}: ${text(d.realisations)} (now ${d.realisations.toLocaleString("en")})`).join(", ");
  };
  if (few.length) {
    status = "inconclusive";
    reason = `${few.join(", ")} ha${few.length === 1 ? "s" : "ve"} fewer than 30 realisations, too few for normal-theory errors on the means; record at least 30 runs in each (${sweep.datasets.filter((d) => d.realisations < 30).map((d) => `${d.id}: ${30 - d.realisations} more`).join(", ")}).`;
  } else if (linearity.linear === false && r.model === "linear") {
    status = "inconclusive";
    reason = `The fluxes are not linear in the affinities (${linearity.note}) and the datasets are too few to fit the curvature, so slopes and intercepts mix in higher orders; repeat the sweep at smaller affinities or add datasets.`;
  } else if (status === "inconclusive") {
    reason =
      decision.moreData !== null && Number.isFinite(decision.moreData)
        ? `Not every comparison is inside the ${fmt(margin * 100, 3)} % margin yet; about ${fmt(Math.ceil(decision.moreData * 10) / 10, 3)} times as many realisations per dataset would resolve it at this spread (standard errors fall as one over the square root of the count): ${counts(decision.moreData)}.`
        : `Not every comparison is inside the ${fmt(margin * 100, 3)} % margin and an estimate lies at the margin itself; more realisations or more datasets at further affinities are needed.`;
  }
  const workClause = sweep.work
    ? ` Switching work is present: the spontaneous flux s is ${significance(s).smallest_p < alpha ? `significantly non-zero (smallest p = ${fmt(significance(s).smallest_p, 3)})` : "not significantly different from zero"} and D = L − L~ is ${significance(D).smallest_p < alpha ? `significantly non-zero (smallest p = ${fmt(significance(D).smallest_p, 3)})` : "not significantly different from zero"}, the signature of work done by switching the contact.`
    : "";
  const summary = `Sweep "${sweep.name}" (${ids.length} datasets, τ = ${fmt(sweep.tau)} s, ${sweep.channels.length === 2 ? "heat and particles" : sweep.channels[0] === "Q" ? "heat only" : "particles only"}): ${clauses.join("; ")}; ${linearText}.${workClause}`;

  const assumptions = [
    "Every dataset starts from independent grand-canonical reservoirs and measures the transfers by two-point measurements.",
    "The datasets share the contact time and the reservoirs' mean state; they differ only in the affinities, which are small enough for linear response (tested).",
    "Realisations are independent; the means' errors come from the sample covariances (normal theory).",
    "The second moments are extrapolated linearly in the affinities to zero affinity.",
  ];
  if (!sweep.work) assumptions.push("No switching work (W = 0 in every realisation): then L~ = L, D = 0 and the spontaneous flux must vanish.");
  else assumptions.push("The switching protocol is time-reversal symmetric, so the weighted identity holds with the measured work.");
  if (sweep.field !== 0) assumptions.push(`Magnetic field ${sweep.field} T: second moments fix only the symmetric part of L; reciprocity would pair this sweep with one at −B.`);
  if (sweep.channels.length === 1) {
    const c = sweep.channels[0];
    assumptions.push(
      c === "Q"
        ? "No particles are exchanged (no particle column, or every dN is zero): the problem reduces to heat alone, with a_Q the only affinity that drives a flux."
        : "No energy transfer is recorded: the problem reduces to particles alone, with a_N the only affinity that drives a flux.",
    );
  }

  const channels = sweep.channels;
  const units = channels.map((ci) => channels.map((cj) => entryUnit(ci, cj)));
  const values: Record<string, unknown> = {
    channels,
    affinities: r.affinities,
    units: { matrices: units, spontaneous: channels.map(fluxUnit) },
    tau: sweep.tau,
    work: sweep.work,
    field: sweep.field,
    datasets: r.points.map((p) => ({ id: p.id, affinity: Object.fromEntries(channels.map((c, j) => [AFFINITY_OF[c], p.a[j]])), beta_bar: p.beta_bar, realisations: p.n, flux: p.mean.slice(0, channels.length), flux_se: r.outputs.J.map((o) => Math.sqrt(p.covariance[o][o])) })),
    L_response: L.value,
    L_response_se: L.se,
    L_weighted: Lw.value,
    L_weighted_se: Lw.se,
    L_fluctuation: Lf.value,
    L_fluctuation_se: Lf.se,
    D: D.value,
    D_se: D.se,
    spontaneous: s.value,
    spontaneous_se: s.se,
    spontaneous_weighted: sw.value,
    spontaneous_weighted_se: sw.se,
    L_symmetric: matrixValues(Lsym),
    L_antisymmetric: matrixValues(Lanti),
    ...(sweep.work ? { work_signature: { spontaneous: significance(s), D: significance(D) } } : {}),
    fluctuation_min_normalised_eigenvalue: normalised ? smallestEigenvalue(normalised) : null,
    entropy_production_rate_rms: sigmaDot,
    linearity,
    model: r.model,
    fit: { chi_square: r.fit.chiSquare, dof: r.fit.dof, p_value: fitP },
    relations: decision.relations.map((rel) => ({ relation: rel.relation, verdict: rel.verdict, statement: rel.statement })),
    comparisons: decision.relations.flatMap((rel) =>
      rel.comparisons.map((c) => ({ relation: c.relation, label: c.label, estimate: c.estimate, se: c.se, scale: c.scale, unit: c.unit, z: c.z, p: c.p, p_holm: c.pHolm, interval: c.interval, equivalent: c.equivalent, violated: c.violated })),
    ),
  };

  const tables: TableSpec[] = [
    {
      id: "datasets",
      title: "Datasets of the sweep: affinities and mean fluxes",
      columns: [
        { key: "id", label: "Dataset" },
        ...channels.map((c) => (c === "Q" ? { key: "a_Q", label: "a_Q", unit: "1/J" } : { key: "a_N", label: "a_N" })),
        { key: "n", label: "Realisations" },
        ...channels.flatMap((c) => [
          { key: `J_${c}`, label: `J_${CH[c]}`, unit: fluxUnit(c) },
          { key: `u_${c}`, label: `u(J_${CH[c]})`, unit: fluxUnit(c) },
        ]),
      ],
      rows: r.points.map((p) => ({
        id: p.id,
        ...Object.fromEntries(channels.map((c, j) => [AFFINITY_OF[c], p.a[j]])),
        n: p.n,
        ...Object.fromEntries(channels.flatMap((c, i) => [[`J_${c}`, p.mean[r.outputs.J[i]]], [`u_${c}`, Math.sqrt(p.covariance[r.outputs.J[i]][r.outputs.J[i]])]])),
      })),
    },
    {
      id: "comparisons",
      title: "Comparisons behind the verdict (each should be zero)",
      columns: [
        { key: "relation", label: "Relation" },
        { key: "label", label: "Difference" },
        { key: "unit", label: "Unit" },
        { key: "estimate", label: "Estimate", unit: ROW_UNIT },
        { key: "se", label: "Standard error", unit: ROW_UNIT },
        { key: "bound", label: "Margin ±", unit: ROW_UNIT },
        { key: "p", label: "Holm-adjusted p" },
        { key: "result", label: "Result" },
      ],
      rows: decision.relations.flatMap((rel) =>
        rel.comparisons.map((c) => ({
          relation: rel.relation,
          label: c.label,
          unit: c.unit,
          estimate: c.estimate,
          se: c.se,
          bound: margin * c.scale,
          p: c.pHolm,
          result: c.violated ? "violated" : c.equivalent ? "within margin" : "not resolved",
        })),
      ),
    },
  ];

  const equations = [
    String.raw`J = \frac{\langle x\rangle}{\tau} = s + L\,a, \qquad \tilde J = \frac{\langle x\,(1+e^{-\bar\beta W})\rangle}{2\tau} = \tilde s + \tilde L\,a, \qquad L_{\mathrm{fluct}} = \frac{\langle x\,x^{\mathsf T}\rangle_0}{2\tau}, \qquad D = L - \tilde L`,
    // The compared pair side by side (L~ with work, L without), then the other matrix and D.
    sweep.work
      ? String.raw`\small \tilde L = ${texMatrix(Lw)}, \quad L_{\mathrm{fluct}} = ${texMatrix(Lf)}`
      : String.raw`\small L = ${texMatrix(L)}, \quad L_{\mathrm{fluct}} = ${texMatrix(Lf)}`,
    sweep.work ? String.raw`\small L = ${texMatrix(L)}, \quad D = L - \tilde L = ${texMatrix(D)}` : String.raw`\tilde L = L, \qquad D = 0 \quad \text{(no work)}`,
    String.raw`\tfrac12(L + L^{\mathsf T}) = ${texMatrix(Lsym)}`,
    String.raw`\tfrac12(L - L^{\mathsf T}) = ${texMatrix(Lanti)}`,
    String.raw`s = ${texColumn(s)}, \qquad \tilde s = ${texColumn(sw)} \qquad \mathrm{(${channels.map((c) => (c === "Q" ? "W" : "s^{-1}")).join(",\\ ")})}`,
    String.raw`\text{units of the matrix entries (SI): } ${texUnits(channels)}, \qquad x = (${channels.map((c) => (c === "Q" ? "Q" : "\\Delta N")).join(",\\ ")}),\ a = (${channels.map((c) => (c === "Q" ? "a_Q" : "a_N")).join(",\\ ")})`,
  ];
  const first = sweep.datasets[0];
  return {
    check: "fluctuation-dissipation",
    dataset: sweep.name,
    status,
    summary,
    ...(reason ? { reason } : {}),
    values,
    criteria: { alpha, margin, confidence },
    assumptions,
    references: REFERENCES,
    equations,
    tables,
    plots: sliceplots(r, L, s, r.outputs.Jw ? Lw : null, r.outputs.Jw ? sw : null, Lf, { name: first.energyUnit.name, joules: first.energyUnit.joules }),
  };
}

/** One result per sweep (samples datasets sharing `sweep:`); none when the audit has no sweep. */
export function runFluctuationDissipation(audit: IngestedAudit, ctx: CheckContext): CheckResult[] {
  const results: CheckResult[] = [];
  for (const [name, datasets] of sweepGroups(datasetsOfKind(audit, "samples"))) {
    const prepared = prepareSweep(name, datasets);
    results.push("problem" in prepared ? notApplicable(name, prepared.problem, prepared.datasets) : sweepResult(prepared.sweep, ctx));
  }
  return results;
}

export const fluctuationDissipation: CheckDefinition = {
  id: "fluctuation-dissipation",
  title: "Fluctuation–dissipation across an affinity sweep: Onsager matrices from means and from fluctuations",
  verdictBearing: true,
  options: { margin: marginOption },
  run: runFluctuationDissipation,
};
