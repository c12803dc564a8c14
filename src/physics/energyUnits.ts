import { BOLTZMANN, ELEMENTARY_CHARGE } from "./constants.ts";
import { UnitError } from "../errors.ts";

export type EnergyUnit = "J" | "eV" | "meV" | "ueV" | "µeV" | "kT";

/**
 * Joules per one unit of energy. `kT` means multiples of k_B times a stated
 * reference temperature (kelvin), which must then be given.
 */
export function joulesPerEnergyUnit(unit: EnergyUnit, referenceTemperature: number | undefined, where: string): number {
  switch (unit) {
    case "J":
      return 1;
    case "eV":
      return ELEMENTARY_CHARGE;
    case "meV":
      return 1e-3 * ELEMENTARY_CHARGE;
    case "ueV":
    case "µeV":
      return 1e-6 * ELEMENTARY_CHARGE;
    case "kT":
      if (referenceTemperature === undefined || !(referenceTemperature > 0)) {
        throw new UnitError(`${where}: energy_unit kT needs reference_temperature (kelvin), the T in k_B T`);
      }
      return BOLTZMANN * referenceTemperature;
  }
}
