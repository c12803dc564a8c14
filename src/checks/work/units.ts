import { ONE, type ValueUnits } from "../valueUnits.ts";

/** The work W in joules; β̄W in units of k_B; correlations and fractions are pure numbers. */
export const workUnits: ValueUnits = {
  mean_W: "J",
  sd_W: "J",
  standard_error_W: "J",
  fraction_nonzero: ONE,
  mean_beta_bar_W: ONE,
  mean_beta_bar_W_ci: ONE,
  rms_beta_bar_W: ONE,
  p_value_mean: ONE,
  correlation_W_Q: ONE,
  correlation_W_dN: ONE,
  declared: null,
  work_in_data: null,
  onsager_without_work_applies: null,
  realisations: ONE,
};
