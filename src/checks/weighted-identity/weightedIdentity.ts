import type { SamplesDataset } from "../../ingest/types.ts";
import { exponentialConvergence } from "../../physics/exponentialConvergence.ts";
import { bcaInterval, bcaPValue, bootstrapRatio } from "../../stats/bootstrap.ts";
import { columnDependence } from "../../stats/columnDependence.ts";
import { holm } from "../../stats/holm.ts";
import { resolveSentence } from "../../stats/sampleSize.ts";
import { fmt, fmtInterval, numberOption, perDataset } from "../helpers.ts";
import type { CheckContext, CheckDefinition, CheckResult, Status, TableSpec } from "../types.ts";
import { countingAssumptions, countingSources, resamplingUnits } from "../resamplingUnits.ts";
import { exp } from "../../math/index.ts";

/**
 * The weighted identity ⟨x (e^{−β̄W} + e^{−a·x})⟩ = 0 for each current x in
 * {Q, ΔN}, obtained from the detailed exchange relation by the substitution
 * (W, x) → (−W, −x) (Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11,
 * 043014 (2009), exchange relation; the identity is derived from it).
 *
 * Unit-free scale: r = ⟨x g⟩/⟨|x g|⟩ with g = e^{−β̄W} + e^{−a·x} > 0, the
 * fraction of the weighted current that fails to cancel; it lies in [−1, 1] and
 * the margin applies to it directly. Its interval is a weighted bootstrap (BCa)
 * of the ratio, seeded from the data digest; Holm's correction spans the currents.
 */
interface Current {
  key: "Q" | "dN";
  label: string;
  x: Float64Array;
}

export function weightedIdentityForDataset(d: SamplesDataset, ctx: CheckContext): CheckResult {
  const refs = [
    "D. Andrieux, P. Gaspard, T. Monnai and S. Tasaki, New J. Phys. 11, 043014 (2009)",
    "M. Campisi, P. Hänggi and P. Talkner, Rev. Mod. Phys. 83, 771 (2011)",
    "B. Efron and R. J. Tibshirani, An Introduction to the Bootstrap (Chapman & Hall, 1993)",
    "S. Holm, Scand. J. Stat. 6, 65 (1979)",
  ];
  const equations = [
    String.raw`\left\langle x \left( e^{-\bar\beta W} + e^{-a\cdot x} \right) \right\rangle = 0, \qquad x \in \{Q, \Delta N\},\; a\cdot x = a_Q Q + a_N \Delta N`,
    String.raw`r_x = \frac{\langle x\, g \rangle}{\langle |x\, g| \rangle}, \qquad g = e^{-\bar\beta W} + e^{-a\cdot x}`,
  ];
  const assumptions = [
    "Both reservoirs start in independent grand-canonical states at the declared temperatures and chemical potentials.",
    "The switching protocol is time-reversal symmetric and there is no magnetic field.",
    "Realisations are independent and identically prepared.",
    d.config.work === "zero" ? "The switching work is declared zero (W = 0, so the identity reads ⟨x(1 + e^{−a·x})⟩ = 0)." : "The switching work W is measured.",
  ];
  // With the conductor's states, a·x stands for Σ_tot − β̄W: the boundary term travels with the currents.
  const base = { check: "weighted-identity" as const, dataset: d.id, ...countingSources(d, equations, refs), assumptions: countingAssumptions(d, assumptions) };
  const field = d.config.field ?? 0;
  if (field !== 0) {
    const reason = `the dataset was taken at a magnetic field of ${fmt(field)} T; the identity follows from the detailed relation, which pairs B with −B (Saito & Utsumi 2008), so one dataset cannot test it.`;
    return { ...base, status: "not-applicable", summary: `Not applicable: ${reason}`, reason, values: {}, criteria: {}, tables: [], plots: [] };
  }
  const currents: Current[] = [];
  if (d.Q.some((v) => v !== 0)) currents.push({ key: "Q", label: "heat Q", x: d.Q });
  if (d.dN.some((v) => v !== 0)) currents.push({ key: "dN", label: "particles ΔN", x: d.dN });
  if (currents.length === 0) {
    const reason = "no heat or particles were exchanged in any realisation (Q = ΔN = 0).";
    return { ...base, status: "not-applicable", summary: `Not applicable: ${reason}`, reason, values: {}, criteria: {}, tables: [], plots: [] };
  }
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0);
  const n = d.sigma.length; // rows, or cells of a reduced file
  const bW = new Float64Array(n);
  const ax = new Float64Array(n);
  let shift = -Infinity;
  for (let i = 0; i < n; i++) {
    bW[i] = -d.affinity.beta_bar * d.W[i];
    ax[i] = -(d.sigma[i] + bW[i]); // −a·x = −(Σ − β̄W)
    shift = Math.max(shift, bW[i], ax[i]);
  }
  // Weights are kept below e^100 so that the bootstrap's third moments (jackknife acceleration) cannot overflow.
  shift = shift > 100 ? shift - 100 : 0;
  const g = new Float64Array(n);
  for (let i = 0; i < n; i++) g[i] = exp(bW[i] - shift) + exp(ax[i] - shift);
  // Convergence of the exponential weights: judged on the a·x part, which carries the rare events.
  const aDotX = new Float64Array(n);
  for (let i = 0; i < n; i++) aDotX[i] = -ax[i];
  const conv = exponentialConvergence(aDotX, d.weight, d.windows?.correlationWindows ?? 1);

  // A current that is a fixed multiple of another in every realisation (Q = εΔN through a single level)
  // gives r_Q = sign(ε) r_ΔN exactly (r is invariant under x → c x up to the sign of c): the same statement,
  // tested once so that Holm's family counts only independent identities.
  const dep = columnDependence(
    currents.map((c) => c.x),
    d.weight,
    { order: [currents.findIndex((c) => c.key === "dN"), currents.findIndex((c) => c.key === "Q")].filter((i) => i >= 0) },
  );
  // A current the decomposition could not express through the basis (all coefficients zero: its values
  // underflow or overflow the norms of the QR) is tested on its own rather than dropped.
  const orphans = dep.dependent.filter((k) => k.coefficients.every((c) => c === 0)).map((k) => k.index);
  const independent = [...dep.basis, ...orphans].map((b) => currents[b]);
  const tested = independent.map((c) => {
    let scaleX = 0;
    for (let i = 0; i < n; i++) scaleX = Math.max(scaleX, Math.abs(c.x[i]));
    const u = new Float64Array(n);
    const v = new Float64Array(n);
    // With conductor states the boundary term b sits in a·x: ∂g/∂b = −e^{−a·x}, carried by resamplingUnits.
    const du = d.states ? new Float64Array(n) : null;
    const dv = d.states ? new Float64Array(n) : null;
    for (let i = 0; i < n; i++) {
      u[i] = (c.x[i] / scaleX) * g[i];
      v[i] = Math.abs(u[i]);
      if (du && dv) {
        du[i] = -(c.x[i] / scaleX) * exp(ax[i] - shift);
        dv[i] = Math.sign(u[i]) * du[i];
      }
    }
    const units = resamplingUnits(d, u, du, v, dv);
    const boot = bootstrapRatio(units.u, units.v, units.weight, ctx.rngFor(d.sha256, `weighted-identity-${c.key}`), { resamples: ctx.settings.resamples });
    return { current: c, ratio: boot.estimate, ci: bcaInterval(boot, confidence), p: bcaPValue(boot, 0), sameAs: null as null | { key: Current["key"]; factor: number } };
  });
  // A p-value the bootstrap could not form (resamples with no weighted realisation give 0/0) rejects nothing;
  // the verdict below is then inconclusive.
  const unresolvedP = tested.some((r) => Number.isNaN(r.p));
  const testedFamily = holm(tested.map((r) => (Number.isNaN(r.p) ? 1 : r.p)), alpha);
  const mirrored = dep.dependent.filter((k) => !orphans.includes(k.index)).map((k) => {
    // Only one current can be dependent on the other here: zero currents were left out above.
    const j = k.coefficients.findIndex((c) => c !== 0);
    const src = tested[j];
    const sign = Math.sign(k.coefficients[j]);
    const ci: [number, number] = sign > 0 ? [src.ci[0], src.ci[1]] : [-src.ci[1], -src.ci[0]];
    return { current: currents[k.index], ratio: sign * src.ratio, ci, p: src.p, sameAs: { key: src.current.key, factor: k.coefficients[j] } };
  });
  const results = [...tested, ...mirrored].sort((a, b) => currents.indexOf(a.current) - currents.indexOf(b.current));
  // A mirrored current shares the Holm decision of the current it repeats.
  const testOf = (r: (typeof results)[number]) => tested.findIndex((t) => t.current.key === (r.sameAs ? r.sameAs.key : r.current.key));
  const family = { adjusted: results.map((r) => testedFamily.adjusted[testOf(r)]), rejected: results.map((r) => testedFamily.rejected[testOf(r)]) };
  const sameText = mirrored
    .map((m) => {
      const src = currents.find((c) => c.key === m.sameAs.key)!;
      const factor = m.current.key === "Q" && src.key === "dN" ? `${fmt(m.sameAs.factor / d.energyUnit.joules)} ${d.energyUnit.name}` : fmt(m.sameAs.factor);
      return ` ${m.current.key} = ${factor} × ${src.key} in every realisation, so r_${m.current.key} = ${m.sameAs.factor > 0 ? "" : "−"}r_${src.key} exactly and the two identities are one test.`;
    })
    .join("");
  const rejected = results.filter((_, k) => family.rejected[k]);
  const within = results.every((r) => r.ci[0] >= -margin && r.ci[1] <= margin);
  const intervalText = (ci: [number, number]) => (Number.isFinite(ci[0]) && Number.isFinite(ci[1]) ? fmtInterval(ci[0], ci[1]) : "(no interval: the bootstrap left it undefined)");
  const describe = results.map((r) => `r_${r.current.key} = ${fmt(r.ratio)} ${intervalText(r.ci)}`).join(", ");

  let status: Status;
  let summary: string;
  let reason: string | undefined;
  if (d.realisations < 30) {
    status = "inconclusive";
    summary = `Only ${d.realisations} realisations: too few to test the weighted identity.`;
    reason = "At least 30 realisations are needed; record more runs.";
  } else if (!conv.resolved) {
    status = "inconclusive";
    summary = `${describe}, but the exponential weights are not resolved by the sample.${sameText}`;
    reason = `${conv.reason?.replaceAll("Σ", "a·x")}. More realisations or smaller affinities would settle it.`;
  } else if (unresolvedP) {
    status = "inconclusive";
    summary = `${describe}, but the weights are carried by so few realisations that bootstrap resamples without them leave the ratio undefined.${sameText}`;
    reason = "The exponential weights concentrate on a handful of realisations. More realisations or smaller affinities would settle it.";
  } else if (rejected.length) {
    status = "fail";
    summary = `The weighted identity fails for ${rejected.map((r) => r.current.label).join(" and ")}: ${describe} (Holm-adjusted p ≤ ${alpha}); the declared affinities do not match the data in that channel.${sameText}`;
  } else if (within) {
    status = "pass";
    summary = `The weighted currents cancel: ${describe}, each ${confidence * 100}% interval within ±${margin}.${sameText}`;
  } else {
    status = "inconclusive";
    summary = `No significant departure (${describe}), but not every interval lies within ±${margin}.${sameText}`;
    const worst = results.reduce((a, r) => (Math.max(Math.abs(r.ci[0]), Math.abs(r.ci[1])) > Math.max(Math.abs(a.ci[0]), Math.abs(a.ci[1])) ? r : a));
    reason = resolveSentence(d.realisations, (worst.ci[1] - worst.ci[0]) / 2, worst.ratio, margin);
  }
  const table: TableSpec = {
    id: "weighted-currents",
    title: "Scaled weighted currents r_x (ideal 0)",
    columns: [
      { key: "current", label: "Current" },
      { key: "r", label: "r_x" },
      { key: "lower", label: `${confidence * 100}% lower` },
      { key: "upper", label: `${confidence * 100}% upper` },
      { key: "p", label: "p" },
      { key: "p_holm", label: "p (Holm)" },
    ],
    rows: results.map((r, k) => ({ current: r.current.label, r: r.ratio, lower: r.ci[0], upper: r.ci[1], p: r.p, p_holm: family.adjusted[k] })),
  };
  return {
    ...base,
    status,
    summary,
    ...(reason ? { reason } : {}),
    values: {
      currents: Object.fromEntries(
        results.map((r, k) => [r.current.key, { ratio: r.ratio, ci: r.ci, p_value: r.p, p_holm: family.adjusted[k], ...(r.sameAs ? { same_test_as: r.sameAs.key, factor: r.sameAs.factor } : {}) }]),
      ),
      independent_currents: tested.map((r) => r.current.key),
      effective_sample_size: conv.effectiveSampleSize,
      tail_shape: conv.tailShape,
      resolved: conv.resolved,
      realisations: d.realisations,
    },
    criteria: { alpha, margin, confidence },
    tables: [table],
    plots: [],
  };
}

export const weightedIdentity: CheckDefinition = {
  id: "weighted-identity",
  title: "Weighted identity per current",
  verdictBearing: true,
  run: perDataset("samples", weightedIdentityForDataset),
};
