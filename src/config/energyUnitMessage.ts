import type { ZodErrorMap } from "zod";

/**
 * The message for an `energy_unit` that is not one of ours. A unit written in
 * the wrong case (`mev`, `MEV`) is never taken for one of them: meV and MeV
 * differ by 10⁹, so the case of a prefix is the unit's meaning. The message
 * says which one the user probably meant instead.
 */
export function energyUnitErrorMap(units: readonly string[]): ZodErrorMap {
  const list = units.join(", ");
  return (_issue, ctx) => {
    const found = ctx.data;
    if (typeof found !== "string") return { message: `must be one of ${list}` };
    const sameLetters = units.find((u) => u.toLowerCase() === found.toLowerCase());
    const hint = sameLetters ?? (found.toLowerCase() === "uev" || found === "μeV" ? "µeV" : undefined);
    return { message: `must be one of ${list}${hint ? ` (did you mean ${hint}? the case of a prefix matters: meV and MeV differ by 10⁹)` : ""}` };
  };
}
