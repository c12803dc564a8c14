// The diagonal of Onsager–Casimir reciprocity: L_ij(B) = ε_i ε_j L_ji(−B) at i = j reads L_ii(B) = L_ii(−B)
// (Onsager, Phys. Rev. 37, 405 (1931); Casimir, Rev. Mod. Phys. 17, 343 (1945)): every diagonal entry is even
// in the field. Tested in the same Holm family (Holm, Scand. J. Stat. 6, 65 (1979)) and with the same
// two-one-sided-tests margin rule (Schuirmann, J. Pharmacokinet. Biopharm. 15, 657 (1987)) as the off-diagonal pairs.
import { describe, it, expect } from "vitest";
import { reciprocity } from "../../src/checks/reciprocity/reciprocity.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { runCheck, type TableSpecInput } from "./coefficientFixtures.ts";

const T = 1.5;
const header = ["Vg", "B", "G", "S", "Pi", "K", "u_G", "u_S", "u_Pi", "u_K"];
const dataset = `    temperature: { value: ${T} }\n    field: { column: B }\n    point: [Vg]\n    units: { G: uS, S: uV/K, Pi: uV, K: pW/K }`;

/**
 * A field sweep in thermoelectric form that obeys Kelvin, Π(B) = T S(−B), with S(B) = S0 + s1 B (odd part s1);
 * G and K at +B multiplied by `gainPlus` (1: field-even). Relative uncertainty `rel` on every entry.
 */
function thermoelectricSweep(gainPlus: { G: number; K: number }, rel: number): TableSpecInput {
  const rows: number[][] = [];
  for (let k = 0; k < 5; k++) {
    const G0 = 8 + 2 * k; // µS
    const K0 = 3 + 0.5 * k; // pW/K
    const S0 = -25 + 7 * k; // µV/K
    for (const B of [0.8, -0.8]) {
      const S = S0 + 4 * B;
      const Pi = T * (S0 - 4 * B);
      const G = G0 * (B > 0 ? gainPlus.G : 1);
      const K = K0 * (B > 0 ? gainPlus.K : 1);
      rows.push([k, B, G, S, Pi, K, rel * G, 0.2, 0.2 * T, rel * K]);
    }
  }
  return { form: "thermoelectric", header, rows, dataset };
}

const onsagerHeader = ["Vg", "B", "L11", "L12", "L21", "L22", "u_L11", "u_L12", "u_L21", "u_L22"];
const onsagerField = "    temperature: { value: 1.0 }\n    field: { column: B }\n    point: [Vg]";

/** Onsager form, L12(B) = L21(−B) exactly; L11 at +B multiplied by `l11Plus`. */
function onsagerSweep(l11Plus: number, u: number): TableSpecInput {
  const rows: number[][] = [];
  for (let k = 0; k < 4; k++) {
    const a = 0.2 + 0.1 * k;
    for (const B of [0.5, -0.5]) rows.push([k, B, (B > 0 ? l11Plus : 1) * (2 + 0.3 * k), a + 0.1 * B, a - 0.1 * B, 1.5, u, u, u, u]);
  }
  return { form: "onsager", header: onsagerHeader, rows, dataset: onsagerField };
}

describe("reciprocity on the diagonal (L_ii even in B)", () => {
  it("fails a +B/−B set whose G and K are 20 % larger at +B, although the Kelvin pair holds", async () => {
    const r = await runCheck(reciprocity, thermoelectricSweep({ G: 1.2, K: 1.2 }, 0.005));
    expect(r.status).toBe("fail");
    expect(r.values.tested_relations).toEqual(["G(B) = G(−B)", "T S(B) = Π(−B)", "Π(B) = T S(−B)", "L22(B) = L22(−B)"]);
    expect(r.summary).toMatch(/^Onsager–Casimir reciprocity in Kelvin form is violated: 10 of 20 comparisons differ significantly after Holm's correction \(G\(B\) = G\(−B\), L22\(B\) = L22\(−B\)\)/);
    // G(+B)/G(−B) = 1.2: difference 0.2 G0 against the scale √(1.2) G0: 0.2/√1.2 = 0.18257 (exact construction).
    const g = (r.values.comparisons as { relation: string; normalised: number }[]).filter((c) => c.relation === "G(B) = G(−B)");
    for (const c of g) expectClose(c.normalised, 0.2 / Math.sqrt(1.2), { rtol: 1e-9, source: "exact construction G(+B) = 1.2 G(−B)" });
    // The Kelvin pair itself is exact: its comparisons are not among the rejected ones.
    const kelvin = (r.values.comparisons as { relation: string; z: number }[]).filter((c) => c.relation.includes("Π"));
    for (const c of kelvin) expect(Math.abs(c.z)).toBeLessThan(1e-6);
  });

  it("fails when only K is larger at +B (L22 = T²(K + G S Π) is not even)", async () => {
    const r = await runCheck(reciprocity, thermoelectricSweep({ G: 1, K: 1.15 }, 0.005));
    expect(r.status).toBe("fail");
    expect(r.summary).toMatch(/differ significantly after Holm's correction \(L22\(B\) = L22\(−B\)\)/);
  });

  it("fails an Onsager-form set whose L11 is 20 % larger at +B", async () => {
    const r = await runCheck(reciprocity, onsagerSweep(1.2, 0.002));
    expect(r.status).toBe("fail");
    expect(r.summary).toMatch(/differ significantly after Holm's correction \(L11\(B\) = L11\(−B\)\)/);
  });

  it("passes a field-even set and names each tested entry with its scale in the summary", async () => {
    const r = await runCheck(reciprocity, thermoelectricSweep({ G: 1, K: 1 }, 0.002));
    expect(r.status).toBe("pass");
    expect(r.values.diagonal_pairs).toBe(10);
    expect(r.summary).toContain("G(B) = G(−B) within 5 % of √(G(B) G(−B)) = 8–16 µS");
    expect(r.summary).toContain("T S(B) = Π(−B) and Π(B) = T S(−B) within 5 % of √(L22/L11) = ");
    expect(r.summary).toContain("L22(B) = L22(−B) within 5 % of √(L22(B) L22(−B)) = ");
    const o = await runCheck(reciprocity, onsagerSweep(1, 0.002));
    expect(o.status).toBe("pass");
  });

  it("is inconclusive on an underpowered field-even set, and says how much more averaging would settle it", async () => {
    // 3 % relative uncertainty on G at each field: u(difference)/scale = 0.0424; 1.645 · 0.0424 = 0.070 > 0.05.
    const r = await runCheck(reciprocity, thermoelectricSweep({ G: 1, K: 1 }, 0.03));
    expect(r.status).toBe("inconclusive");
    expect(r.reason).toMatch(/G\(B\) = G\(−B\) \(uncertainty 1\.4× too large: about 2× as many repeats averaged\)/);
  });

  it("does not test the diagonal at B = 0 rows, and says so", async () => {
    const t = onsagerSweep(1, 0.002);
    const rows = [...t.rows, [9, 0, 2, 0.4, 0.4, 1.5, 0.002, 0.002, 0.002, 0.002]];
    const r = await runCheck(reciprocity, { ...t, rows });
    expect(r.status).toBe("pass");
    expect(r.values.diagonal_pairs).toBe(8);
    expect(r.summary).toMatch(/The diagonal entries at the 1 row with B = 0 are paired with themselves, so their evenness in B is trivially true and not tested there\.$/);
  });
});
