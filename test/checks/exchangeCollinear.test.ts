// Exchange statistics whose channels are linearly dependent in every realisation: a single transport level
// (Q = εΔN) and measured work that is zero. The joint relation then identifies only combinations of θ.
import { describe, expect, it } from "vitest";
import { exchangeFluctuationForDataset } from "../../src/checks/exchange-fluctuation/exchangeFluctuation.ts";
import { weightedIdentityForDataset } from "../../src/checks/weighted-identity/weightedIdentity.ts";
import { exactExchangeData, fixtureDataset, testContext, tiltedSkellam } from "./exchangeFixtures.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

type Combination = { combination: string; multiplies: string; terms: Record<string, number>; fitted: number | null; standard_error: number | null; declared: number };
type Values = {
  slope: number;
  slope_ci: [number, number];
  slope_standard_error: number;
  effective_affinity: { a_Q: number | null; a_N: number | null; beta_bar?: number };
  effective_affinity_standard_error: Record<string, number | null>;
  identifiable_combinations: Combination[];
  not_identifiable: string[];
  identifiability: string | null;
  explanations: { id: string; identified: boolean }[];
};

const N = 100_000;
// Level ε = 0.9 k_B·1 K above the Fermi level of B; drawn reservoirs T_A = 1.5 K, T_B = 1 K, μ_A = 0.5 k_B·1 K, μ_B = 0.
const EPS = 0.9;
const TA = 1.5;
const TB = 1;
const MU_A = 0.5;
// In units of k_B·1 K: a_Q = 1/T_B − 1/T_A = 1/3, a_N = μ_A/T_A = 1/3, so Σ = (a_Q ε + a_N) ΔN with
// a_Q ε + a_N = 0.3 + 1/3 = 0.63333… (physics.md §1 definitions; exact arithmetic).
const PHI = (1 / TB - 1 / TA) * EPS + MU_A / TA;

/** ΔN a tilted Skellam law with ln P(n)/P(−n) = φ n (Skellam, J. R. Stat. Soc. 109, 296 (1946); tilt construction), Q = εΔN exactly. */
function singleLevel(seed: string, n: number): { Q: Float64Array; dN: Float64Array } {
  const rng = rngFromText(seed);
  const dN = Float64Array.from({ length: n }, () => tiltedSkellam(rng, 1.5, PHI));
  return { Q: Float64Array.from(dN, (v) => EPS * v), dN };
}

describe("exchange-fluctuation with Q = εΔN in every realisation (single level)", () => {
  it("passes and recovers the identifiable combination a_Q·ε + a_N", () => {
    const { Q, dN } = singleLevel("collinear:exact", N);
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "level", TA, TB, muA: MU_A, work: "zero", W: null, Q, dN }), testContext());
    const v = r.values as Values;
    expect(r.status, r.summary).toBe("pass");
    expect(v.slope_ci[1] - v.slope_ci[0]).toBeLessThan(0.1);
    expectClose(v.slope, 1, { atol: 4 * v.slope_standard_error, source: "exact tilt: ln P(Σ)/P(−Σ) = Σ" });
    expect(v.identifiable_combinations).toHaveLength(1);
    const c = v.identifiable_combinations[0];
    expect(c.combination).toBe("a_Q·ε + a_N");
    expect(c.multiplies).toBe("ΔN");
    // Tolerance: 4 of the fit's own standard errors.
    expectClose(c.fitted!, PHI, { atol: 4 * c.standard_error!, source: "construction: φ = (1/T_B − 1/T_A) ε + μ_A/T_A = 0.6333 (exact)" });
    expectClose(c.declared, PHI, { rtol: 1e-12, source: "declared reservoirs equal the drawn ones (exact)" });
    expect(v.effective_affinity).toEqual({ a_Q: null, a_N: null });
    expect(v.effective_affinity_standard_error).toEqual({ a_Q: null, a_N: null });
    expect(v.not_identifiable).toEqual(["a_Q", "a_N"]);
    expect(v.identifiability).toBe("Q = ε·ΔN with ε = 1.243e-23 J in every realisation, so a_Q and a_N are identifiable only as the combination a_Q·ε + a_N.");
    // One combination cannot fix both temperatures: the joint state is not identified (single-lead ones are, exactly).
    expect(v.explanations.find((e) => e.id === "both-temperatures")!.identified).toBe(false);
    expect(r.summary).not.toContain("The data cannot tell apart");
    expect(r.summary).toContain(" Fitted: a_Q·ε + a_N = ");
  });

  it("fails when T_A is declared wrong, naming the combination", () => {
    // Declared T_A = 1.2 K: a_Q ε + a_N = (1 − 1/1.2)·0.9 + 0.5/1.2 = 0.56667 against 0.63333 drawn; slope 1.118.
    const { Q, dN } = singleLevel("collinear:wrong", N);
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "level-wrong", TA: 1.2, TB, muA: MU_A, work: "zero", W: null, Q, dN }), testContext());
    const v = r.values as Values;
    expect(r.status).toBe("fail");
    expect(r.summary).toMatch(/^The exchange fluctuation relation is violated: slope [0-9.]+ ≠ 1; fitted a_Q·ε \+ a_N = [0-9.]+ differs from the declared 0\.5667/);
    expectClose(v.identifiable_combinations[0].fitted!, PHI, { atol: 4 * v.identifiable_combinations[0].standard_error!, source: "the combination the data were drawn with (exact)" });
    expectClose(v.slope, PHI / ((1 - 1 / 1.2) * EPS + MU_A / 1.2), { atol: 4 * v.slope_standard_error, source: "ratio of drawn to declared combination (exact)" });
  });

  it("weighted-identity tests Q = εΔN once and mirrors r_ΔN to r_Q", () => {
    const { Q, dN } = singleLevel("collinear:wid", 50_000);
    const r = weightedIdentityForDataset(fixtureDataset({ id: "level-wid", TA, TB, muA: MU_A, work: "zero", W: null, Q, dN }), testContext());
    const v = r.values as { currents: Record<string, { ratio: number; ci: [number, number]; p_value: number; p_holm: number; same_test_as?: string }>; independent_currents: string[] };
    expect(v.independent_currents).toEqual(["dN"]);
    // r is invariant under x → c x for c > 0 (definition of r_x), so r_Q = r_ΔN to the last digit.
    expect(v.currents.Q.ratio).toBe(v.currents.dN.ratio);
    expect(v.currents.Q.ci).toEqual(v.currents.dN.ci);
    expect(v.currents.Q.same_test_as).toBe("dN");
    expect(r.summary).toContain("Q = 1.243e-23 J × dN in every realisation, so r_Q = r_dN exactly and the two identities are one test.");
    expect(r.status, r.summary).toBe("pass");
    // Declared T_A = 1.2 K instead of 1.5 K: both currents fail together, as one test.
    const wrong = weightedIdentityForDataset(fixtureDataset({ id: "level-wid-wrong", TA: 1.2, TB, muA: MU_A, work: "zero", W: null, Q, dN }), testContext());
    expect(wrong.status).toBe("fail");
    expect(wrong.summary).toMatch(/^The weighted identity fails for heat Q and particles ΔN: /);
  });
});

describe("exchange-fluctuation with work measured but zero in every realisation", () => {
  it("passes, fits a_Q and a_N separately and says β̄ is not identifiable", () => {
    const g = exactExchangeData({ seed: "collinear:w0", n: N, TA: 1.3, TB: 1, muA: 0.4, withWork: false, heat: "laplace", sQ: 0.8, lN: 1.2 });
    const d = fixtureDataset({ id: "w0", TA: 1.3, TB: 1, muA: 0.4, work: "measured", ...g, W: new Float64Array(N) });
    const r = exchangeFluctuationForDataset(d, testContext());
    const v = r.values as Values;
    expect(r.status, r.summary).toBe("pass");
    expect(v.effective_affinity.beta_bar).toBeUndefined();
    expect(v.not_identifiable).toEqual(["beta_bar"]);
    expect(v.identifiability).toBe("W = 0 in every realisation, so β̄ multiplies nothing and is not identifiable.");
    expectClose(v.effective_affinity.a_Q!, d.affinity.a_Q, { atol: 4 * v.effective_affinity_standard_error.a_Q!, source: "declared a_Q = 1/(1 K) − 1/(1.3 K) per k_B (exact tilt)" });
    expectClose(v.effective_affinity.a_N!, d.affinity.a_N, { atol: 4 * v.effective_affinity_standard_error.a_N!, source: "declared a_N = μ_A/(k_B·1.3 K) (exact tilt)" });
  });
});
