import { describe, expect, it } from "vitest";
import { exchangeFluctuationForDataset } from "../../src/checks/exchange-fluctuation/exchangeFluctuation.ts";
import { E0, exactExchangeData, fixtureDataset, testContext, tiltedSkellam } from "./exchangeFixtures.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

/** An implied quantity of one explanation (e.g. T_A of "lead-A-temperature"), with its 95 % interval. */
function implied(v: Values, id: string, name: string): { value: number; lo: number; hi: number } {
  const q = v.explanations.find((e) => e.id === id)!.quantities.find((x) => x.name === name)!;
  return { value: q.value as number, lo: q.interval![0] as number, hi: (q.interval![1] ?? Infinity) as number };
}

type Values = {
  slope: number;
  slope_ci: [number, number];
  slope_standard_error: number;
  effective_affinity: { a_Q: number | null; a_N: number | null; beta_bar?: number };
  effective_affinity_standard_error: Record<string, number | null>;
  explanations: { id: string; consistent: boolean; quantities: { name: string; value: number | null; interval: [number | null, number | null] | null }[] }[];
  bins_used: number;
  binned_chi_square: { exact_values: boolean; p_value: number } | null;
};

const N = 100_000;

describe("exchange-fluctuation on laws that obey the detailed relation exactly", () => {
  it("passes on Gaussian entropy production with variance twice the mean and reports the contract values", () => {
    // Exact: Σ ~ N(m, 2m) obeys P(Σ)/P(−Σ) = e^Σ (Seifert, Rep. Prog. Phys. 75, 126001 (2012), §3).
    // Σ = a_Q Q with a_Q = 1/T_B − 1/T_A = 1/2 per E0; Q ~ N(a_Q s²/2, s²) gives m = a_Q² s²/2 = 1 for s = 2√2.
    const g = exactExchangeData({ seed: "ef:gauss", n: N, TA: 2, TB: 1, withWork: false, heat: "gaussian", sQ: 2 * Math.SQRT2 });
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "gauss", TA: 2, TB: 1, work: "zero", ...g }), testContext());
    const v = r.values as Values;
    expect(r.status).toBe("pass");
    // Tolerance: 4 of the fit's own standard errors.
    expectClose(v.slope, 1, { atol: 4 * v.slope_standard_error, source: "Seifert 2012: slope 1 for Gaussian Σ with variance 2m" });
    expect(v.slope_ci[0]).toBeLessThan(1);
    expect(v.slope_ci[1]).toBeGreaterThan(1);
    expectClose(v.effective_affinity.a_Q!, 0.5 / E0, { atol: 4 * v.effective_affinity_standard_error.a_Q!, source: "declared a_Q = 1/(1 K) − 1/(2 K) per k_B" });
    expect(v.effective_affinity.a_N).toBeNull();
    expect(v.bins_used).toBeGreaterThan(10);
    expect(v.binned_chi_square?.exact_values).toBe(false);
  });

  // An exactly tilted family: independent symmetric laws (Laplace heat, Skellam electrons, Gaussian work)
  // tilted by half their coefficients, P(z) ∝ P0(z) e^{θ·z/2}, satisfy the relation for any tilt (exact algebra).
  const tilts: [number, number, number][] = [
    [1.3, 1.0, 0.4],
    [3.0, 1.0, 1.0],
    [1.0, 1.0, 0.5],
  ];
  for (const [TA, TB, mu] of tilts) {
    for (const withWork of [false, true]) {
      it(`passes on the tilted family at T_A = ${TA} K, T_B = ${TB} K, μ_A = ${mu} k_B·K ${withWork ? "with" : "without"} work`, () => {
        const g = exactExchangeData({ seed: `ef:tilt:${TA}:${mu}:${withWork}`, n: N, TA, TB, muA: mu, withWork, heat: "laplace", sQ: 0.8, sW: 0.6, lN: 1.2 });
        const d = fixtureDataset({ id: "tilt", TA, TB, muA: mu, work: withWork ? "measured" : "zero", ...g });
        const r = exchangeFluctuationForDataset(d, testContext());
        const v = r.values as Values;
        expect(r.status, r.summary).toBe("pass");
        expectClose(v.slope, 1, { atol: 4 * v.slope_standard_error, source: "exact tilt: P(z)/P(−z) = e^{θ·z}" });
        if (withWork) {
          // Both temperatures are identified when W is measured: 4 standard errors of β̄ propagated to T = 1/(k_B β).
          expect(v.effective_affinity.beta_bar).toBeDefined();
          expectClose(v.effective_affinity.beta_bar!, d.affinity.beta_bar, { atol: 4 * v.effective_affinity_standard_error.beta_bar!, source: "declared β̄ = (β_A + β_B)/2" });
        }
      });
    }
  }

  it("uses exact values for discrete Σ and reads the counting temperature off the particle channel", () => {
    // Equal temperatures (a_Q = 0), bias μ_A − μ_B = 0.8 k_B·K at T = 1 K: Σ = a_N ΔN with a_N = 0.8 and ΔN
    // a tilted Skellam law, so ln P(n)/P(−n) = 0.8 n exactly (Skellam 1946; tilt construction).
    const rng = rngFromText("ef:discrete");
    const Q = new Float64Array(N);
    const dN = new Float64Array(N);
    for (let i = 0; i < N; i++) {
      Q[i] = rng.normal(); // symmetric heat, irrelevant at a_Q = 0
      dN[i] = tiltedSkellam(rng, 1.5, 0.8);
    }
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "count", TA: 1, TB: 1, muA: 0.8, work: "zero", W: null, Q, dN }), testContext());
    const v = r.values as Values;
    expect(r.status, r.summary).toBe("pass");
    expect(v.binned_chi_square?.exact_values).toBe(true);
    // One temperature for both leads, T = (μ_A − μ_B)/(k_B a_N): 4 standard errors of a_N propagated (dT/T = da/a).
    const rel = (4 * v.effective_affinity_standard_error.a_N!) / v.effective_affinity.a_N!;
    expectClose(implied(v, "common-temperature", "T (both leads)").value, 1, { rtol: rel, source: "declared electron temperature 1 K" });
  });
});

describe("exchange-fluctuation on data that violate the declared state", () => {
  it("fails on data drawn at another temperature and reports the effective temperature", () => {
    // Drawn with T_A = 1.6 K, declared 1.3 K; T_B = 1 K in both. The fit must find T_A ≈ 1.6 K.
    const g = exactExchangeData({ seed: "ef:wrongT", n: N, TA: 1.3, TB: 1, drawTA: 1.6, withWork: false, heat: "gaussian", sQ: 1.5, lN: 1 });
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "wrong", TA: 1.3, TB: 1, work: "zero", ...g }), testContext());
    const v = r.values as Values;
    expect(r.status).toBe("fail");
    // Both leads offered as alternatives (heat alone cannot say which one is misdeclared).
    expect(r.summary).toContain("The data cannot tell apart 2 explanations of the departure, each with 95 % intervals: T_A = ");
    // T_A = 1/(β_B − a_Q) in units of E0 (T_B held at its declared 1 K); 4 standard errors of a_Q propagated.
    const aQ = v.effective_affinity.a_Q! * E0;
    const daQ = v.effective_affinity_standard_error.a_Q! * E0;
    const TA = 1 / (1 - aQ);
    expectClose(implied(v, "lead-A-temperature", "T_A").value, 1.6, { atol: 4 * TA * TA * daQ, source: "temperature the data were drawn at" });
    // The slope is the ratio of true to declared a_Q: (1 − 1/1.6)/(1 − 1/1.3) = 1.625 (exact).
    expectClose(v.slope, 1.625, { atol: 5 * v.slope_standard_error + 0.03, source: "ratio of drawn and declared affinities; Σ mixes in the particle channel" });
  });

  it("fails when detector back-action heats the electrons, and reports the higher counting temperature", () => {
    // Counting statistics at an effective temperature 1.5× the declared one: ln P(n)/P(−n) = n Δμ/(k_B T_eff),
    // the situation of Utsumi et al., Phys. Rev. B 81, 125331 (2010).
    const rng = rngFromText("ef:backaction");
    const Q = new Float64Array(N);
    const dN = new Float64Array(N);
    for (let i = 0; i < N; i++) {
      Q[i] = rng.normal();
      dN[i] = tiltedSkellam(rng, 1.5, 0.8 / 1.5);
    }
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "hot", TA: 1, TB: 1, muA: 0.8, work: "zero", W: null, Q, dN }), testContext());
    const v = r.values as Values;
    expect(r.status).toBe("fail");
    expect(r.summary).toContain("or T (both leads) = ");
    const rel = (4 * v.effective_affinity_standard_error.a_N!) / v.effective_affinity.a_N!;
    expectClose(implied(v, "common-temperature", "T (both leads)").value, 1.5, { rtol: rel, source: "temperature the counts were drawn at" });
    // A single heated lead would change a_Q, which the fit finds at its declared 0: those explanations are excluded.
    expect(v.explanations.filter((e) => e.id.endsWith("temperature") && e.id.startsWith("lead")).map((e) => e.consistent)).toEqual([false, false]);
  });

  it("is not applicable with a magnetic field, naming the reason", () => {
    const g = exactExchangeData({ seed: "ef:field", n: 1000, TA: 2, TB: 1, withWork: false, heat: "gaussian", sQ: 1 });
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "field", TA: 2, TB: 1, work: "zero", field: 0.5, ...g }), testContext());
    expect(r.status).toBe("not-applicable");
    expect(r.reason).toBe(
      "the dataset was taken at a magnetic field of 0.5 T; the detailed exchange relation links the process at B to the one at −B (Saito & Utsumi 2008), so a single dataset at B ≠ 0 cannot test it. The integral relation still applies.",
    );
  });

  it("is inconclusive when no realisation has negative Σ", () => {
    const Q = new Float64Array(5000);
    for (let i = 0; i < Q.length; i++) Q[i] = 1 + (i % 7);
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "pos", TA: 2, TB: 1, work: "zero", W: null, Q, dN: null }), testContext());
    expect(r.status).toBe("inconclusive");
    expect(r.summary).toBe("Only 0 of 5000 realisations have Σ < 0: too few to estimate the slope of ln P(Σ)/P(−Σ).");
  });

  it("is inconclusive when the slope's interval is wider than the margin", () => {
    const g = exactExchangeData({ seed: "ef:small", n: 2000, TA: 2, TB: 1, withWork: false, heat: "gaussian", sQ: 2 * Math.SQRT2 });
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "small", TA: 2, TB: 1, work: "zero", ...g }), testContext());
    expect(r.status).toBe("inconclusive");
    expect(r.summary).toMatch(/^No significant violation, but the slope's 95% interval \[.*\] does not lie within 1 ± 0\.05\.$/);
    expect(r.reason).toMatch(/realisations at this spread would resolve the margin of 0\.05\.$/);
  });
});
