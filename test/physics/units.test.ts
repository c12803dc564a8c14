import { describe, it, expect } from "vitest";
import { parseUnit, toSI } from "../../src/physics/units.ts";
import { UnitError } from "../../src/errors.ts";

describe("parseUnit and toSI", () => {
  it("converts SI prefixes exactly to the correctly rounded SI double (SI Brochure 9th ed., Table 7)", () => {
    const at = "audit.yaml datasets[0].units.S";
    expect(toSI(2.5, parseUnit("uV/K", "S", at))).toBe(2.5e-6);
    expect(toSI(2.5, parseUnit("µV/K", "S", at))).toBe(2.5e-6); // micro sign U+00B5
    expect(toSI(2.5, parseUnit("μV/K", "S", at))).toBe(2.5e-6); // Greek mu U+03BC
    expect(toSI(-86.17333262145, parseUnit("uV/K", "S", at))).toBe(-8.617333262145e-5);
    expect(toSI(3.1, parseUnit("nS", "G", at))).toBe(3.1e-9);
    expect(toSI(7, parseUnit("pW/K", "K", at))).toBe(7e-12);
    expect(toSI(12, parseUnit("fW/K", "K", at))).toBe(1.2e-14);
    expect(toSI(0.3, parseUnit("mV", "Pi", at))).toBe(3e-4);
    expect(toSI(1.5, parseUnit("kS", "G", at))).toBe(1500);
    expect(toSI(4, parseUnit(" S ", "G", at))).toBe(4);
    expect(toSI(2, parseUnit("nA K", "L12", at))).toBe(2e-9);
  });

  it("refuses an unknown unit with the key path and the accepted units", () => {
    expect(() => parseUnit("uV/C", "S", "audit.yaml datasets[0].units.S")).toThrow(UnitError);
    expect(() => parseUnit("uV/C", "S", "audit.yaml datasets[0].units.S")).toThrow(
      'audit.yaml datasets[0].units.S: unknown unit "uV/C" for the Seebeck coefficient S; accepted: V/K with an optional prefix f, p, n, u (or µ), m or k, e.g. uV/K',
    );
    expect(() => parseUnit("MS", "G", "audit.yaml datasets[1].units.G")).toThrow(
      'audit.yaml datasets[1].units.G: unknown unit "MS" for the electrical conductance G; accepted: S or A/V with an optional prefix f, p, n, u (or µ), m or k, e.g. uS',
    );
  });
});
