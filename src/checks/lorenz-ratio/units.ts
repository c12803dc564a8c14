import { AS_WRITTEN, ONE, type ValueUnits } from "../valueUnits.ts";

/** The Lorenz number K/(G T) in W Ω K⁻² (= V² K⁻²); its ratio to the Sommerfeld value L0 and that ratio's uncertainty are pure numbers. */
export const lorenzRatioUnits: ValueUnits = {
  L0: "W Ω K^-2",
  max_ratio: ONE,
  min_ratio: ONE,
  points: ONE,
  per_point: { point: AS_WRITTEN, B: "T", T: "K", row: ONE, lorenz_number: "W Ω K^-2", ratio: ONE, u: ONE },
};
