import { AFFINITY_UNIT, ONE, TRANSFER_UNIT, type UnitSpec, type ValueUnits } from "../valueUnits.ts";

/**
 * Units of the exchange relation's values. The coefficients of (W, Q, ΔN) are
 * β̄ and a_Q per joule and a_N per particle (unit one). An identifiable
 * combination is in the unit of the coefficient of the variable it
 * multiplies, and each of its terms converts a coefficient into it (ε in J
 * for a_Q in a combination that multiplies ΔN, for instance).
 */
const AFFINITIES: UnitSpec = { ...AFFINITY_UNIT };
const TEST_ROW: UnitSpec = { test: null, p_value: ONE, p_holm: ONE, rejected: null };
const CHI_SQUARE: UnitSpec = { statistic: ONE, dof: ONE, p_value: ONE, exact_values: null };
/** On trace windows the binned test is Hotelling's T² over blocks referred to F; block length counted in windows. */
const BLOCK_BINNED: UnitSpec = {
  statistic: ONE,
  dof: ONE,
  p_value: ONE,
  exact_values: null,
  method: null,
  f_statistic: ONE,
  denominator_dof: ONE,
  blocks: ONE,
  block_length: ONE,
  bins: ONE,
};

const MULTIPLIED: Record<string, string> = { W: AFFINITY_UNIT.beta_bar, Q: AFFINITY_UNIT.a_Q, "ΔN": AFFINITY_UNIT.a_N, dN: AFFINITY_UNIT.a_N };

/** unit(combination) / unit(coefficient), for the two units that occur (J⁻¹ and one). */
function termUnit(combination: string, coefficient: string): string {
  if (combination === coefficient) return ONE;
  return combination === ONE ? "J" : "J^-1";
}

function combinationRow(row: unknown): UnitSpec {
  const r = (row ?? {}) as { multiplies?: unknown; terms?: unknown };
  const unit = MULTIPLIED[String(r.multiplies)] ?? null;
  const terms = r.terms && typeof r.terms === "object" ? Object.keys(r.terms) : [];
  return {
    combination: null,
    multiplies: null,
    terms: unit === null ? null : Object.fromEntries(terms.map((k) => [k, AFFINITY_UNIT[k] ? termUnit(unit, AFFINITY_UNIT[k]) : null])),
    fitted: unit,
    standard_error: unit,
    declared: unit,
    z: ONE,
    p_value: ONE,
    p_holm: ONE,
  };
}

/** An implied reservoir value names its own unit: K for temperatures, J for chemical potentials. */
function explanationRow(row: unknown): UnitSpec {
  const quantities = Array.isArray((row as { quantities?: unknown })?.quantities) ? ((row as { quantities: { unit?: unknown }[] }).quantities) : [];
  return {
    id: null,
    kind: null,
    frees: null,
    identified: null,
    consistent: null,
    chi_square: ONE,
    dof: ONE,
    p_value: ONE,
    quantities: quantities.map((q) => {
      const unit = q?.unit === "K" || q?.unit === "J" ? q.unit : null;
      return { name: null, unit: null, interval_method: null, value: unit, interval: unit, declared: unit };
    }),
  };
}

/** The mirror-symmetry test at zero affinity: counts of each sign, and the mean of each current in its own unit. */
function symmetryRow(row: unknown): UnitSpec {
  const unit = TRANSFER_UNIT[String((row as { current?: unknown })?.current)] ?? null;
  return {
    current: null,
    positive: ONE,
    negative: ONE,
    asymmetry: ONE,
    sign_test_p: ONE,
    equivalence_p: ONE,
    equivalent: null,
    mean: unit,
    mean_standard_error: unit,
    mean_z: ONE,
  };
}

const rows = (key: string, row: (r: unknown) => UnitSpec) => (values: Readonly<Record<string, unknown>>) => {
  const list = values[key];
  return Array.isArray(list) ? list.map(row) : null;
};

export const exchangeFluctuationUnits: ValueUnits = {
  slope: ONE,
  slope_ci: ONE,
  slope_standard_error: ONE,
  effective_affinity: AFFINITIES,
  effective_affinity_standard_error: AFFINITIES,
  declared_affinity: AFFINITIES,
  declared_reservoirs: { T_A: "K", T_B: "K", delta_mu: "J" },
  identifiable_combinations: rows("identifiable_combinations", combinationRow),
  not_identifiable: null,
  identifiability: null,
  // The residual of an exact relation among the columns is relative (the sine of the angle to their span).
  exact_relations: { variable: null, relation: null, residual: ONE },
  explanations: rows("explanations", explanationRow),
  interval_method: null,
  bins_used: ONE,
  binned_chi_square: (values) => ((values.binned_chi_square as { f_statistic?: unknown } | null)?.f_statistic !== undefined ? BLOCK_BINNED : CHI_SQUARE),
  cubic_score_test: CHI_SQUARE,
  tests: TEST_ROW,
  realisations: ONE,
  negative_sigma: ONE,
  zero_affinity: null,
  symmetry: rows("symmetry", symmetryRow),
};
