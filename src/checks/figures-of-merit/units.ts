import { AS_WRITTEN, ONE, type UnitSpec, type ValueUnits } from "../valueUnits.ts";

/** G, S, Π, K and the power factor G S² in SI; ZT, the efficiencies relative to Carnot and Benenti's x and y are pure numbers. */
const FIGURES: Record<string, UnitSpec> = {
  G: "S",
  S: "V K^-1",
  Pi: "V",
  K: "W K^-1",
  power_factor: "W K^-2",
  ZT: ONE,
  eta_max_rel: ONE,
  eta_max_power_rel: ONE,
  x: ONE,
  y: ONE,
};

export const figuresOfMeritUnits: ValueUnits = {
  max_ZT: ONE,
  points: ONE,
  rows_violating_positivity: ONE,
  per_point: { ...FIGURES, point: AS_WRITTEN, B: "T", T: "K", row: ONE, second_law: null, note: null, u: FIGURES },
};
