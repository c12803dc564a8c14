import type { SamplesDataset } from "../../ingest/types.ts";
import { weightedMoments } from "../../stats/weightedMoments.ts";
import { currentMoments, fmt, perDataset } from "../helpers.ts";
import type { CheckContext, CheckDefinition, CheckResult } from "../types.ts";

/**
 * Thermodynamic uncertainty relation, reported as information only:
 * Var(x)⟨Σ⟩/⟨x⟩² ≥ 2 holds for classical Markov jump processes in a steady
 * state (Barato & Seifert, Phys. Rev. Lett. 114, 158101 (2015); Gingrich,
 * Horowitz, Perunov & England, Phys. Rev. Lett. 116, 120601 (2016)).
 * Coherent quantum transport, finite contact times and magnetic fields can
 * break it (Brandner, Hanazato & Saito, Phys. Rev. Lett. 120, 090601 (2018)),
 * so a ratio below 1 is not an inconsistency of the data.
 */
export function uncertaintyRelationForDataset(d: SamplesDataset, _ctx: CheckContext): CheckResult {
  const sigma = weightedMoments(d.sigma, d.weight);
  const rows: Record<string, number | string | null>[] = [];
  const ratios: Record<string, number | null> = {};
  const currents: ["Q" | "dN", string, Float64Array][] = [];
  if (d.Q.some((v) => v !== 0)) currents.push(["Q", "heat Q", d.Q]);
  if (d.dN.some((v) => v !== 0)) currents.push(["dN", "particles ΔN", d.dN]);
  for (const [key, label, x] of currents) {
    const m = currentMoments(d, x, key);
    const product = m.mean !== 0 && sigma.mean > 0 ? (m.variance * sigma.mean) / (m.mean * m.mean) : null;
    ratios[key] = product === null ? null : product / 2;
    rows.push({ current: label, relative_variance: m.mean !== 0 ? m.variance / (m.mean * m.mean) : null, product, ratio: ratios[key] });
  }
  const described = Object.entries(ratios)
    .map(([k, r]) => `${k}: ${r === null ? "undefined (zero mean or ⟨Σ⟩ ≤ 0)" : fmt(r, 3)}`)
    .join(", ");
  return {
    check: "uncertainty-relation",
    dataset: d.id,
    status: currents.length ? "info" : "not-applicable",
    summary: currents.length
      ? `Ratio of Var(x)⟨Σ⟩/⟨x⟩² to 2 — ${described}. A bound for classical Markov steady states only; a ratio below 1 is not a violation of any law here.`
      : "Not applicable: no heat or particles were exchanged.",
    ...(currents.length ? {} : { reason: "no heat or particles were exchanged." }),
    values: { ratio: ratios, mean_sigma: sigma.mean },
    criteria: {},
    assumptions: [
      "The bound is proven for classical Markov jump processes in a steady state; coherent transport, finite contact times and magnetic fields can break it.",
      ...((d.config.field ?? 0) !== 0 ? ["This dataset was taken with a magnetic field: broken time-reversal symmetry can lower the bound."] : []),
    ],
    references: [
      "A. C. Barato and U. Seifert, Phys. Rev. Lett. 114, 158101 (2015)",
      "T. R. Gingrich, J. M. Horowitz, N. Perunov and J. L. England, Phys. Rev. Lett. 116, 120601 (2016)",
      "K. Brandner, T. Hanazato and K. Saito, Phys. Rev. Lett. 120, 090601 (2018)",
    ],
    equations: [String.raw`\frac{\operatorname{Var}(x)\,\langle \Sigma \rangle}{\langle x \rangle^2} \;\ge\; 2 \qquad \text{(classical Markov steady states)}`],
    tables: [
      {
        id: "uncertainty-ratios",
        title: "Uncertainty products per current",
        columns: [
          { key: "current", label: "Current" },
          { key: "relative_variance", label: "Var(x)/⟨x⟩²" },
          { key: "product", label: "Var(x)⟨Σ⟩/⟨x⟩²" },
          { key: "ratio", label: "ratio to 2" },
        ],
        rows,
      },
    ],
    plots: [],
  };
}

export const uncertaintyRelation: CheckDefinition = {
  id: "uncertainty-relation",
  title: "Thermodynamic uncertainty relation (information)",
  verdictBearing: false,
  options: {},
  run: perDataset("samples", uncertaintyRelationForDataset),
};
