import { ONE, type ValueUnits } from "../valueUnits.ts";

/** Σ = β̄W + a_Q Q + a_N ΔN in units of k_B: every term and every moment is a pure number. */
export const secondLawUnits: ValueUnits = {
  mean_sigma: ONE,
  ci: ONE,
  lower_bound: ONE,
  standard_error: ONE,
  sd_sigma: ONE,
  realisations: ONE,
  contributions: { beta_bar_W: ONE, a_Q_Q: ONE, a_N_dN: ONE },
};
