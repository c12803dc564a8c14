/**
 * Thermal conductances in units of the thermal conductance quantum
 * g₀ = π² k_B² T/(3h), the conductance of one ballistic channel (Pendry,
 * J. Phys. A 16, 2161 (1983); Schwab, Henriksen, Worlock & Roukes, Nature 404,
 * 974 (2000)). With the exact k_B = 1.380 649 × 10⁻²³ J/K and
 * h = 6.626 070 15 × 10⁻³⁴ J s (CODATA 2018: Tiesinga, Mohr, Newell & Taylor,
 * Rev. Mod. Phys. 93, 025010 (2021)), g₀/T = 9.464 311 516 386 64 × 10⁻¹³ W/K²:
 * computed with Python's fractions module from the exact decimals and π to
 * double precision, independently of this code.
 */
import { describe, expect, test } from "vitest";
import { displayContextFor } from "../../../src/report/format/displayContext.ts";
import { displayUnitFor, parseDisplayChoice, quantityText, THERMAL_CONDUCTANCE_QUANTUM_PER_KELVIN } from "../../../src/report/format/index.ts";
import { displaySchema } from "../../../src/config/displaySchema.ts";
import { expectClose } from "../../helpers/expectClose.ts";

const plain = (s: string) => s.replaceAll("\u202f", " ");

describe("the thermal conductance quantum g₀", () => {
  test("g₀/T = π² k_B²/(3h) = 9.464 × 10⁻¹³ W/K² from the exact constants", () => {
    // Two roundings of double arithmetic apart at most: rtol 1e-15.
    expectClose(THERMAL_CONDUCTANCE_QUANTUM_PER_KELVIN, 9.46431151638664e-13, { rtol: 1e-15, source: "π² k_B²/(3h), exact CODATA 2018 k_B and h, computed independently" });
  });

  test("display: thermal_conductance: g0 shows K in units of g₀ at the numbers' temperature", () => {
    // One spin-degenerate ballistic channel carries 2 g₀: 1.892 862 303 × 10⁻¹² W/K at 1 K (computed from the same constants).
    expect(plain(quantityText(1.892862303e-12, "thermal_conductance", { overrides: { thermal_conductance: "g0" }, temperature: 1 }))).toBe("2 g₀");
    // At 1.2 K one quantum is 1.135 717 × 10⁻¹² W/K, so 2.75 × 10⁻¹³ W/K is 0.2421 g₀ (four digits, the default).
    expect(plain(quantityText(2.75e-13, "thermal_conductance", { overrides: { thermal_conductance: "g₀" }, temperature: 1.2 }))).toBe("0.2421 g₀");
  });

  test("without one temperature for the numbers, g₀ is not defined and pW/K is shown instead", () => {
    expect(plain(quantityText(1.892862303e-12, "thermal_conductance", { overrides: { thermal_conductance: "g0" } }))).toBe("1.893 pW/K");
    expect(displayUnitFor("thermal_conductance", 1e-12, { overrides: { thermal_conductance: "g0" }, temperature: Number.NaN }).symbol).toBe("pW/K");
  });

  test("audit.yaml's display block accepts g0 (and g₀) for thermal conductance only", () => {
    expect(parseDisplayChoice("thermal_conductance", "g0")).toEqual({ base: "g0", exponent: 0 });
    expect(displaySchema.safeParse({ thermal_conductance: "g0" }).success).toBe(true);
    expect(displaySchema.safeParse({ thermal_conductance: "g₀" }).success).toBe(true);
    const refused = displaySchema.safeParse({ conductance: "g0" });
    expect(refused.success).toBe(false);
  });

  test("a coefficient dataset's one temperature is taken from its checks' per-point values", () => {
    const doc = {
      datasets: [{ id: "sweep", file: "data/c.csv", sha256: "0".repeat(64), rows: 2 }],
      display: { thermal_conductance: "g0" },
      checks: [{ check: "figures-of-merit", dataset: "sweep", values: { per_point: [{ T: 1.2 }, { T: 1.2 }] } }, { check: "lorenz-ratio", dataset: "other", values: { per_point: [{ T: 4 }] } }],
    } as unknown as Parameters<typeof displayContextFor>[0];
    expect(displayContextFor(doc, "sweep").temperature).toBe(1.2);
    // Two temperatures among the points: no single g₀.
    const mixed = { ...doc, checks: [{ check: "positivity", dataset: "sweep", values: { per_point: [{ T: 1.2 }, { T: 4.2 }] } }] } as unknown as Parameters<typeof displayContextFor>[0];
    expect(displayContextFor(mixed, "sweep").temperature).toBeUndefined();
  });
});
