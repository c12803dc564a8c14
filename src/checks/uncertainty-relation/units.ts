import { ONE, type ValueUnits } from "../valueUnits.ts";

/** Var(x)⟨Σ⟩/⟨x⟩² is unit-free for every current, and ⟨Σ⟩ is in units of k_B. */
export const uncertaintyRelationUnits: ValueUnits = {
  ratio: ONE,
  mean_sigma: ONE,
};
