import { AS_WRITTEN, ONE, type ValueUnits } from "../valueUnits.ts";

/** λ_min is of the diagonally normalised symmetric part, so unit one; K and its field bound (L12 − L21)²/(4 G T³) in W/K. */
export const positivityUnits: ValueUnits = {
  min_eigenvalue: ONE,
  p_value: ONE,
  points: ONE,
  flagged: { row: ONE, flags: null },
  per_point: {
    point: AS_WRITTEN,
    B: "T",
    T: "K",
    row: ONE,
    min_eigenvalue: ONE,
    u: ONE,
    lower: ONE,
    upper: ONE,
    p: ONE,
    p_holm: ONE,
    K: "W K^-1",
    K_bound: "W K^-1",
    flags: null,
  },
};
