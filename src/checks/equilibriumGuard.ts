import type { SamplesDataset } from "../ingest/types.ts";
import type { CheckId, CheckResult } from "./types.ts";
import { notApplicableResult } from "./helpers.ts";

/**
 * True when the entropy production vanishes in every realisation: both
 * reservoirs in the same state (a_Q = a_N = 0) and no work. A relation such as
 * <Σ> >= 0 or <e^−Σ> = 1 then holds with equality whatever the data are, so
 * the data test nothing about it.
 */
export function sigmaVanishesIdentically(d: SamplesDataset): boolean {
  for (let i = 0; i < d.sigma.length; i++) if (d.sigma[i] !== 0 && (d.weight === null || d.weight[i] > 0)) return false;
  return true;
}

/** The not-applicable result for a law that is trivially satisfied at Σ ≡ 0. */
export function trivialAtEquilibrium(check: CheckId, d: SamplesDataset, equations: string[], references: string[]): CheckResult {
  const reason =
    "Σ = 0 in every realisation (both reservoirs in the same declared state and no work), so the relation holds with equality whatever the measured transfers are; these data cannot test it. Data taken at a non-zero temperature or chemical-potential difference, or with switching work, can.";
  return notApplicableResult({
    check,
    dataset: d.id,
    summary: "Not applicable: the entropy production vanishes in every realisation, so the law is satisfied trivially.",
    reason,
    values: { realisations: d.realisations },
    references,
    equations,
  });
}
