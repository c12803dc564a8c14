import { ONE, TRANSFER_UNIT, type UnitSpec, type ValueUnits } from "../valueUnits.ts";

/**
 * Each identity is tested as a unit-free ratio. A current that is a fixed
 * multiple of another (Q = ε ΔN) names the factor, in the unit of the one
 * over the other (J for heat per particle).
 */
function currentUnits(key: string, entry: unknown): UnitSpec {
  const other = (entry as { same_test_as?: unknown })?.same_test_as;
  const own = TRANSFER_UNIT[key];
  const theirs = typeof other === "string" ? TRANSFER_UNIT[other] : undefined;
  const factor = own === undefined || theirs === undefined ? null : own === theirs ? ONE : own === ONE ? "J^-1" : "J";
  return { ratio: ONE, ci: ONE, p_value: ONE, p_holm: ONE, same_test_as: null, factor };
}

export const weightedIdentityUnits: ValueUnits = {
  currents: (values) => {
    const c = values.currents;
    return c && typeof c === "object" ? Object.fromEntries(Object.entries(c).map(([k, v]) => [k, currentUnits(k, v)])) : null;
  },
  independent_currents: null,
  effective_sample_size: ONE,
  tail_shape: ONE,
  resolved: null,
  realisations: ONE,
};
