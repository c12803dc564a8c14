import { describe, it, expect } from "vitest";
import { figuresOfMerit } from "../../src/checks/figures-of-merit/figuresOfMerit.ts";
import { renderEquation } from "../../src/report/equations.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { runCheck } from "./coefficientFixtures.ts";

type Fig = Record<string, number | null> & { u: Record<string, number> | null };

describe("figures-of-merit", () => {
  it("gives ZT = 0.800 for a Bi2Te3-like device at 300 K through the declared units", async () => {
    // 1 cm cube: G = σ·A/l = 1e5 S/m · 1e-2 m = 1000 S, K = κ·1e-2 m = 0.015 W/K, S = 200 µV/K (typical values,
    // Snyder & Toberer, Nat. Mater. 7, 105 (2008)); ZT = S²GT/K = 0.800 (computed). Π = T S (Kelvin).
    const r = await runCheck(figuresOfMerit, {
      form: "thermoelectric",
      header: ["G", "S", "Pi", "K"],
      rows: [[1, 200, 60, 15]],
      dataset: "    temperature: { value: 300 }\n    units: { G: kS, S: uV/K, Pi: mV, K: mW/K }",
    });
    expect(r.status).toBe("info");
    const p = (r.values.per_point as Fig[])[0];
    expectClose(p.ZT as number, 0.8, { rtol: 1e-12, source: "computed: (2e-4)²·1000·300/0.015" });
    expectClose(p.power_factor as number, 4e-5, { rtol: 1e-12, source: "G S² = 1000·(2e-4)²" });
    // η_max/η_C = (√1.8 − 1)/(√1.8 + 1) (Ioffe); η(P_max)/η_C = 0.8/(2·2.8) (Van den Broeck 2005).
    expectClose(p.eta_max_rel as number, (Math.sqrt(1.8) - 1) / (Math.sqrt(1.8) + 1), { rtol: 1e-12, source: "linear-response formula" });
    expectClose(p.eta_max_power_rel as number, 0.8 / 5.6, { rtol: 1e-12, source: "ZT/(2(ZT+2))" });
  });

  it("gives η_max/η_C = 0.171573 and η(P_max)/η_C = 1/6 at ZT = 1", async () => {
    // G = 1 S, S = 1 V/K, T = 1 K, Π = T S, K = 1 W/K → ZT = 1.
    const r = await runCheck(figuresOfMerit, { form: "thermoelectric", header: ["G", "S", "Pi", "K"], rows: [[1, 1, 1, 1]], dataset: "    temperature: { value: 1 }" });
    const p = (r.values.per_point as Fig[])[0];
    expectClose(p.eta_max_rel as number, 0.171573, { atol: 5e-7, source: "ZT = 1 → 0.171573 (= 3 − 2√2)" });
    expectClose(p.eta_max_power_rel as number, 1 / 6, { rtol: 1e-12, source: "ZT = 1 → η_C/6 (Van den Broeck 2005)" });
  });

  it("uses x and y with a field and meets the Benenti–Saito–Casati bounds at the window edge", async () => {
    // L = [[1.5, 1], [2, 1.5]] at +B: x = 0.5, det L = 0.25, y = 2/0.25 = 8 = h(0.5) → η_max/η_C = x² = 0.25,
    // η(P_max)/η_C = x²/(1+x²) = 0.2. At −B (Onsager–Casimir partner) x = 2, y = 8 → 1 and 0.8 (PRL 106, 230602 (2011)).
    const r = await runCheck(figuresOfMerit, {
      form: "onsager",
      header: ["B", "L11", "L12", "L21", "L22"],
      rows: [[1, 1.5, 1, 2, 1.5], [-1, 1.5, 2, 1, 1.5]],
      dataset: "    temperature: { value: 1 }\n    field: { column: B }",
    });
    const [plus, minus] = r.values.per_point as Fig[];
    expectClose(plus.x as number, 0.5, { rtol: 1e-15, source: "x = L12/L21" });
    expectClose(plus.y as number, 8, { rtol: 1e-12, source: "y = L12 L21/det L" });
    expectClose(plus.eta_max_rel as number, 0.25, { rtol: 1e-12, source: "BSC bound x² at x = 0.5" });
    expectClose(plus.eta_max_power_rel as number, 0.2, { rtol: 1e-12, source: "BSC bound x²/(1+x²) at x = 0.5" });
    expectClose(minus.eta_max_rel as number, 1, { rtol: 1e-12, source: "BSC bound 1 at x = 2" });
    expectClose(minus.eta_max_power_rel as number, 0.8, { rtol: 1e-12, source: "BSC bound 0.8 at x = 2" });
    for (const tex of r.equations) expect(renderEquation(tex)).toContain("katex");
    expect(r.plots[0].id).toBe("zt");
  });

  it("propagates uncertainties: u(ZT)/ZT ≈ √((u_G/G)² + (2u_S/S)² + (u_K/K)²) for small u", async () => {
    const r = await runCheck(figuresOfMerit, {
      form: "thermoelectric",
      header: ["G", "S", "Pi", "K", "u_G", "u_S", "u_Pi", "u_K"],
      rows: [[1, 1, 1, 1, 0.01, 0.01, 0.01, 0.01]],
      dataset: "    temperature: { value: 1 }",
    });
    const p = (r.values.per_point as Fig[])[0];
    // First order (GUM): √(1 + 4 + 1)·0.01 = 0.0245. Monte Carlo with 2000 draws: ~1.6 % se of an sd; allow 6 %.
    expectClose(p.u!.ZT, Math.sqrt(6) * 0.01, { rtol: 0.06, source: "first-order propagation (GUM, JCGM 100:2008)" });
  });

  it("is not applicable to a 3×3 matrix", async () => {
    const r = await runCheck(figuresOfMerit, {
      form: "onsager",
      header: ["L11", "L12", "L13", "L21", "L22", "L23", "L31", "L32", "L33"],
      rows: [[2, 0, 0, 0, 2, 0, 0, 0, 2]],
      dataset: "    temperature: { value: 1.0 }",
    });
    expect(r.status).toBe("not-applicable");
    expect(r.summary).toBe("Not applicable: figures of merit are defined for the two-flux charge–heat matrix, and this table has 3 fluxes.");
  });

  it("withholds ZT and the efficiencies at a row where positivity is significantly violated, and says why", async () => {
    // +B row: L = [[1, 2], [0.4, 1]], symmetric part off-diagonal 1.2 > √(1·1): λ_min = 1 − 1.2 = −0.2, twenty standard
    // uncertainties below zero at u = 0.01 (Onsager 1931: the symmetric part must be positive semi-definite). There
    // x = 5, y = 0.8/0.2 = 4 and x(√5 − 1)/(√5 + 1) = 1.91 > 1: an efficiency above Carnot, which the second law forbids
    // (Benenti, Saito & Casati, PRL 106, 230602 (2011)). The −B partner has the same symmetric part, also forbidden.
    // Rows at Vg = 1 obey it: L12 = 0.5, L21 = 0.3, λ_min = 0.6.
    const rows = [
      [0, 1, 1, 2, 0.4, 1, 0.01, 0.01, 0.01, 0.01],
      [0, -1, 1, 0.4, 2, 1, 0.01, 0.01, 0.01, 0.01],
      [1, 1, 1, 0.5, 0.3, 1, 0.01, 0.01, 0.01, 0.01],
      [1, -1, 1, 0.3, 0.5, 1, 0.01, 0.01, 0.01, 0.01],
    ];
    const r = await runCheck(figuresOfMerit, {
      form: "onsager",
      header: ["Vg", "B", "L11", "L12", "L21", "L22", "u_L11", "u_L12", "u_L21", "u_L22"],
      rows,
      dataset: "    temperature: { value: 1.0 }\n    field: { column: B }\n    point: [Vg]",
    });
    const pts = r.values.per_point as (Fig & { second_law: string; note?: string })[];
    expect(pts.map((p) => p.second_law)).toEqual(["violated", "violated", "ok", "ok"]);
    for (const p of pts.slice(0, 2)) {
      expect([p.ZT, p.eta_max_rel, p.eta_max_power_rel, p.y]).toEqual([null, null, null, null]);
      expect(p.note).toMatch(/^meaningless: positivity is significantly violated here \(λ_min = -0\.2; K below the broken-time-reversal bound \(L12 − L21\)²\/\(4 G T³\)\), so the second law forbids these coefficients$/);
    }
    expect(pts[2].ZT).not.toBeNull();
    expect(r.values.rows_violating_positivity).toEqual([2, 3]);
    expect(r.summary).toMatch(/At 2 rows \(Vg = 0, B = \+1 T \(row 2\); Vg = 0, B = -1 T \(row 3\)\) positivity is significantly violated, so ZT and the efficiencies there are meaningless \(the second law forbids them\) and are not reported\.$/);
    expect(r.tables[0].rows[0].second_law).toBe(pts[0].note);
  });
});
