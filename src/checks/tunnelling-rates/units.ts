import { ONE, type ValueUnits } from "../valueUnits.ts";

/**
 * Rates are jumps per second of time spent in the starting state (s^-1, not a
 * current: nothing is said about which lead), exposures and dwell times in
 * seconds, occupations and counts of unit one.
 */
export const tunnellingRatesUnits: ValueUnits = {
  duration: "s",
  rates: { from: ONE, to: ONE, jumps: ONE, exposure: "s", rate: "s^-1", rate_ci: "s^-1" },
  occupation: {
    state: ONE,
    time_fraction: ONE,
    from_rates: ONE,
    u_from_rates: ONE,
    stays: ONE,
    mean_dwell: "s",
    short_stays: ONE,
    missed_fraction: ONE,
  },
  unresolved_jumps: null,
  missing: null,
};
