import { describe, expect, it } from "vitest";
import { renderEquation } from "../../src/report/equations.ts";
import { exchangeFluctuation } from "../../src/checks/exchange-fluctuation/exchangeFluctuation.ts";
import { integralFluctuation } from "../../src/checks/integral-fluctuation/integralFluctuation.ts";
import { secondLaw } from "../../src/checks/second-law/secondLaw.ts";
import { work } from "../../src/checks/work/work.ts";
import { weightedIdentity } from "../../src/checks/weighted-identity/weightedIdentity.ts";
import { uncertaintyRelation } from "../../src/checks/uncertainty-relation/uncertaintyRelation.ts";
import { exactExchangeData, fixtureDataset, testContext } from "./exchangeFixtures.ts";

describe("exchange-statistics checks describe themselves completely", () => {
  const g = exactExchangeData({ seed: "eq", n: 5000, TA: 1.5, TB: 1, muA: 0.3, withWork: true, heat: "gaussian", sQ: 1, sW: 0.5, lN: 1 });
  const d = fixtureDataset({ id: "eq", TA: 1.5, TB: 1, muA: 0.3, work: "measured", ...g });
  const audit = { dir: "", definition: {} as never, datasets: [d] };
  for (const check of [exchangeFluctuation, integralFluctuation, secondLaw, work, weightedIdentity, uncertaintyRelation]) {
    it(`${check.id}: every equation renders with KaTeX (throwOnError) and every plot has a title and a text alternative`, () => {
      const [r] = check.run(audit, testContext());
      expect(r.equations.length).toBeGreaterThan(0);
      for (const tex of r.equations) expect(renderEquation(tex)).toContain("katex");
      expect(r.references.length).toBeGreaterThan(0);
      for (const p of r.plots) {
        expect(p.title.length).toBeGreaterThan(5);
        expect(p.alt.length).toBeGreaterThan(40);
      }
    });
  }

  it("exchange-fluctuation draws the mirrored histogram, the log-ratio with error bars and the joint Q–ΔN histogram", () => {
    const [r] = exchangeFluctuation.run(audit, testContext());
    expect(r.plots.map((p) => p.id)).toEqual(["sigma-mirror", "log-ratio", "joint-q-dn"]);
    expect(r.plots[0].y.scale).toBe("log");
    const points = r.plots[1].series.find((s) => s.type === "points");
    expect(points && points.type === "points" && points.yErr?.length).toBe(points && points.type === "points" ? points.x.length : -1);
    expect(r.plots[1].series.map((s) => s.name)).toContain("relation, slope 1");
  });

  it("integral-fluctuation draws the running estimate with its band", () => {
    const [r] = integralFluctuation.run(audit, testContext());
    expect(r.plots[0].series.map((s) => s.type)).toEqual(["band", "line", "rule"]);
  });
});
