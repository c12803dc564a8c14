import { describe, expect, it } from "vitest";
import { parseAuditDefinition } from "../../src/config/loadAudit.ts";
import { ConfigError } from "../../src/errors.ts";
import { thrownBy } from "../helpers/thrown.ts";
import { minimalAuditYaml } from "./minimalAudit.ts";

const valid = minimalAuditYaml();

const messageOf = (source: string) => thrownBy(ConfigError, () => parseAuditDefinition(source)).message;

describe("energy_unit", () => {
  it("refuses a unit in the wrong case and says which was meant (meV and MeV differ by 10⁹)", () => {
    expect(messageOf(valid.replace("energy_unit: meV", "energy_unit: mev"))).toBe(
      'audit.yaml:10 datasets[0].energy_unit: must be one of J, eV, meV, ueV, µeV, kT (did you mean meV? the case of a prefix matters: meV and MeV differ by 10⁹), found "mev"',
    );
    expect(messageOf(valid.replace("energy_unit: meV", "energy_unit: MeV"))).toContain("(did you mean meV?");
  });
});

describe("display", () => {
  it("accepts per-quantity display units and keeps them in the definition", () => {
    const def = parseAuditDefinition(`${valid}display: { temperature: mK, conductance: e2/h, energy: µeV, affinity: 1/meV }\n`);
    expect(def.display).toEqual({ temperature: "mK", conductance: "e2/h", energy: "µeV", affinity: "1/meV" });
  });

  it("names an unknown quantity with the nearest one, and a unit the quantity cannot take with the accepted ones", () => {
    expect(messageOf(`${valid}display:\n  temprature: mK\n`)).toBe(
      "audit.yaml:16 display.temprature: is not a quantity (did you mean temperature?): one of energy, affinity, heat_current, particle_current, temperature, chemical_potential, conductance, thermal_conductance, voltage, thermopower, power_factor, lorenz_number, time, field, entropy, entropy_density, energy_squared_rate, onsager_charge, onsager_mixed, onsager_heat, dimensionless",
    );
    expect(messageOf(`${valid}display:\n  temperature: MK\n`)).toBe(
      "audit.yaml:16 display.temperature: cannot show temperature in MK (did you mean mK?): one of auto, K, pK, nK, µK, mK",
    );
  });
});
