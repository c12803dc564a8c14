import { AS_WRITTEN, ONE, type UnitSpec, type ValueUnits } from "../valueUnits.ts";

/** Callen's charge–heat matrix in SI: L11 = G T in S K, L12 and L21 in A K, L22 = T²(K + G S Π) in W K. */
const CALLEN_2X2: UnitSpec = [
  ["S K", "A K"],
  ["A K", "W K"],
];

/** Whether the rows carry the 2×2 charge–heat matrix (beyond two fluxes the entries' units are not named by the audit). */
function twoFluxes(values: Readonly<Record<string, unknown>>): boolean {
  const rows = values.per_point;
  if (!Array.isArray(rows) || rows.length === 0) return true;
  const L = (rows[0] as { L?: unknown }).L;
  return Array.isArray(L) && L.length === 2;
}

/**
 * λ_min is of the diagonally normalised symmetric part, so unit one; K and its
 * field bound (L12 − L21)²/(4 G T³) in W/K; each row's matrix as Callen's L
 * and in entropy units N = D L D, every entry of which is in W/K.
 */
export const positivityUnits: ValueUnits = {
  min_eigenvalue: ONE,
  p_value: ONE,
  points: ONE,
  flagged: { row: ONE, flags: null },
  per_point: (values) => {
    const L = twoFluxes(values) ? CALLEN_2X2 : AS_WRITTEN;
    return {
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
      L,
      u_L: L,
      N: "W K^-1",
      u_N: "W K^-1",
    };
  },
};
