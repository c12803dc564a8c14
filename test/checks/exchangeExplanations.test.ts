// Effective temperatures as alternatives: when the fitted coefficients of ln P(z)/P(−z) = θ·z differ from the
// declared ones, each explanation frees some reservoir parameters (θ is linear in β_A, β_B, β_A μ_A, β_B μ_B:
// Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11, 043014 (2009)) and is fitted to the logistic estimate by
// minimum χ² with the fit's covariance; intervals are Wald intervals mapped through T = 1/(k_B β).
import { describe, expect, it } from "vitest";
import { exchangeFluctuationForDataset } from "../../src/checks/exchange-fluctuation/exchangeFluctuation.ts";
import { exactExchangeData, fixtureDataset, testContext } from "./exchangeFixtures.ts";

interface ExplanationValue {
  id: string;
  identified: boolean;
  consistent: boolean;
  dof: number | null;
  quantities: { name: string; value: number | null; interval: [number | null, number | null] | null }[];
}

const N = 40000;

function explanationsOf(r: { values: Record<string, unknown> }): Map<string, ExplanationValue> {
  return new Map((r.values.explanations as ExplanationValue[]).map((e) => [e.id, e]));
}

function quantity(e: ExplanationValue, name: string): { value: number; lo: number; hi: number } {
  const q = e.quantities.find((x) => x.name === name)!;
  return { value: q.value as number, lo: q.interval![0] as number, hi: (q.interval![1] ?? Infinity) as number };
}

describe("exchange-fluctuation: effective temperatures as alternatives with intervals", () => {
  for (const lead of ["A", "B"] as const) {
    it(`with T_${lead} misdeclared and heat alone, reports both single-lead explanations with intervals containing the truth and blames neither lead alone`, () => {
      // Declared T_A = 1.25 K, T_B = 0.95 K (units of E0/k_B); the data come from one lead 12 % hotter than declared.
      const declared = { TA: 1.25, TB: 0.95 };
      const truth = lead === "A" ? { TA: 1.4, TB: 0.95 } : { TA: 1.25, TB: 0.95 * 1.12 };
      const g = exactExchangeData({ seed: `ef:explain:${lead}`, n: N, ...declared, drawTA: truth.TA, drawTB: truth.TB, withWork: false, heat: "gaussian", sQ: 1.2 });
      const r = exchangeFluctuationForDataset(fixtureDataset({ id: `wrong-${lead}`, ...declared, work: "zero", ...g }), testContext());
      expect(r.status).toBe("fail");
      const es = explanationsOf(r);
      const a = es.get("lead-A-temperature")!;
      const b = es.get("lead-B-temperature")!;
      expect([a.consistent, a.dof, b.consistent, b.dof]).toEqual([true, 0, true, 0]);
      // The true a_Q = 1/T_B − 1/T_A (exact for the tilted law). Explanation A holds T_B at its declared value, so its
      // target is T_A* = 1/(1/T_B,declared − a_Q); explanation B's is T_B* = 1/(1/T_A,declared + a_Q). For the
      // misdeclared lead these are the true temperatures.
      const aQ = 1 / truth.TB - 1 / truth.TA;
      const targetA = 1 / (1 / declared.TB - aQ);
      const targetB = 1 / (1 / declared.TA + aQ);
      const qa = quantity(a, "T_A");
      const qb = quantity(b, "T_B");
      expect(qa.lo <= targetA && targetA <= qa.hi, `T_A interval [${qa.lo}, ${qa.hi}] against ${targetA}`).toBe(true);
      expect(qb.lo <= targetB && targetB <= qb.hi, `T_B interval [${qb.lo}, ${qb.hi}] against ${targetB}`).toBe(true);
      if (lead === "A") expect(targetA).toBeCloseTo(1.4, 12);
      else expect(targetB).toBeCloseTo(0.95 * 1.12, 12);
      // The summary offers both, as alternatives; no joint state is claimed without work.
      expect(r.summary).toContain("The data cannot tell apart 2 explanations of the departure, each with 95 % intervals: T_A = ");
      expect(r.summary).toContain("; or T_B = ");
      expect(r.summary).toContain("The joint state of both leads is not identified by these data");
      expect(r.tables.map((t) => t.id)).not.toContain("effective-reservoirs");
    });
  }

  it("with work measured identifies the joint state and excludes the innocent lead", () => {
    // β̄ W enters Σ, so β̄ and a_Q together fix β_A and β_B. T_B drawn at 1.2 K, declared 1 K; T_A = 1.5 K.
    const g = exactExchangeData({ seed: "ef:explain:work", n: N, TA: 1.5, TB: 1, drawTB: 1.2, withWork: true, heat: "gaussian", sQ: 1.2, sW: 1.5 });
    const r = exchangeFluctuationForDataset(fixtureDataset({ id: "work", TA: 1.5, TB: 1, work: "measured", ...g }), testContext());
    expect(r.status).toBe("fail");
    const es = explanationsOf(r);
    expect(es.get("lead-B-temperature")!.consistent).toBe(true);
    expect(es.get("lead-A-temperature")!.consistent).toBe(false);
    const joint = es.get("both-temperatures")!;
    expect(joint.identified).toBe(true);
    const tA = quantity(joint, "T_A");
    const tB = quantity(joint, "T_B");
    expect(tA.lo <= 1.5 && 1.5 <= tA.hi).toBe(true);
    expect(tB.lo <= 1.2 && 1.2 <= tB.hi).toBe(true);
    expect(r.summary).toContain("Of the single-lead explanations only one is consistent with the data: T_B = ");
    expect(r.summary).toContain("Jointly identified: T_A = ");
  });
});
