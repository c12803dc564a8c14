/**
 * The display formatting module against worked examples. Sources:
 * - GUM: JCGM 100:2008, Evaluation of measurement data — Guide to the expression
 *   of uncertainty in measurement, §7.2.2 (the four ways to state m_S = 100.021 47 g
 *   with u_c = 0.35 mg) and §7.2.6 (10.057 62 Ω with u_c = 27 mΩ rounds to 10.058 Ω).
 *   Quoted from memory of the Guide's text.
 * - SI Brochure: BIPM, The International System of Units, 9th ed. (2019), Table 7
 *   (prefixes), §5.4.3 (space between number and unit), §5.4.4 (digit groups of three,
 *   "43 279.168 29", no lone fourth digit split off).
 * All comparisons are exact string equalities: formatting has no tolerance.
 */
import { describe, expect, test } from "vitest";
import {
  displayUnitFor,
  groupDigits,
  matrixText,
  numberText,
  parseWrittenUnit,
  prefixExponentFor,
  quantityText,
  roundToUncertainty,
  SI_PREFIXES,
  valueWithUncertaintyText,
} from "../../../src/report/format/index.ts";
import { BOLTZMANN, ELEMENTARY_CHARGE } from "../../../src/physics/constants.ts";

const T = "\u202f"; // the thin (narrow no-break) space
const plain = (s: string) => s.replaceAll(T, " ");

describe("roundToUncertainty (GUM §7.2.2, §7.2.6)", () => {
  test("m_S = 100.021 47 g with u_c = 0.35 mg is printed (100.021 47 ± 0.000 35) g", () => {
    expect(roundToUncertainty(100.02147, 0.00035)).toEqual({ value: "100.02147", uncertainty: "0.00035", negative: false, exponent: 0 });
    expect(plain(valueWithUncertaintyText(100.02147, 0.00035))).toBe("100.021 47 ± 0.000 35");
  });

  test("10.057 62 Ω with u_c = 27 mΩ rounds to 10.058 Ω", () => {
    expect(roundToUncertainty(10.05762, 0.027)).toEqual({ value: "10.058", uncertainty: "0.027", negative: false, exponent: 0 });
  });

  test("the uncertainty keeps two significant digits and the value follows it, trailing zeros kept", () => {
    // 0.0995 rounds to 0.10: the second digit moves one place left (exact decimal arithmetic).
    expect(plain(valueWithUncertaintyText(1.2, 0.0995))).toBe("1.20 ± 0.10");
    expect(plain(valueWithUncertaintyText(-0.35645695, 0.0010835))).toBe("−0.3565 ± 0.0011");
    expect(plain(valueWithUncertaintyText(1234.4, 27))).toBe("1234 ± 27");
    expect(plain(valueWithUncertaintyText(1234.4, 270))).toBe("1230 ± 270");
  });

  test("very small or large pairs share one power of ten", () => {
    expect(plain(valueWithUncertaintyText(3.5645e-6, 1.08e-7))).toBe("(3.56 ± 0.11) × 10⁻⁶");
  });
});

describe("SI prefixes (SI Brochure 9th ed., Table 7)", () => {
  test("the table runs from yocto (10⁻²⁴) to yotta (10²⁴) in steps of 10³, with µ as the micro sign", () => {
    expect(SI_PREFIXES.map((p) => p.symbol).join(" ")).toBe("y z a f p n µ m  k M G T P E Z Y");
    expect(SI_PREFIXES.map((p) => p.exponent)).toEqual([-24, -21, -18, -15, -12, -9, -6, -3, 0, 3, 6, 9, 12, 15, 18, 21, 24]);
  });

  test("the prefix puts the mantissa in [1, 1000), also at exact powers of ten", () => {
    expect(prefixExponentFor(1e-15)).toBe(-15);
    expect(prefixExponentFor(999e-15)).toBe(-15);
    expect(prefixExponentFor(1e-12)).toBe(-12);
    expect(prefixExponentFor(2.57e-20)).toBe(-21);
    expect(prefixExponentFor(0)).toBe(0);
  });

  test("quantities take the prefix of their size: 0.12 K is 120 mK, 2.443 × 10⁻⁸ W Ω K⁻² is 24.43 nW Ω K⁻²", () => {
    expect(plain(quantityText(0.12, "temperature"))).toBe("120 mK");
    expect(plain(quantityText(1.2, "temperature"))).toBe("1.2 K");
    expect(plain(quantityText(2.443004509e-8, "lorenz_number"))).toBe("24.43 nW Ω K⁻²");
    expect(plain(quantityText(1e-6, "time"))).toBe("1 µs");
    expect(plain(quantityText(1.79047307e-6, "conductance"))).toBe("1.79 µS");
    expect(plain(quantityText(2.75433526e-13, "thermal_conductance"))).toBe("275.4 fW/K");
  });

  test("energies follow the dataset's unit family; μ_A − μ_B = 3.204 × 10⁻²⁴ J is 20 µeV", () => {
    // 3.204e-24 J / 1.602176634e-19 J/eV = 1.99977e-5 eV.
    expect(plain(quantityText(3.204e-24, "chemical_potential", { energyUnit: "meV" }))).toBe("19.998 µeV".replace("19.998", "20"));
    expect(plain(quantityText(3.204e-24, "chemical_potential", { energyUnit: "J" }))).toBe("3.204 yJ");
  });

  test("an affinity a_Q = 4.8286 × 10²² 1/J is 7.736 per meV... shown per eV with the prefix in the denominator", () => {
    // 4.828647e22 /J × 1.602176634e-19 J/eV = 7736.3 /eV = 7.736 /meV.
    const u = displayUnitFor("affinity", 4.828647010693277e22, { energyUnit: "meV" });
    expect(u.symbol).toBe("1/meV");
    expect(plain(quantityText(4.828647010693277e22, "affinity", { energyUnit: "meV" }))).toBe("7.736 1/meV");
  });

  test("a heat current in an eV-unit dataset is shown in eV/s with a prefix; in a joule dataset in watts", () => {
    expect(plain(quantityText(2.572294585886787e-20, "heat_current", { energyUnit: "meV" }))).toBe("160.5 meV/s");
    expect(plain(quantityText(2.572294585886787e-20, "heat_current", { energyUnit: "J" }))).toBe("25.72 zW");
  });

  test("without a declared energy unit (coefficient tables are SI) a heat current stays in watts", () => {
    // 1.6 fW = 10 keV/s; the electronvolt form would need a kilo- or mega- prefix that reads as a particle energy.
    expect(plain(quantityText(1.602176634e-15, "heat_current"))).toBe("1.602 fW");
  });

  test("display: choices override the automatic unit", () => {
    expect(plain(quantityText(0.12, "temperature", { overrides: { temperature: "K" } }))).toBe("0.12 K");
    expect(plain(quantityText(3.204e-24, "energy", { overrides: { energy: "meV" } }))).toBe("0.02 meV");
    // e²/h = 3.874 045 86 × 10⁻⁵ S (exact from e and h, SI 2019): 7.748 × 10⁻⁵ S is 2 e²/h.
    expect(plain(quantityText(7.748091729e-5, "conductance", { overrides: { conductance: "e2/h" } }))).toBe("2 e²/h");
    expect(plain(quantityText(1.380649e-23 * 0.3, "energy", { overrides: { energy: "kB K" } }))).toBe("0.3 k_B K");
    void BOLTZMANN;
    void ELEMENTARY_CHARGE;
  });

  test("one prefix for a whole matrix, picked from its largest entry", () => {
    const m = matrixText([[2.1e-13, 3e-15], [3e-15, 9e-14]], "thermal_conductance");
    expect(m.unit.symbol).toBe("fW/K");
    expect(m.rows.map((r) => r.map(plain))).toEqual([["210", "3"], ["3", "90"]]);
  });
});

describe("typography (SI Brochure §5.4)", () => {
  test("digits are grouped by threes with a thin space, a lone fourth digit is not split off", () => {
    expect(plain(groupDigits("43279.16829"))).toBe("43 279.168 29");
    expect(groupDigits("1234.1234")).toBe("1234.1234");
  });

  test("numbers never come out in e-notation: powers of ten are raised, the minus is a true minus", () => {
    expect(plain(numberText(6.69e-4))).toBe("6.69 × 10⁻⁴");
    expect(plain(numberText(1.819e22))).toBe("1.819 × 10²²");
    expect(plain(numberText(-0.2793133))).toBe("−0.2793");
    expect(plain(numberText(5e-4))).toBe("5 × 10⁻⁴");
    expect(plain(numberText(1e-137))).toBe("10⁻¹³⁷");
    expect(plain(numberText(32625.15))).toBe("32 630");
    expect(numberText(Number.NaN)).toBe("—");
  });
});

describe("written units", () => {
  test("units the checks write are understood with their SI factor; unknown ones are not", () => {
    expect(parseWrittenUnit("µV")).toEqual({ quantity: "voltage", si: 1e-6 });
    expect(parseWrittenUnit("1/meV")).toEqual({ quantity: "affinity", si: 1 / ELEMENTARY_CHARGE * 1e3 });
    expect(parseWrittenUnit("meV/s")?.quantity).toBe("heat_current");
    expect(parseWrittenUnit("W Ω K⁻²")?.quantity).toBe("lorenz_number");
    expect(parseWrittenUnit("furlong")).toBeUndefined();
  });
});
