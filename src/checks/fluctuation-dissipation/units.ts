import { AFFINITY_UNIT, FLUX_UNIT, ONE, TRANSFER_UNIT, type UnitSpec, type ValueUnits } from "../valueUnits.ts";

/**
 * L_ij = ∂J_i/∂a_j, with J_i = ⟨x_i⟩/τ and a_j per unit of x_j, so an entry is
 * in [x_i][x_j]/s: J² s⁻¹ for heat–heat, J s⁻¹ across, s⁻¹ for particles
 * (Onsager, Phys. Rev. 37, 405 (1931), in the entropy-production form of
 * Andrieux & Gaspard, J. Chem. Phys. 121, 6167 (2004)).
 */
function entry(ci: string, cj: string): string {
  const parts = [TRANSFER_UNIT[ci], TRANSFER_UNIT[cj]].filter((u) => u !== ONE);
  if (parts.length === 2) return "J^2 s^-1";
  return parts.length === 1 ? "J s^-1" : "s^-1";
}

/** The report's own spelling of the same units (values.comparisons[].unit), in this file's notation. */
const WRITTEN: Record<string, string> = { "J²/s": "J^2 s^-1", "J/s": "J s^-1", "1/s": "s^-1", W: "W" };

const channelsOf = (values: Readonly<Record<string, unknown>>): string[] => (Array.isArray(values.channels) ? values.channels.map(String) : []);
const matrix = (values: Readonly<Record<string, unknown>>): UnitSpec => {
  const ch = channelsOf(values);
  return ch.map((ci) => ch.map((cj) => entry(ci, cj)));
};
const vector = (values: Readonly<Record<string, unknown>>): UnitSpec => channelsOf(values).map((c) => FLUX_UNIT[c] ?? null);
const SIGNIFICANCE: UnitSpec = { max_abs_z: ONE, smallest_p: ONE, entries: ONE };

export const fluctuationDissipationUnits: ValueUnits = {
  channels: null,
  affinities: null,
  // The check's own statement of these units, as text.
  units: null,
  tau: "s",
  work: null,
  field: "T",
  datasets: (values) => {
    const flux = vector(values);
    return { id: null, affinity: { a_Q: AFFINITY_UNIT.a_Q, a_N: AFFINITY_UNIT.a_N }, beta_bar: AFFINITY_UNIT.beta_bar, realisations: ONE, flux, flux_se: flux };
  },
  L_response: matrix,
  L_response_se: matrix,
  L_weighted: matrix,
  L_weighted_se: matrix,
  L_fluctuation: matrix,
  L_fluctuation_se: matrix,
  D: matrix,
  D_se: matrix,
  spontaneous: vector,
  spontaneous_se: vector,
  spontaneous_weighted: vector,
  spontaneous_weighted_se: vector,
  L_symmetric: (values) => ({ value: matrix(values), se: matrix(values) }),
  L_antisymmetric: (values) => ({ value: matrix(values), se: matrix(values) }),
  work_signature: { spontaneous: SIGNIFICANCE, D: SIGNIFICANCE },
  fluctuation_min_normalised_eigenvalue: ONE,
  // Σ per unit time, Σ in units of k_B.
  entropy_production_rate_rms: "s^-1",
  linearity: { dof: ONE, p_value: ONE, statistic: ONE, linear: null, method: null, note: null },
  model: null,
  fit: { chi_square: ONE, dof: ONE, p_value: ONE },
  relations: null,
  comparisons: (values) =>
    Array.isArray(values.comparisons)
      ? values.comparisons.map((c: { unit?: unknown }) => {
          const unit = WRITTEN[String(c?.unit)] ?? null;
          return { relation: null, label: null, unit: null, estimate: unit, se: unit, scale: unit, interval: unit, z: ONE, p: ONE, p_holm: ONE, equivalent: null, violated: null };
        })
      : null,
};
