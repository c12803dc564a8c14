import { describe, expect, it } from "vitest";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { runChecks } from "../../src/report/runAudit.ts";
import { decideSecondLaw } from "../../src/checks/second-law/secondLaw.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { expectClose } from "../helpers/expectClose.ts";

/**
 * An audit whose entropy production is Sigma = a_Q Q with a_Q = 1/2 per unit:
 * energies in units of k_B·(1 K), reservoir A at 2 K and B at 1 K, so
 * beta_A = 1/2, beta_B = 1 per unit and a_Q = beta_B − beta_A = 1/2.
 */
function gaussianSigmaAudit(meanSigma: number, varSigma: number, n: number, seed: string): string {
  const rng = rngFromText(seed);
  const rows = Array.from({ length: n }, () => String(2 * (meanSigma + Math.sqrt(varSigma) * rng.normal())));
  return tempAudit(
    `id: gaussian-sigma
title: Gaussian entropy production
authors: [{ name: "Test" }]
datasets:
  - id: g
    kind: samples
    file: data/g.csv
    columns: { Q: q }
    energy_unit: kT
    reference_temperature: 1
    reservoirs: { A: { T: 2 }, B: { T: 1 } }
    work: zero
checks: [second-law]
`,
    { "data/g.csv": `q\n${rows.join("\n")}\n` },
  );
}

async function secondLawOf(dir: string) {
  const results = runChecks(await ingestAudit(dir));
  expect(results).toHaveLength(1);
  return results[0];
}

describe("second-law on Gaussian entropy production", () => {
  it("passes on Sigma ~ N(m, 2m), which satisfies the fluctuation relations exactly, and recovers m", async () => {
    // Exact result: a Gaussian Sigma with variance twice its mean obeys P(S)/P(−S) = e^S and
    // <e^−S> = 1 (Seifert, Rep. Prog. Phys. 75, 126001 (2012), §3); its mean is m = 0.5 here.
    const r = await secondLawOf(gaussianSigmaAudit(0.5, 1.0, 20000, "second-law:gauss:0.5"));
    expect(r.status).toBe("pass");
    const v = r.values as { mean_sigma: number; ci: [number, number]; standard_error: number; sd_sigma: number };
    // Tolerance: 4 standard errors of the mean of 2·10^4 draws (sd = 1), i.e. 0.028.
    expectClose(v.mean_sigma, 0.5, { atol: 4 * Math.sqrt(1 / 20000), source: "Seifert 2012: Gaussian Sigma with variance 2m has mean m" });
    // The sample standard deviation of 2·10^4 normal draws is within 3% of sqrt(2m) = 1 (its relative SE is 1/sqrt(2n) = 0.5%).
    expectClose(v.sd_sigma, 1, { rtol: 0.03, source: "variance 2m of the constructed law" });
    expect(v.ci[0]).toBeLessThan(v.mean_sigma);
    expect(v.ci[1]).toBeGreaterThan(v.mean_sigma);
  });

  it("fails when the mean entropy production is significantly negative", async () => {
    const r = await secondLawOf(gaussianSigmaAudit(-0.2, 0.4, 5000, "second-law:negative"));
    expect(r.status).toBe("fail");
    expect(r.summary).toMatch(/significantly negative/);
  });

  it("is inconclusive, with what would settle it, when the spread hides a violation of the margin size", async () => {
    // Mean 0, standard deviation 3, 200 realisations: standard error 0.21 ≫ margin 0.05.
    const r = await secondLawOf(gaussianSigmaAudit(0, 9, 200, "second-law:wide"));
    expect(r.status).toBe("inconclusive");
    expect(r.reason).toMatch(/realisations would resolve the margin/);
  });

  it("is inconclusive with too few realisations", async () => {
    const r = await secondLawOf(gaussianSigmaAudit(1, 2, 12, "second-law:few"));
    expect(r.status).toBe("inconclusive");
    expect(r.summary).toBe("Only 12 realisations: too few to bound the mean entropy production.");
  });
});

describe("decideSecondLaw (verdict from mean and standard error alone)", () => {
  // One-sided z test at alpha = 0.01: the critical value is z = −2.326348 (NIST/SEMATECH e-Handbook §1.3.6.7.1).
  it("fails just beyond the one-sided critical value and not just inside it", () => {
    expect(decideSecondLaw(1000, -2.33, 1, 0.01, 0.95, 0.05).status).toBe("fail");
    expect(decideSecondLaw(1000, -2.32, 1, 0.01, 0.95, 0.05).status).toBe("inconclusive");
  });

  it("passes when the 95% lower bound (mean − 1.644854·SE) clears −margin", () => {
    // z_0.95 = 1.644854 (NIST/SEMATECH e-Handbook §1.3.6.7.1): 0 − 1.644854·0.03 = −0.049 > −0.05.
    expect(decideSecondLaw(1000, 0, 0.03, 0.01, 0.95, 0.05).status).toBe("pass");
    expect(decideSecondLaw(1000, 0, 0.031, 0.01, 0.95, 0.05).status).toBe("inconclusive");
  });
});
