import { describe, it, expect } from "vitest";
import { positivity, smallestNormalisedEigenvalue } from "../../src/checks/positivity/positivity.ts";
import { renderEquation } from "../../src/report/equations.ts";
import { positivityUnits } from "../../src/checks/positivity/units.ts";
import { valueUnitsOf } from "../../src/checks/valueUnits.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { runCheck, type TableSpecInput } from "./coefficientFixtures.ts";

const onsager = (rows: number[][], withU = true): TableSpecInput => ({
  form: "onsager",
  header: withU ? ["Vg", "L11", "L12", "L21", "L22", "u_L11", "u_L12", "u_L21", "u_L22"] : ["Vg", "L11", "L12", "L21", "L22"],
  rows,
  dataset: "    temperature: { value: 1.0 }\n    point: [Vg]",
});

describe("smallestNormalisedEigenvalue", () => {
  it("is 1 − |r| for a 2×2 symmetric part (exact), whatever the units of the fluxes", () => {
    // Ls12 = (L12 + L21)/2 = 3e-9, √(L11 L22) = √(4e-5 · 9e-13) = 6e-9 → r = 0.5.
    expectClose(smallestNormalisedEigenvalue([[4e-5, 2e-9], [4e-9, 9e-13]]), 0.5, { rtol: 1e-12, source: "exact: eigenvalues 1 ± r" });
  });

  it("drops to −1 or below when a diagonal entry is negative", () => {
    expect(smallestNormalisedEigenvalue([[-1, 0], [0, 2]])).toBe(-1);
  });
});

describe("positivity", () => {
  it("passes a positive definite sweep and reports min_eigenvalue and points (contract)", async () => {
    const rows = [0, 1, 2, 3].map((k) => [k, 1, 0.2 + 0.1 * k, 0.2 + 0.1 * k, 1, 0.001, 0.001, 0.001, 0.001]);
    const r = await runCheck(positivity, onsager(rows));
    expect(r.status).toBe("pass");
    expect(r.values.points).toBe(4);
    expectClose(r.values.min_eigenvalue as number, 1 - 0.5, { rtol: 1e-12, source: "exact: 1 − |r| with r = 0.5 at Vg = 3" });
  });

  it("propagates uncertainties by Monte Carlo in agreement with first-order propagation for small u", async () => {
    // λ = 1 − r, r = Ls12/√(L11 L22); at L11 = L22 = 1, r = 0.4: ∂λ/∂L12 = ∂λ/∂L21 = −1/2, ∂λ/∂L11 = ∂λ/∂L22 = r/2.
    // u = 0.002 per entry → u(λ) = 0.002·√(2·(1/4) + 2·(0.04)) = 0.001523 (GUM, JCGM 100:2008 eq. 10).
    const r = await runCheck(positivity, onsager([[0, 1, 0.4, 0.4, 1, 0.002, 0.002, 0.002, 0.002]]));
    const perPoint = r.values.per_point as { u: number }[];
    // 2000 draws: relative se of an sd ≈ 1/√(2·2000) = 1.6 %; allow 5 % (3 se) plus curvature.
    expectClose(perPoint[0].u, 0.002 * Math.sqrt(0.5 + 0.08), { rtol: 0.05, source: "first-order propagation (GUM); Monte Carlo with 2000 draws" });
  });

  it("fails a set that violates positivity only through the broken-time-reversal bound K ≥ (L12 − L21)²/(4 G T³)", async () => {
    // T = 1 K, G = 10 µS, S(B) = 300 µV/K, Π(B) = 100 µV: L12 − L21 = G T (S T − Π) = 2e-9 A K, bound = 1e-13 W/K.
    // K = 0.05 pW/K > 0 and K + G S Π = 0.35 pW/K > 0, G > 0: every diagonal test passes, only the bound is broken
    // (det Ls = 3.5e-18 − 4e-18 < 0). The −B rows obey Onsager–Casimir: S(−B) = Π(B)/T, Π(−B) = T S(B).
    const t: TableSpecInput = {
      form: "thermoelectric",
      header: ["Vg", "B", "G", "S", "Pi", "K", "u_G", "u_S", "u_Pi", "u_K"],
      rows: [
        [0, 0.5, 10, 300, 100, 0.05, 0.01, 0.3, 0.1, 0.0005],
        [0, -0.5, 10, 100, 300, 0.05, 0.01, 0.1, 0.3, 0.0005],
      ],
      dataset: "    temperature: { value: 1.0 }\n    field: { column: B }\n    point: [Vg]\n    units: { G: uS, S: uV/K, Pi: uV, K: pW/K }",
    };
    const r = await runCheck(positivity, t);
    expect(r.status).toBe("fail");
    const pp = r.values.per_point as { K: number; K_bound: number; flags: string[]; min_eigenvalue: number }[];
    expectClose(pp[0].K_bound, 1e-13, { rtol: 1e-9, source: "exact: (2e-9)²/(4·1e-5·1)" });
    expect(pp[0].K).toBeGreaterThan(0);
    expect(pp[0].flags).toEqual(["K below the broken-time-reversal bound (L12 − L21)²/(4 G T³)"]);
    // λ = 1 − Ls12/√(L11 L22) = 1 − 2e-9/√(1e-5·3.5e-13) = 1 − 2/√3.5 (exact).
    expectClose(pp[0].min_eigenvalue, 1 - 2 / Math.sqrt(3.5), { rtol: 1e-9, source: "exact construction" });
  });

  it("fails and names a negative conductance G < 0", async () => {
    const t: TableSpecInput = {
      form: "thermoelectric",
      header: ["G", "S", "Pi", "K", "u_G", "u_S", "u_Pi", "u_K"],
      rows: [[-5, 10, 10, 1, 0.1, 0.1, 0.1, 0.01]],
      dataset: "    temperature: { value: 1.0 }\n    units: { G: uS, S: uV/K, Pi: uV, K: pW/K }",
    };
    const r = await runCheck(positivity, t);
    expect(r.status).toBe("fail");
    expect((r.values.flagged as { flags: string[] }[])[0].flags).toContain("G < 0");
    expect(r.values.min_eigenvalue as number).toBeLessThanOrEqual(-1);
  });

  it("is inconclusive, not pass, on an underpowered set near the boundary", async () => {
    // r = 0.95 → λ = 0.05; u = 0.05 per entry gives u(λ) ≈ 0.05·√(0.5 + 2·0.95²/4) ≈ 0.048, so λ − 1.645 u < 0.
    const r = await runCheck(positivity, onsager([[0, 1, 0.95, 0.95, 1, 0.05, 0.05, 0.05, 0.05]]));
    expect(r.status).toBe("inconclusive");
    expect(r.reason).toMatch(/^The 95 % lower bound of the smallest normalised eigenvalue is not above zero at Vg = 0 \(row 2\) \(λ = 0\.05 ± 0\.0\d+; uncertainty (\d\.\d+)× too large: about (\d\.\d+)× as many repeats averaged\)\./);
    // The repeats needed are the square of the uncertainty factor (uncertainties fall as 1/√repeats), rounded up.
    const [, factor, repeats] = /uncertainty (\d\.\d+)× too large: about (\d\.\d+)×/.exec(r.reason!)!;
    expect(Number(repeats)).toBeGreaterThanOrEqual(Number(factor) ** 2 - 0.1);
    expect(Number(repeats)).toBeLessThanOrEqual((Number(factor) + 0.05) ** 2 + 0.1);
  });

  it("cannot pass without uncertainties", async () => {
    const r = await runCheck(positivity, onsager([[0, 1, 0.1, 0.1, 1]], false));
    expect(r.status).toBe("inconclusive");
    expect(r.reason).toBe("Without u_ columns neither a violation nor positivity can be established at any confidence; add a standard uncertainty for every coefficient.");
  });

  it("handles a 3×3 matrix and renders its equations", async () => {
    const r = await runCheck(positivity, {
      form: "onsager",
      header: ["L11", "L12", "L13", "L21", "L22", "L23", "L31", "L32", "L33", "u_L11", "u_L12", "u_L13", "u_L21", "u_L22", "u_L23", "u_L31", "u_L32", "u_L33"],
      rows: [[2, -1, 0, -1, 2, -1, 0, -1, 2, ...new Array(9).fill(0.001)]],
      dataset: "    temperature: { value: 1.0 }",
    });
    // Normalised: tridiagonal (1, −1/2): eigenvalues 1 − cos(kπ/4): smallest 1 − √2/2 (exact).
    expectClose(r.values.min_eigenvalue as number, 1 - Math.SQRT1_2, { rtol: 1e-12, source: "exact spectrum of the (−1/2, 1, −1/2) tridiagonal matrix" });
    expect(r.status).toBe("pass");
    for (const tex of r.equations) expect(renderEquation(tex)).toContain("katex");
    // Beyond two fluxes the entries' units are not named, so there is no matrix in entropy units.
    expect(r.tables.map((t) => t.id)).toEqual(["points"]);
    expect((r.values.per_point as { N: unknown }[])[0].N).toBeNull();
  });

  it("shows each row's matrix in entropy units N = D L D, all in W/K, with uncertainties scaled exactly", async () => {
    // A Wiedemann–Franz conductor at T = 0.5 K: G = 10 µS, S = Π = 0, K = L0 G T with the Sommerfeld
    // L0 = π² k_B²/(3e²) = 2.443 × 10⁻⁸ W Ω K⁻² (exact from k_B and e): K = 1.2216 × 10⁻¹³ W/K.
    // Then N11 = (k_B/e)² G T is 3/π² of N22 = K, and N12 = N21 = 0 (see test/physics/thermoelectric.test.ts).
    const L0 = (Math.PI ** 2 / 3) * (1.380649e-23 / 1.602176634e-19) ** 2;
    const K = L0 * 10e-6 * 0.5; // W/K
    const r = await runCheck(positivity, {
      form: "thermoelectric",
      header: ["Vg", "G", "S", "Pi", "K", "u_G", "u_S", "u_Pi", "u_K"],
      rows: [[0, 10, 0, 0, K * 1e12, 0.1, 0.5, 0.2, K * 1e12 * 0.02]],
      dataset: "    temperature: { value: 0.5 }\n    point: [Vg]\n    units: { G: uS, S: uV/K, Pi: uV, K: pW/K }",
    });
    const pp = (r.values.per_point as { N: number[][]; u_N: number[][]; L: number[][] }[])[0];
    expectClose(pp.N[0][0] / pp.N[1][1], 3 / Math.PI ** 2, { rtol: 1e-12, source: "exact: (k_B/e)²/L0 = 3/π²" });
    expect(pp.N[0][1]).toBe(0);
    expectClose(pp.L[0][0], 10e-6 * 0.5, { rtol: 1e-12, source: "Callen: L11 = G T" });
    // u(N22) = u(L22)/T² = √(u_K² + …) with S = Π = 0: exactly u_K (first order, src/ingest/coefficients.ts).
    expectClose(pp.u_N[1][1], K * 0.02, { rtol: 1e-9, source: "exact: u(K + G S Π) = u(K) at S = Π = 0" });
    const table = r.tables.find((t) => t.id === "entropy-units")!;
    expect(table.columns.map((c) => c.label)).toEqual(["Operating point", "T", "N11", "u(N11)", "N12", "u(N12)", "N21", "u(N21)", "N22", "u(N22)", "Unit"]);
    expect(table.rows[0].unit).toBe("W/K");
    expect(table.rows[0].N22).toBe(pp.N[1][1]);
    expect(valueUnitsOf(r.values, positivityUnits).per_point).toMatchObject({ N: "W K^-1", L: [["S K", "A K"], ["A K", "W K"]] });
  });
});
