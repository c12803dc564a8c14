import type { SamplesDataset } from "../types.ts";

const sig = (x: number) => Number(x.toPrecision(3)).toString();

/**
 * The assumption a check on a summarised dataset rests on, in words: how the
 * realisations were pooled, what is kept exactly, and how far pooling can have
 * moved anything else.
 */
export function describeReduction(d: SamplesDataset): string | null {
  const r = d.reduction;
  if (r === null) return null;
  const unit = d.energyUnit.name;
  const widths: string[] = [];
  for (const [column, step] of Object.entries(r.steps)) {
    if (column === "sigma") continue;
    if (column === "betaW") widths.push(`β̄W in cells ${sig(step)} k_B wide`);
    else if (column === "dN") widths.push(step === 1 ? "equal ΔN" : `ΔN in cells of ${step} counts`);
    else if (column === "dN_A" || column === "dN_B") widths.push(step === 1 ? `equal ${column}` : `${column} in cells of ${step} counts`);
    else if (column === "state_end") continue;
    else if (column === "state_start") widths.push("equal start and end states of the conductor (so Σ_tot and Σ_res differ by one number per cell)");
    else widths.push(`${column} in cells ${sig(step / d.energyUnit.joules)} ${unit} wide`);
  }
  const pooled = r.pooledFraction > 0
    ? `${sig(100 * r.pooledFraction)} % of the realisations share a cell with others of different Σ; the largest Σ range inside a cell is ${sig(r.maxSigmaSpread)} k_B.`
    : "No cell holds realisations of different Σ: nothing was pooled but identical rows.";
  return (
    `Dataset ${d.id} (${d.realisations.toLocaleString("en-US")} realisations) was summarised while it was read into ${r.cells.toLocaleString("en-US")} cells ` +
    `of Σ ${sig(r.steps.sigma)} k_B wide${widths.length ? `, with ${widths.join(" and ")}` : ""} (centred, mirror-symmetric cells). ` +
    "Counts, column totals and sums of e^−Σ are kept exactly (each cell’s Σ is the one whose exponential is the cell’s average of e^−Σ); " +
    `other statistics see each cell at its averages. ${pooled}`
  );
}
