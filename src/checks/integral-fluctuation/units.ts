import { ONE, type ValueUnits } from "../valueUnits.ts";

/** Σ is counted in units of k_B, so ⟨e^−Σ⟩, its logarithm, ⟨Σ⟩ and ln N are pure numbers, as are the counts and the windows per independent realisation of a trace (ln_N is then ln(N/g)). */
export const integralFluctuationUnits: ValueUnits = {
  mean: ONE,
  ci: ONE,
  p_value: ONE,
  log_mean: ONE,
  log_min_resample: ONE,
  mean_sigma: ONE,
  ln_N: ONE,
  windows_per_realisation: ONE,
  mirror_realisations: ONE,
  effective_sample_size: ONE,
  tail_shape: ONE,
  resolved: null,
  resamples: ONE,
  exactly_resampled_cells: ONE,
  realisations: ONE,
};
