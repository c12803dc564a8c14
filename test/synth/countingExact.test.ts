import { describe, expect, it } from "vitest";
import { dotRates, stationaryOccupation, affinityPerElectron, type DotParameters } from "../../src/synth/dotRates.ts";
import { dotTransferDistribution, scaledCumulantGeneratingFunction } from "../../src/synth/dotCounting.ts";
import { jointCountDistribution, stationaryDistribution, tiltedGeneratorEigenvalue, type CountingModel } from "../../src/synth/countingModel.ts";
import { cycleAffinity, dotModel, doubleDotModel, intoB } from "../../src/synth/dotModels.ts";
import { expectClose } from "../helpers/expectClose.ts";

const lead = { beta: { A: 2, B: 3 }, mu: { A: 0.5, B: 0 } };
const dotParams: DotParameters = { level: 0.3, rateA: 1.3, rateB: 0.7, ...lead };
const dot = dotModel({ level: 0.3, rateA: 1.3, rateB: 0.7, ...lead, heatingBeta: null });
const doubleDot = doubleDotModel({ levelLeft: 0.2, levelRight: 0.2, rateA: 1.1, rateB: 0.6, rateInter: 0.8, ...lead, interBeta: null });

/** Charge held by the conductor in each state (dot: 0, 1; double dot: 0, 1, 1). */
const dotCharge = [0, 1];
const doubleDotCharge = [0, 1, 1];

/**
 * Reservoirs' entropy production of a window with n electrons into B, from state a to state b:
 * lead A gains dN_A = −n − (c(b) − c(a)) electrons at the level next to it, lead B gains n at its level,
 * Σ_res = β_A(ε_in − μ_A) dN_A + β_B(ε_out − μ_B) n (physics: Σ_X β_X(ΔE_X − μ_X ΔN_X)).
 */
function sigmaRes(n: number, a: number, b: number, charge: number[], levelIn: number, levelOut: number): number {
  const dNA = -n - (charge[b] - charge[a]);
  return lead.beta.A * (levelIn - lead.mu.A) * dNA + lead.beta.B * (levelOut - lead.mu.B) * n;
}

function checkDetailedRelation(model: CountingModel, charge: number[], levelIn: number, levelOut: number, tau: number): { worst: number; worstRes: number; expTot: number; expRes: number } {
  const p = stationaryDistribution(model);
  const law = jointCountDistribution(model, intoB, p, tau);
  let worst = 0;
  let worstRes = 0;
  let expTot = 0;
  let expRes = 0;
  const S = model.states;
  const len = law.probability[0][0].length;
  for (let a = 0; a < S; a++) {
    for (let b = 0; b < S; b++) {
      for (let k = 0; k < len; k++) {
        const n = law.nMin + k;
        const P = law.probability[a][b][k];
        if (P === 0) continue;
        const res = sigmaRes(n, a, b, charge, levelIn, levelOut);
        const tot = res + Math.log(p[a]) - Math.log(p[b]);
        expTot += P * Math.exp(-tot);
        expRes += P * Math.exp(-res);
        const mirror = -n - law.nMin;
        if (mirror < 0 || mirror >= len || P < 1e-150) continue;
        const Q = law.probability[b][a][mirror];
        const logRatio = Math.log(P / Q);
        worst = Math.max(worst, Math.abs(logRatio - tot));
        worstRes = Math.max(worstRes, Math.abs(logRatio - res));
      }
    }
  }
  return { worst, worstRes, expTot, expRes };
}

describe("exact finite-time counting through a conductor that holds charge", () => {
  // Seifert, Phys. Rev. Lett. 95, 040602 (2005): Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) obeys
  // P(n, a, b)/P(−n, b, a) = e^{Σ_tot} at every τ in the stationary state; Σ_res alone does not.
  for (const [name, model, charge, levelIn, levelOut] of [
    ["single dot", dot, dotCharge, 0.3, 0.3],
    ["serial double dot", doubleDot, doubleDotCharge, 0.2, 0.2],
  ] as const) {
    it(`${name}: the detailed relation holds for Σ_tot to rounding at τ from 0.02/Γ to 20/Γ, and not for Σ_res`, () => {
      for (const tau of [0.02, 0.3, 2, 7, 20]) {
        const r = checkDetailedRelation(model, [...charge], levelIn, levelOut, tau);
        // 1e-8 absolute on a log-ratio: uniformisation sums non-negative terms, so probabilities down to 1e-150
        // keep ~1e-12 relative accuracy; the log-ratios are O(10).
        expect(r.worst, `τ = ${tau}`).toBeLessThan(1e-8);
        expectClose(r.expTot, 1, { atol: 1e-12, source: "integral relation ⟨e^{−Σ_tot}⟩ = 1 (Seifert 2005)" });
        // Σ_res alone misses exactly the boundary term, far above rounding.
        const p = stationaryDistribution(model);
        const boundary = Math.max(...Array.from(p, (a) => Math.max(...Array.from(p, (b) => Math.abs(Math.log(a) - Math.log(b))))));
        expect(boundary).toBeGreaterThan(0.03);
        expectClose(r.worstRes, boundary, { atol: 1e-8, source: "the log-ratio is Σ_tot, which differs from Σ_res by the boundary term" });
      }
    });
  }

  it("⟨e^{−Σ_res}⟩ of the single dot relaxes to a value different from 1", () => {
    const r = checkDetailedRelation(dot, dotCharge, 0.3, 0.3, 20);
    // 3.8e-4 for these rates; rounding of the sum is below 1e-12.
    expect(Math.abs(r.expRes - 1)).toBeGreaterThan(1e-4);
  });

  it("the joint law sums over end states to the marginal P(n) of the number-resolved dot solver", () => {
    const rates = dotRates(dotParams);
    const p1 = stationaryOccupation(rates);
    const law = jointCountDistribution(dot, intoB, [1 - p1, p1], 3);
    const marginal = dotTransferDistribution(rates, p1, 3);
    for (let k = 0; k < marginal.probability.length; k++) {
      const n = marginal.nMin + k;
      let sum = 0;
      for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) sum += law.probability[a][b][n - law.nMin] ?? 0;
      expectClose(sum, marginal.probability[k], { atol: 1e-15, rtol: 1e-12, source: "two uniformisations of the same master equation" });
    }
  });
});

describe("scaled cumulant generating function of the tilted generator", () => {
  // Bagrets & Nazarov, PRB 67, 085316 (2003): at large bias (f_A = 1, f_B = 0) the single level gives
  // current Γ_AΓ_B/(Γ_A + Γ_B) and Fano factor (Γ_A² + Γ_B²)/(Γ_A + Γ_B)².
  it("gives the mean current and Fano factor of a single level at large bias", () => {
    const GA = 1.7;
    const GB = 0.45;
    const rates = { inA: GA, inB: 0, outA: 0, outB: GB };
    // Central differences of K(s) = ln⟨e^{s n}⟩/τ at s = 0 with step h: error O(h²) ≈ 1e-8 relative at h = 1e-4,
    // while rounding is ~1e-16/h² ≈ 1e-8 for the second derivative; 1e-6 covers both.
    const h = 1e-4;
    const K = (s: number) => scaledCumulantGeneratingFunction(rates, s);
    const mean = (K(h) - K(-h)) / (2 * h);
    const variance = (K(h) - 2 * K(0) + K(-h)) / (h * h);
    expectClose(mean, (GA * GB) / (GA + GB), { rtol: 1e-6, source: "Bagrets & Nazarov, PRB 67, 085316 (2003)" });
    expectClose(variance / mean, (GA * GA + GB * GB) / (GA + GB) ** 2, { rtol: 1e-6, source: "Bagrets & Nazarov, PRB 67, 085316 (2003)" });
    // The general Perron-root route agrees with the closed form.
    const big = dotModel({ level: 0, rateA: GA, rateB: GB, beta: { A: 1, B: 1 }, mu: { A: 1e4, B: -1e4 }, heatingBeta: null });
    for (const s of [-0.7, 0, 0.4]) expectClose(tiltedGeneratorEigenvalue(big, intoB, s), K(s), { atol: 1e-12, source: "closed-form 2 × 2 eigenvalue" });
  });

  // Lebowitz & Spohn, J. Stat. Phys. 95, 333 (1999): with K(λ) = lim ln⟨e^{−λ n}⟩/τ, K(λ) = K(A − λ).
  it("obeys K(λ) = K(A − λ) exactly, A the affinity per electron", () => {
    const rates = dotRates(dotParams);
    const A = affinityPerElectron(dotParams);
    const K = (lambda: number) => scaledCumulantGeneratingFunction(rates, -lambda);
    for (const lambda of [-1.3, -0.2, 0.25, 0.9, 2.4]) expectClose(K(lambda), K(A - lambda), { atol: 1e-13, rtol: 1e-12, source: "Lebowitz & Spohn 1999" });
    // Double dot (Perron root by power iteration, converged to 1e-15).
    const Ad = cycleAffinity(0.2, 0.2, lead.beta.A, lead.beta.B, lead.mu.A, lead.mu.B, null);
    const Kd = (lambda: number) => tiltedGeneratorEigenvalue(doubleDot, intoB, -lambda);
    for (const lambda of [-0.5, 0.3, 1.1]) expectClose(Kd(lambda), Kd(Ad - lambda), { atol: 1e-11, source: "Lebowitz & Spohn 1999" });
  });
});
