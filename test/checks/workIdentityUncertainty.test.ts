import { describe, expect, it } from "vitest";
import { workForDataset } from "../../src/checks/work/work.ts";
import { weightedIdentityForDataset } from "../../src/checks/weighted-identity/weightedIdentity.ts";
import { uncertaintyRelationForDataset } from "../../src/checks/uncertainty-relation/uncertaintyRelation.ts";
import { CHECKS } from "../../src/checks/index.ts";
import { stampOf } from "../../src/report/resultDocument.ts";
import { E0, exactExchangeData, fixtureDataset, testContext, tiltedSkellam } from "./exchangeFixtures.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

describe("work", () => {
  it("fails, and so fails the audit, when work: zero is declared but the data carry work", () => {
    const g = exactExchangeData({ seed: "work:declared-zero", n: 50_000, TA: 1.3, TB: 1, withWork: true, heat: "gaussian", sQ: 1.5, sW: 0.8, lN: 1 });
    const d = fixtureDataset({ id: "wz", TA: 1.3, TB: 1, work: "zero", ...g });
    const r = workForDataset(d, testContext());
    expect(r.status).toBe("fail");
    expect(r.summary).toMatch(/^work: zero is declared, but the data carry work: /);
    expect(r.summary).toContain("Declare work: measured so that W enters Σ.");
    // The whole audit: every check on this dataset, stamped as the result document would be.
    const all = CHECKS.flatMap((c) => c.run({ dir: "", definition: {} as never, datasets: [d] }, testContext()));
    expect(stampOf(all)).toBe("fail");
  });

  it("reports measured work: mean, fraction non-zero, and that the no-work derivation does not apply", () => {
    const g = exactExchangeData({ seed: "work:measured", n: 50_000, TA: 1.3, TB: 1, withWork: true, heat: "gaussian", sQ: 1.5, sW: 0.8, lN: 1 });
    const d = fixtureDataset({ id: "wm", TA: 1.3, TB: 1, work: "measured", ...g });
    const r = workForDataset(d, testContext());
    const v = r.values as { mean_W: number; fraction_nonzero: number; onsager_without_work_applies: boolean; correlation_W_Q: number };
    expect(r.status).toBe("info");
    expect(v.fraction_nonzero).toBe(1);
    expect(v.onsager_without_work_applies).toBe(false);
    // Tilted Gaussian: ⟨W⟩ = β̄ s²/2 with β̄ = (1/1.3 + 1)/2 per E0, s = 0.8 (exact); tolerance 4 SE = 4·0.8/√(5·10^4) E0.
    const betaBar = (1 / 1.3 + 1) / 2;
    expectClose(v.mean_W, ((betaBar * 0.64) / 2) * E0, { atol: ((4 * 0.8) / Math.sqrt(50_000)) * E0, source: "mean of the tilted Gaussian (exact)" });
    // W and Q are drawn independently: correlation within 4/√n of 0.
    expectClose(v.correlation_W_Q, 0, { atol: 4 / Math.sqrt(50_000), source: "independent draws" });
  });

  it("passes a zero declaration when the data's work is only small symmetric noise", () => {
    const rng = rngFromText("work:noise");
    const n = 20_000;
    const W = new Float64Array(n);
    const Q = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      W[i] = 0.01 * rng.normal(); // rms β̄W ≈ 0.009 k_B, below the 0.05 k_B margin
      Q[i] = rng.normal();
    }
    const r = workForDataset(fixtureDataset({ id: "wn", TA: 1.3, TB: 1, work: "zero", W, Q, dN: null }), testContext());
    expect(r.status, r.summary).toBe("pass");
  });

  it("is information when the data carry no work and W = 0 is declared", () => {
    const r = workForDataset(fixtureDataset({ id: "w0", TA: 1.3, TB: 1, work: "zero", W: null, Q: Float64Array.of(1, -1, 2), dN: null }), testContext());
    expect(r.status).toBe("info");
    expect(r.values).toMatchObject({ mean_W: 0, fraction_nonzero: 0, onsager_without_work_applies: true });
  });
});

describe("weighted-identity", () => {
  it("passes on the exactly tilted family with work, for both currents", () => {
    // ⟨x(e^{−β̄W} + e^{−a·x})⟩ = 0 follows from the detailed relation (exact for the tilted family).
    const g = exactExchangeData({ seed: "wid:exact", n: 100_000, TA: 1.3, TB: 1, muA: 0.4, withWork: true, heat: "gaussian", sQ: 1, sW: 0.6, lN: 1.2 });
    const r = weightedIdentityForDataset(fixtureDataset({ id: "e", TA: 1.3, TB: 1, muA: 0.4, work: "measured", ...g }), testContext());
    expect(r.status, r.summary).toBe("pass");
    const v = r.values as { currents: Record<string, { ratio: number; ci: [number, number] }> };
    expect(Object.keys(v.currents)).toEqual(["Q", "dN"]);
  });

  it("fails in the heat channel when the data come from another temperature", () => {
    const g = exactExchangeData({ seed: "wid:wrong", n: 100_000, TA: 1.3, TB: 1, drawTA: 1.6, withWork: false, heat: "gaussian", sQ: 1.5, lN: 1 });
    const r = weightedIdentityForDataset(fixtureDataset({ id: "w", TA: 1.3, TB: 1, work: "zero", ...g }), testContext());
    expect(r.status).toBe("fail");
    expect(r.summary).toMatch(/^The weighted identity fails for heat Q: /);
  });

  it("is not applicable with a magnetic field", () => {
    const g = exactExchangeData({ seed: "wid:field", n: 1000, TA: 1.3, TB: 1, withWork: false, heat: "gaussian", sQ: 1 });
    const r = weightedIdentityForDataset(fixtureDataset({ id: "f", TA: 1.3, TB: 1, work: "zero", field: -0.2, ...g }), testContext());
    expect(r.status).toBe("not-applicable");
  });
});

describe("uncertainty-relation", () => {
  it("reproduces b coth(b/2) for a biased counting process, reported as information", () => {
    // Skellam counts with rates ratio e^b: Var(n)⟨Σ⟩/⟨n⟩² = b coth(b/2) (Barato & Seifert, Phys. Rev. Lett. 114,
    // 158101 (2015), biased random walk); b = ln 2 gives 2.079442, ratio to 2 of 1.039721.
    const rng = rngFromText("tur");
    const n = 100_000;
    const Q = new Float64Array(n);
    const dN = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      Q[i] = rng.normal();
      dN[i] = tiltedSkellam(rng, 2, Math.LN2);
    }
    // T_A = T_B = 1 K (a_Q = 0), μ_A = ln 2 k_B·K: a_N = ln 2, so Σ = ln 2 · ΔN.
    const r = uncertaintyRelationForDataset(fixtureDataset({ id: "t", TA: 1, TB: 1, muA: Math.LN2, work: "zero", W: null, Q, dN }), testContext());
    expect(r.status).toBe("info");
    const v = r.values as { ratio: { dN: number } };
    // Relative SE of Var/mean² at 10^5 draws is about 1.5 %; tolerance 5 %.
    expectClose(v.ratio.dN, 1.039721, { rtol: 0.05, source: "b coth(b/2)/2 at b = ln 2 (computed)" });
  });
});
