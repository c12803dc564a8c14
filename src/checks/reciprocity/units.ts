import { AS_WRITTEN, ONE, type UnitSpec, type ValueUnits } from "../valueUnits.ts";

/**
 * SI unit of the two sides of a tested relation, read from its name: the
 * Kelvin pair in volts (Π and T S), G in siemens, and Callen's entries
 * (I = L11 ΔV/T + L12 ΔT/T², J_Q = L21 ΔV/T + L22 ΔT/T²; Callen, Phys. Rev. 73,
 * 1349 (1948)) in S K, A K and W K. Entries of a larger matrix mix charge and
 * heat fluxes that audit.yaml does not name: their numbers are as written.
 */
export function relationUnit(relation: string): string {
  if (relation.includes("Π")) return "V";
  if (relation.startsWith("G(")) return "S";
  const m = /^L(\d)(\d)/.exec(relation);
  if (!m) return AS_WRITTEN;
  const [i, j] = [Number(m[1]), Number(m[2])];
  if (i > 2 || j > 2 || /L\d*[3-9]/.test(relation)) return AS_WRITTEN;
  if (i === 1 && j === 1) return "S K";
  if (i === 2 && j === 2) return "W K";
  return "A K";
}

const comparisonRow = (unit: string): UnitSpec => ({
  point: AS_WRITTEN,
  B: "T",
  rows: ONE,
  relation: null,
  left: unit,
  right: unit,
  difference: unit,
  u: unit,
  margin: unit,
  z: ONE,
  p: ONE,
  p_holm: ONE,
  normalised: ONE,
  normalised_u: ONE,
  tost_p: ONE,
  equivalent: null,
});

export const reciprocityUnits: ValueUnits = {
  max_abs_z: ONE,
  p_value: ONE,
  pairs: ONE,
  diagonal_pairs: ONE,
  tested_relations: null,
  margins: null,
  form: null,
  relation: null,
  max_abs_normalised_asymmetry: ONE,
  unpaired_rows: ONE,
  duplicate_rows: ONE,
  comparisons: (values) =>
    Array.isArray(values.comparisons) ? values.comparisons.map((c: { relation?: unknown }) => comparisonRow(relationUnit(String(c?.relation ?? "")))) : null,
};
