import { ONE, type ValueUnits } from "../valueUnits.ts";

/**
 * The slope of ln P(n)/P(−n) is an affinity per electron (unit one), fitted
 * as A(τ) = A_∞ + b/τ, so b is in seconds. Effective temperatures in K,
 * chemical potentials and energies per electron in J.
 */
export const steadyStateCountingUnits: ValueUnits = {
  declared_affinity: ONE,
  affinity_infinite: ONE,
  standard_error: ONE,
  statistical_error: ONE,
  extrapolation_error: ONE,
  affinity_infinite_inverse_sqrt: ONE,
  ci: ONE,
  p_value: ONE,
  ratio_ci: ONE,
  b: "s",
  b_standard_error: "s",
  chi_square: ONE,
  dof: ONE,
  lack_of_fit_p: ONE,
  energy_per_electron: { A: "J", B: "J" },
  effective: {
    affinity: ONE,
    affinity_ci: ONE,
    T_A: "K",
    T_A_ci: "K",
    T_B: "K",
    T_B_ci: "K",
    mu_A: "J",
    mu_A_ci: "J",
    mu_B: "J",
    mu_B_ci: "J",
  },
  // The joint block bootstrap over the trace's time axis: block duration in seconds, counts of unit one.
  joint_bootstrap: { datasets: null, method: null, block_seconds: "s", blocks: ONE, resamples: ONE, resamples_used: ONE },
  // Covariance of the slopes A(τ), which are of unit one.
  slope_covariance: ONE,
  slopes: { dataset: null, tau: "s", windows: ONE, against: ONE, slope: ONE, se: ONE },
};
