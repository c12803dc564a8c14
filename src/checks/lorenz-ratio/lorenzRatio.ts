/**
 * Lorenz ratio K/(G T) against the Sommerfeld value L0 = (π²/3)(k_B/e)²
 * (Wiedemann & Franz, Ann. Phys. 165, 497 (1853); Lorenz 1872; Sommerfeld,
 * Z. Phys. 47, 1 (1928)). A reference, not a law: phonons, energy-dependent
 * transmission and interactions move it freely, so it never gives a verdict.
 */
import type { CoefficientsDataset } from "../../ingest/types.ts";
import { LORENZ_SOMMERFELD } from "../../physics/constants.ts";
import { lorenzNumber, onsagerFromInputs, thermoelectricFromOnsager } from "../../physics/thermoelectric.ts";
import { propagateUncertainty } from "../../stats/monteCarlo.ts";
import { fmt, notApplicableResult, perDataset } from "../helpers.ts";
import type { CheckContext, CheckDefinition, CheckResult } from "../types.ts";
import type { Series } from "../plotSpec.ts";
import { groupBy, pointLabel, sortedBy, sweepAxisLabel } from "../reciprocity/points.ts";

/** K/(G T L0) from Callen's matrix at T. */
export function lorenzRatioOf(L: readonly (readonly number[])[], T: number): number {
  return lorenzNumber(thermoelectricFromOnsager(L, T), T) / LORENZ_SOMMERFELD;
}

export function lorenzRatioForDataset(d: CoefficientsDataset, ctx: CheckContext): CheckResult {
  const references = ["A. Sommerfeld, Z. Phys. 47, 1 (1928)", "N. W. Ashcroft and N. D. Mermin, Solid State Physics (1976), ch. 2", "E. Tiesinga et al. (CODATA 2018), Rev. Mod. Phys. 93, 025010 (2021)"];
  const equations = [String.raw`\frac{K}{G\,T} \quad\text{against}\quad L_0 = \frac{\pi^2}{3}\left(\frac{k_B}{e}\right)^2 = 2.443\,004\,5\times 10^{-8}\ \mathrm{W\,\Omega\,K^{-2}}`];
  if (d.n !== 2) {
    return notApplicableResult({
      check: "lorenz-ratio",
      dataset: d.id,
      summary: `Not applicable: the Lorenz ratio needs the two-flux charge–heat matrix, and this table has ${d.n} fluxes.`,
      reason: "Give the 2×2 charge–heat block as its own dataset.",
      references,
    });
  }
  const rng = ctx.rngFor(d.sha256, "lorenz-ratio");
  const pts = d.points.map((p, index) => {
    const f = (x: readonly number[]) => [lorenzRatioOf(onsagerFromInputs(d.form, x, p.T, d.n), p.T)];
    const ratio = f(p.inputs.values)[0];
    const u = p.inputs.u ? propagateUncertainty(f, p.inputs.values, p.inputs.u, rng, ctx.settings.resamples).outputs[0].sd : null;
    return { index, ratio, u };
  });
  const finite = pts.filter((p) => Number.isFinite(p.ratio));
  const series: Series[] = [];
  for (const [name, ps] of groupBy(finite, (p) => (d.points[p.index].B !== null ? `B = ${fmt(d.points[p.index].B as number)} ${d.fieldUnit}` : "K/(G T L0)"))) {
    const s = sortedBy(ps.map((p) => d.points[p.index].sweep)).map((k) => ps[k]);
    series.push({ type: "points", name, x: s.map((p) => d.points[p.index].sweep), y: s.map((p) => p.ratio), ...(d.hasUncertainties ? { yErr: s.map((p) => p.u ?? 0) } : {}) });
  }
  series.push({ type: "rule", name: "Sommerfeld value", axis: "y", value: 1, style: "dashed" });
  const lo = finite.length ? Math.min(...finite.map((p) => p.ratio)) : Number.NaN;
  const hi = finite.length ? Math.max(...finite.map((p) => p.ratio)) : Number.NaN;
  return {
    check: "lorenz-ratio",
    dataset: d.id,
    status: "info",
    summary: finite.length
      ? `K/(G T) ranges from ${fmt(lo, 3)} L0 to ${fmt(hi, 3)} L0 over ${pts.length} rows (L0 = 2.443e-8 W Ω K⁻²); a reference value, not a law.`
      : "The Lorenz ratio is undefined at every row (G = 0).",
    values: {
      L0: LORENZ_SOMMERFELD,
      min_ratio: finite.length ? lo : null,
      max_ratio: finite.length ? hi : null,
      points: pts.length,
      per_point: pts.map((p) => ({
        point: d.points[p.index].point,
        B: d.points[p.index].B,
        row: d.points[p.index].row,
        T: d.points[p.index].T,
        ratio: Number.isFinite(p.ratio) ? p.ratio : null,
        u: p.u,
        lorenz_number: Number.isFinite(p.ratio) ? p.ratio * LORENZ_SOMMERFELD : null,
      })),
    },
    criteria: {},
    assumptions: [
      "K is the thermal conductance at zero electric current, K = det L/(T² L11), including any phonon or photon share the data contain.",
      "The Sommerfeld value holds for elastic scattering in a degenerate electron gas with a transmission smooth on the scale k_B T; departures are information, not a failure.",
    ],
    references,
    equations,
    tables: [
      {
        id: "lorenz",
        title: "Lorenz ratio at each row",
        columns: [
          { key: "point", label: "Operating point" },
          { key: "T", label: "T", unit: "K" },
          { key: "lorenz_number", label: "K/(G T)", unit: "W Ω K⁻²" },
          { key: "ratio", label: "K/(G T L0)" },
          { key: "u", label: "u(ratio)" },
        ],
        rows: pts.map((p) => ({
          point: pointLabel(d, d.points[p.index]),
          T: d.points[p.index].T,
          lorenz_number: Number.isFinite(p.ratio) ? p.ratio * LORENZ_SOMMERFELD : null,
          ratio: Number.isFinite(p.ratio) ? p.ratio : null,
          u: p.u,
        })),
      },
    ],
    plots: finite.length
      ? [
          {
            id: "lorenz-ratio",
            title: "Lorenz ratio across the sweep",
            alt: `K/(G T) in units of the Sommerfeld value L0 at each row against ${sweepAxisLabel(d)}; the dashed line marks the Wiedemann–Franz value 1.`,
            x: { label: sweepAxisLabel(d) },
            y: { label: "K/(G T L0)" },
            series,
          },
        ]
      : [],
  };
}

export const lorenzRatio: CheckDefinition = {
  id: "lorenz-ratio",
  title: "Lorenz ratio against the Sommerfeld value",
  verdictBearing: false,
  options: {},
  run: perDataset("coefficients", lorenzRatioForDataset),
};
