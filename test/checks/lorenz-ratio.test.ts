import { describe, it, expect } from "vitest";
import { lorenzRatio } from "../../src/checks/lorenz-ratio/lorenzRatio.ts";
import { LORENZ_SOMMERFELD } from "../../src/physics/constants.ts";
import { renderEquation } from "../../src/report/equations.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { runCheck } from "./coefficientFixtures.ts";

type Pt = { ratio: number; lorenz_number: number };

describe("lorenz-ratio", () => {
  it("uses the Sommerfeld value L0 = (π²/3)(k_B/e)² = 2.443004509073666e-8 W Ω K⁻² from CODATA 2018", () => {
    // k_B = 1.380649e-23 J/K and e = 1.602176634e-19 C are exact (Tiesinga et al., RMP 93, 025010 (2021)); L0 computed.
    expectClose(LORENZ_SOMMERFELD, 2.443004509073666e-8, { rtol: 1e-15, source: "computed from the exact CODATA 2018 constants" });
    // Trap: CODATA 2014 constants give a value ~2e-7 relative away; a 1e-9 tolerance tells them apart.
    const old = (Math.PI ** 2 / 3) * (1.38064852e-23 / 1.6021766208e-19) ** 2;
    expect(Math.abs(old / LORENZ_SOMMERFELD - 1)).toBeGreaterThan(1e-9);
  });

  it("gives ratio 1 for a conductor obeying Wiedemann–Franz, K = L0 G T", async () => {
    const G = 7.748091729863651e-5; // G0 = 2e²/h (CODATA 2018, computed)
    const r = await runCheck(lorenzRatio, {
      form: "thermoelectric",
      header: ["G", "S", "Pi", "K"],
      rows: [[G, 0, 0, LORENZ_SOMMERFELD * G * 0.1]],
      dataset: "    temperature: { value: 0.1 }",
    });
    expect(r.status).toBe("info");
    expectClose((r.values.per_point as Pt[])[0].ratio, 1, { rtol: 1e-14, source: "exact construction" });
  });

  it("reproduces handbook Lorenz numbers of metals at 300 K from κ and ρ (geometry cancels)", async () => {
    // κ (W/m K) at 300 K: Ho, Powell & Liley, J. Phys. Chem. Ref. Data 1, 279 (1972), as reprinted in the CRC Handbook
    // (Ag, Cu, Au, Al table values seen; attribution from memory). ρ (1e-8 Ω m) at 300 K: Matula, J. Phys. Chem. Ref.
    // Data 8, 1147 (1979), CRC table "Electrical resistivity of pure metals" (300 K values from memory).
    // A 1 m × 1 m² bar: G = 1/ρ, K = κ. Expected L = κρ/T computed from these inputs.
    const metals: [string, number, number, number][] = [
      ["Cu", 401, 1.725, 2.306e-8],
      ["Ag", 429, 1.629, 2.329e-8],
      ["Au", 317, 2.271, 2.4e-8],
      ["Al", 237, 2.733, 2.159e-8],
    ];
    const r = await runCheck(lorenzRatio, {
      form: "thermoelectric",
      header: ["k", "G", "S", "Pi", "K"],
      rows: metals.map(([, kappa, rho], i) => [i, 1 / (rho * 1e-8), 0, 0, kappa]),
      dataset: "    temperature: { value: 300 }\n    point: [k]",
    });
    const pts = r.values.per_point as Pt[];
    metals.forEach(([name, , , L], i) => {
      // Expected values are quoted to 4 digits: rtol 5e-4.
      expectClose(pts[i].lorenz_number, L, { rtol: 5e-4, source: `${name}: κρ/T from the handbook inputs, 4 digits` });
    });
    // Kittel, Introduction to Solid State Physics, ch. 6, Table 5 (experimental L at 0 °C, 1e-8 W Ω K⁻²): Cu 2.23,
    // Ag 2.31, Au 2.35. Our 300 K values lie within 5 % of them (L changes slowly with T near room temperature).
    const kittel: Record<string, number> = { Cu: 2.23e-8, Ag: 2.31e-8, Au: 2.35e-8 };
    metals.slice(0, 3).forEach(([name], i) => expectClose(pts[i].lorenz_number, kittel[name], { rtol: 0.05, source: `Kittel ch. 6 Table 5, ${name} at 0 °C` }));
    // Ratios 0.884 (Al) and 0.982 (Au) as computed from the same inputs (κρ/T over L0, 3 digits).
    expect(r.summary).toBe("K/(G T) ranges from 0.884 L0 to 0.982 L0 over 4 rows (L0 = 2.443e-8 W Ω K⁻²); a reference value, not a law.");
  });

  it("never gives a verdict, even far from L0 (step transmission: 0.415839 L0)", async () => {
    // Landauer step at x0 = 0: K/(GT) = (π²/3 − 4 ln²2)(k_B/e)² = 0.415839 L0 (Sivan & Imry 1986 formalism; computed).
    const ratio = 1 - (12 * Math.LN2 ** 2) / Math.PI ** 2;
    const r = await runCheck(lorenzRatio, {
      form: "thermoelectric",
      header: ["G", "S", "Pi", "K"],
      rows: [[1, 0, 0, ratio * LORENZ_SOMMERFELD]],
      dataset: "    temperature: { value: 1 }",
    });
    expect(r.status).toBe("info");
    expectClose((r.values.per_point as Pt[])[0].ratio, 0.415839, { atol: 5e-7, source: "computed step-transmission value" });
    for (const tex of r.equations) expect(renderEquation(tex)).toContain("katex");
  });
});
