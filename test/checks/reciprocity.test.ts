import { describe, it, expect } from "vitest";
import { reciprocity } from "../../src/checks/reciprocity/reciprocity.ts";
import { renderEquation } from "../../src/report/equations.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { runCheck, type TableSpecInput } from "./coefficientFixtures.ts";

const onsagerHeader = ["Vg", "B", "L11", "L12", "L21", "L22", "u_L11", "u_L12", "u_L21", "u_L22"];
const onsagerField = `    temperature: { value: 1.0 }
    field: { column: B }
    point: [Vg]`;

/**
 * An Onsager–Casimir-consistent sweep (SI numbers of order one: the check is unit-free):
 * L12(B) = a + bB, L21(B) = a − bB, so L12(B) ≠ L21(B) but L12(B) = L21(−B) exactly.
 */
function casimirSweep(u: number, tweak: (row: number[], k: number, B: number) => void = () => {}): TableSpecInput {
  const rows: number[][] = [];
  for (let k = 0; k < 6; k++) {
    const a = 0.3 + 0.05 * k;
    for (const B of [1, -1]) {
      const row = [k, B, 1, a + 0.2 * B, a - 0.2 * B, 1.2, u, u, u, u];
      tweak(row, k, B);
      rows.push(row);
    }
  }
  return { form: "onsager", header: onsagerHeader, rows, dataset: onsagerField };
}

describe("reciprocity", () => {
  it("passes the Kelvin relation Π = T S on a constructed symmetric set (thermoelectric form, B = 0)", async () => {
    const T = 4.2;
    const rows = [0, 1, 2, 3].map((k) => {
      const S = -20 - 10 * k; // µV/K
      return [k, 30 + k, S, T * S, 12, 0.02, 0.02, 0.02 * T, 0.01];
    });
    const r = await runCheck(reciprocity, {
      form: "thermoelectric",
      header: ["Vg", "G", "S", "Pi", "K", "u_G", "u_S", "u_Pi", "u_K"],
      rows,
      dataset: `    temperature: { value: ${T} }\n    point: [Vg]\n    units: { G: uS, S: uV/K, Pi: uV, K: pW/K }`,
    });
    expect(r.status).toBe("pass");
    expect(r.values.pairs).toBe(4);
    // Π − T S = 0 up to rounding of T·S in the CSV text (exact construction): |z| tiny.
    expect(r.values.max_abs_z as number).toBeLessThan(1e-6);
    // Scale √(L22/L11) = √(T K/G) at S Π ≪ K/G: √(4.2 · 12 pW/K / 30 µS) = 1.30 mV (row Vg = 0) down to 1.25 mV (Vg = 3).
    expect(r.summary).toMatch(/^The Kelvin relation Π = T S holds at every one of 4 comparisons \(two one-sided tests at 95 % confidence\): T S = Π within 5 % of √\(L22\/L11\) = 1\.25–1\.3 mV;/);
    // No field column: the diagonal is its own partner, said rather than counted as a test.
    expect(r.summary).toMatch(/The diagonal entries without a field column \(every row at B = 0\) are paired with themselves, so their evenness in B is trivially true and not tested there\.$/);
    expect(r.values.diagonal_pairs).toBe(0);
  });

  it("pairs +B with −B: passes a set whose L12(B) differs from L21(B) but equals L21(−B) (Onsager–Casimir)", async () => {
    const r = await runCheck(reciprocity, casimirSweep(0.002));
    expect(r.status).toBe("pass");
    expect(r.values.pairs).toBe(24); // 6 field pairs × (2 ordered off-diagonal entries + 2 diagonal entries)
    expect(r.values.diagonal_pairs).toBe(12);
    expect(r.values.tested_relations).toEqual(["L11(B) = L11(−B)", "L12(B) = L21(−B)", "L21(B) = L12(−B)", "L22(B) = L22(−B)"]);
    expectClose(r.values.max_abs_z as number, 0, { atol: 1e-9, source: "exact construction L12(B) = L21(−B)" });
  });

  it("fails the same data when the field is ignored, because L12(B) ≠ L21(B) at equal field", async () => {
    const t = casimirSweep(0.002);
    const r = await runCheck(reciprocity, { ...t, dataset: "    temperature: { value: 1.0 }\n    point: [Vg, B]" });
    expect(r.status).toBe("fail");
    // Difference 0.4 with u = 0.002·√2: z = 141.4 exactly by construction.
    expectClose(r.values.max_abs_z as number, 0.4 / (0.002 * Math.SQRT2), { rtol: 1e-9, source: "exact construction" });
  });

  it("in thermoelectric form with a field tests Π(B) = T S(−B), not Π(B) = T S(B), and states the sign convention", async () => {
    // S(B) = S0 + s1 B with an odd part s1 = 10 µV/K per tesla. Correct data: Π(B) = T S(−B); wrong data: Π(B) = T S(B).
    const T = 2;
    const build = (correct: boolean): TableSpecInput => {
      const rows: number[][] = [];
      for (let k = 0; k < 4; k++) {
        const S0 = -40 + 10 * k;
        for (const B of [1, -1]) {
          const S = S0 + 10 * B;
          const Pi = T * (correct ? S0 - 10 * B : S);
          rows.push([k, B, 20, S, Pi, 2, 0.02, 0.1, 0.2, 0.01]);
        }
      }
      return {
        form: "thermoelectric",
        header: ["Vg", "B", "G", "S", "Pi", "K", "u_G", "u_S", "u_Pi", "u_K"],
        rows,
        dataset: `    temperature: { value: ${T} }\n    field: { column: B }\n    point: [Vg]\n    units: { G: uS, S: uV/K, Pi: uV, K: pW/K }`,
      };
    };
    const good = await runCheck(reciprocity, build(true));
    expect(good.status).toBe("pass");
    expect(good.assumptions.some((a) => a.startsWith("Currents count positive from terminal 1 into terminal 2"))).toBe(true);
    const bad = await runCheck(reciprocity, build(false));
    expect(bad.status).toBe("fail");
    // |Π(B) − T S(−B)| = 2 T s1 = 40 µV with u = √(0.2² + (2·0.1)²) µV: z = 141.42 (exact construction).
    expectClose(bad.values.max_abs_z as number, 40 / Math.hypot(0.2, 0.2), { rtol: 1e-9, source: "exact construction" });
  });

  it("fails a significant violation L12(B) = 1.2 L21(−B) and reports the contract values", async () => {
    const r = await runCheck(reciprocity, casimirSweep(0.002, (row, k, B) => { if (k === 3 && B === 1) row[3] *= 1.2; }));
    expect(r.status).toBe("fail");
    expect(r.values.p_value as number).toBeLessThan(0.01);
    expect(Object.keys(r.values)).toEqual(expect.arrayContaining(["max_abs_z", "p_value", "pairs"]));
    expect(r.summary).toMatch(/^Onsager–Casimir reciprocity is violated: 1 of 24 comparisons differ significantly after Holm's correction \(L12\(B\) = L21\(−B\)\); the strongest at Vg = 3, B = \+1 T \(row 8\): L12\(B\) = L21\(−B\), difference 0\.119 of √\(Ls_11 Ls_22\) = 1\.1 A K/);
    // Vg = 3: a = 0.45, L12(+B) = 1.2 (a + 0.2) = 0.78 against L21(−B) = 0.65; 0.13/√(1 · 1.2) = 0.1187 (exact construction).
  });

  it("is inconclusive, not pass, on an underpowered set that is exactly reciprocal", async () => {
    // u = 0.05 per entry: u(difference) = 0.0707, scale √(1·1.2) = 1.095, margin 0.0548 < 1.645·0.0707: TOST cannot succeed.
    // Diagonal L11: scale √(1·1) = 1, margin 0.05; 1.645·0.0707/0.05 = 2.33, so 2.33² = 5.4 → 5.5× the repeats (rounded up).
    const r = await runCheck(reciprocity, casimirSweep(0.05));
    expect(r.status).toBe("inconclusive");
    expect(r.reason).toMatch(
      /^24 of 24 comparisons cannot exclude an asymmetry of 5 % of their scale: Vg = 0, B = \+1 T \(row 2\): L11\(B\) = L11\(−B\) \(uncertainty 2\.3× too large: about 5\.5× as many repeats averaged\); Vg = 0, B = \+1 T \(row 2\): L12\(B\) = L21\(−B\) \(uncertainty 2\.1× too large/,
    );
    expect(r.reason).toMatch(/Smaller uncertainties at these points \(more averaging; the uncertainty falls as one over the square root of the number of repeats\) would settle them\.$/);
  });

  it("applies Holm's correction: one z = 2.9 among 24 comparisons is not a significant violation", async () => {
    // Unadjusted two-sided p(2.9) = 0.0037 < α = 0.01, but Holm multiplies by 24 (diagonal included): 0.090 > 0.01.
    const u = 0.01;
    const dz = 2.9 * u * Math.SQRT2;
    const r = await runCheck(reciprocity, casimirSweep(u, (row, k, B) => { if (k === 2 && B === 1) row[3] += dz; }));
    expect(r.status).toBe("inconclusive");
    expectClose(r.values.p_value as number, 24 * 0.003731, { rtol: 2e-3, source: "Holm (1979) with m = 24; 2(1 − Φ(2.9)) = 0.003731 (NIST normal table, 4 digits)" });
  });

  it("refers differences to Student's t when the uncertainties carry few degrees of freedom (option dof)", async () => {
    // One B = 0 row, difference 3·u(difference): with ν = 2, P(|T| > 3) = 1 − 3/√(2 + 9) (exact for ν = 2) = 0.09547.
    const u = 0.01;
    const t: TableSpecInput = {
      form: "onsager",
      header: ["L11", "L12", "L21", "L22", "u_L11", "u_L12", "u_L21", "u_L22"],
      rows: [[1, 0.3 + 3 * u * Math.SQRT2, 0.3, 1, u, u, u, u]],
      dataset: "    temperature: { value: 1.0 }",
    };
    const r = await runCheck(reciprocity, t, { dof: 2 });
    expectClose(r.values.p_value as number, 1 - 3 / Math.sqrt(11), { rtol: 1e-9, source: "exact t distribution with ν = 2" });
    const z = await runCheck(reciprocity, t);
    expectClose(z.values.p_value as number, 0.0026998, { rtol: 1e-4, source: "2(1 − Φ(3)) = 0.0026998 (computed; consistent with the NIST/SEMATECH §1.3.6.7.1 table area 0..3 = 0.49865)" });
  });

  it("cannot pass without uncertainties, and says why", async () => {
    const t = casimirSweep(0);
    const r = await runCheck(reciprocity, { ...t, header: t.header.slice(0, 6), rows: t.rows.map((row) => row.slice(0, 6)) });
    expect(r.status).toBe("inconclusive");
    expect(r.values.p_value).toBeNull();
    expect(r.reason).toBe(
      "Without u_ columns no difference can be called significant, nor small enough to exclude a violation of 5 % of its scale (L11(B) = L11(−B) within 5 % of √(L11(B) L11(−B)) = 1 S K; L12(B) = L21(−B) and L21(B) = L12(−B) within 5 % of √(Ls_11 Ls_22) = 1.1 A K; L22(B) = L22(−B) within 5 % of √(L22(B) L22(−B)) = 1.2 W K); add a standard uncertainty for every coefficient (u_L11, u_L12, …).",
    );
  });

  it("is inconclusive while a row lacks its −B partner, naming the row", async () => {
    const t = casimirSweep(0.002);
    const r = await runCheck(reciprocity, { ...t, rows: t.rows.slice(0, -1) });
    expect(r.status).toBe("inconclusive");
    expect(r.values.unpaired_rows).toEqual([12]);
    expect(r.reason).toBe("Reciprocity is untested where rows are unpaired or duplicated: row 12.");
  });

  it("uses declared parities: L12(B) = −L21(−B) for fluxes of opposite parity", async () => {
    const t = casimirSweep(0.002, (row) => { row[4] = -row[4]; });
    const r = await runCheck(reciprocity, { ...t, dataset: `${onsagerField}\n    parity: [1, -1]` });
    expect(r.status).toBe("pass");
  });

  it("reaches the right verdicts on randomly drawn sweeps (fixed seeds): consistent ones pass, violated ones fail", async () => {
    for (let s = 0; s < 4; s++) {
      const rng = rngFromText(`test:reciprocity-random-${s}`);
      const u = 0.003;
      const build = (violation: number): TableSpecInput => {
        const rows: number[][] = [];
        for (let k = 0; k < 8; k++) {
          const L11 = 0.5 + rng.uniform();
          const L22 = 0.5 + rng.uniform();
          const a = (rng.uniform() - 0.5) * Math.sqrt(L11 * L22);
          const b = (rng.uniform() - 0.5) * 0.3;
          const B = 0.5 + rng.uniform();
          const noisy = (v: number) => v + u * rng.normal(); // data scattered by exactly their stated uncertainty
          rows.push([k, B, noisy(L11), noisy(a + b + (k === 5 ? violation : 0)), noisy(a - b), noisy(L22), u, u, u, u]);
          rows.push([k, -B, noisy(L11), noisy(a - b), noisy(a + b), noisy(L22), u, u, u, u]);
        }
        return { form: "onsager", header: onsagerHeader, rows, dataset: onsagerField };
      };
      expect((await runCheck(reciprocity, build(0))).status).toBe("pass");
      expect((await runCheck(reciprocity, build(0.1))).status).toBe("fail");
    }
  });

  it("gives the contract values through run --json's result document", async () => {
    const t = casimirSweep(0.002);
    const csv = [t.header.join(","), ...t.rows.map((r) => r.join(","))].join("\n") + "\n";
    const dir = tempAudit(
      `id: contract\ntitle: Contract\nauthors:\n  - { name: "A. Person" }\ndatasets:\n  - id: sweep\n    kind: coefficients\n    file: data/c.csv\n    form: onsager\n${onsagerField}\nchecks: [reciprocity, positivity]\n`,
      { "data/c.csv": csv },
    );
    const { result } = await runAudit(dir);
    const rec = result.checks.find((c) => c.check === "reciprocity")!;
    const pos = result.checks.find((c) => c.check === "positivity")!;
    expect(rec.values).toMatchObject({ pairs: 24, p_value: expect.any(Number), max_abs_z: expect.any(Number) });
    expect(pos.values).toMatchObject({ points: 12, min_eigenvalue: expect.any(Number) });
  });

  it("writes equations that KaTeX renders with throwOnError: true, in both forms", async () => {
    const a = await runCheck(reciprocity, casimirSweep(0.002));
    const b = await runCheck(reciprocity, {
      form: "thermoelectric",
      header: ["G", "S", "Pi", "K"],
      rows: [[1, 2, 2, 1]],
      dataset: "    temperature: { value: 1.0 }",
    });
    for (const tex of [...a.equations, ...b.equations]) expect(renderEquation(tex)).toContain("katex");
    expect(a.plots.map((p) => p.id)).toEqual(["reciprocity-identity", "reciprocity-asymmetry"]);
    expect(a.tables.map((t) => t.rows.length)).toEqual([12, 12]); // off-diagonal pairs, then the diagonal
  });
});
