import { describe, expect, it } from "vitest";
import { runAudit } from "../../src/report/runAudit.ts";
import { renderEquation } from "../../src/report/equations.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { poissonDeviate } from "../../src/stats/poissonDeviate.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { tempAudit } from "../helpers/tempAudit.ts";

const K_B = 1.380649e-23; // J/K, exact (SI 2019)
const MEV = 1.602176634e-22; // J, exact (SI 2019)

/**
 * A single level at eps (meV) above the common chemical potential, crossed by
 * net n electrons: a Skellam count of intensity l tilted by exp(b n/2) with
 * b = a_Q eps + a_N obeys P(n)/P(−n) = e^{b n} exactly (Skellam 1946), and then
 * Q = eps n, dN = n. Its Onsager matrix at zero affinity is l (eps, 1)(eps, 1)^T/tau
 * (second moment of the untilted Skellam law, 2l, divided by 2 tau).
 */
function histogramCsv(seed: string, l: number, eps: number, b: number, n: number): string {
  const rng = rngFromText(seed);
  const counts = new Map<number, number>();
  for (let i = 0; i < n; i++) {
    const k = poissonDeviate(rng, l * Math.exp(b / 2)) - poissonDeviate(rng, l * Math.exp(-b / 2));
    counts.set(k, (counts.get(k) ?? 0) + 1);
  }
  const rows = [...counts.entries()].sort((a, c) => a[0] - c[0]);
  return `q,n,count\n${rows.map(([k, c]) => `${eps * k},${k},${c}`).join("\n")}\n`;
}

describe("fluctuation-dissipation through audit.yaml and histogram files", () => {
  it("reports the contract values in SI as arrays of rows, for a heat-only sweep of histograms", async () => {
    // Heat only (no particle column): a level at eps with the heat affinity a_Q = β_B − β_A; no bias.
    const eps = 0.1; // meV
    const l = 3;
    const tau = 2e-6;
    const TB = 0.5;
    const temps = [0.5, 0.51, 0.52, 0.49, 0.48];
    const betaPerMeV = (T: number) => MEV / (K_B * T);
    const files: Record<string, string> = {};
    const entries = temps.map((TA, k) => {
      const aQ = betaPerMeV(TB) - betaPerMeV(TA);
      files[`data/p${k}.csv`] = histogramCsv(`test:fd-audit:${k}`, l, eps, aQ * eps, 60000);
      return `  - { id: p${k}, kind: samples, file: data/p${k}.csv, columns: { Q: q, count: count }, energy_unit: meV, reservoirs: { A: { T: ${TA} }, B: { T: ${TB} } }, tau: ${tau}, work: zero, sweep: heat-steps }`;
    });
    const dir = tempAudit(
      `id: fd-audit
title: Heat-only sweep
authors: [{ name: "Test Author" }]
datasets:
${entries.join("\n")}
checks:
  - fluctuation-dissipation
`,
      files,
    );
    const { result } = await runAudit(dir);
    const fd = result.checks.find((c) => c.check === "fluctuation-dissipation")!;
    expect(fd.dataset).toBe("heat-steps");
    const v = fd.values as Record<string, number[][] | number[]>;
    for (const key of ["L_response", "L_fluctuation", "L_weighted", "D"]) {
      expect(Array.isArray(v[key]) && (v[key] as number[][]).every((row) => Array.isArray(row))).toBe(true);
    }
    expect(v.spontaneous).toHaveLength(1);
    // Exact L_QQ = l eps² / tau in J²/s; the Skellam mean 2 l sinh(b/2) is linear to 0.1 % at these b (|b| ≤ 0.1).
    const exact = (l * (eps * MEV) ** 2) / tau;
    const L = v.L_response as number[][];
    const Lse = v.L_response_se as number[][];
    expectClose(L[0][0], exact, { atol: 4 * Lse[0][0], source: "exact tilted Skellam: L_QQ = l eps²/τ; 4 standard errors" });
    const Lf = v.L_fluctuation as number[][];
    const Lfse = v.L_fluctuation_se as number[][];
    expectClose(Lf[0][0], exact, { atol: 4 * Lfse[0][0] + 0.002 * exact, source: "exact Skellam second moment 2l eps²/(2τ); 4 standard errors plus 0.2 % curvature of cosh(b/2)" });
    expect(v.D).toEqual([[0]]);
    expect(fd.status).toBe("pass");
    for (const tex of fd.equations) expect(renderEquation(tex)).toContain("katex");
    expect(JSON.parse(JSON.stringify(result)).checks[0].values.L_response).toEqual(L);
  });

  it("says the sweep is not applicable, and why, when heat and particles are proportional (a single level)", async () => {
    // Q = ε n exactly in every realisation: the (Q, ΔN) second-moment matrix is l(ε, 1)(ε, 1)ᵀ/τ, of rank one, so no
    // number of realisations separates the two columns of L (before this was said, the fit failed as "not positive
    // definite" and asked for more runs).
    const eps = 0.08; // meV
    const TB = 0.6;
    const betaPerMeV = (T: number) => MEV / (K_B * T);
    const points = [
      { TA: 0.6, mu: 0 },
      { TA: 0.62, mu: 0 },
      { TA: 0.6, mu: 0.002 },
      { TA: 0.58, mu: -0.002 },
    ];
    const files: Record<string, string> = {};
    const entries = points.map((p, k) => {
      const b = (betaPerMeV(TB) - betaPerMeV(p.TA)) * eps + betaPerMeV(p.TA) * p.mu;
      files[`data/p${k}.csv`] = histogramCsv(`test:fd-single-level:${k}`, 2, eps, b, 20000);
      return `  - { id: p${k}, kind: samples, file: data/p${k}.csv, columns: { Q: q, dN: n, count: count }, energy_unit: meV, reservoirs: { A: { T: ${p.TA}, mu: ${p.mu} }, B: { T: ${TB}, mu: 0 } }, tau: 1.0e-6, work: zero, sweep: level-sweep }`;
    });
    const dir = tempAudit(`id: fd-level\ntitle: Single level\nauthors: [{ name: "Test Author" }]\ndatasets:\n${entries.join("\n")}\nchecks:\n  - fluctuation-dissipation\n`, files);
    const { result } = await runAudit(dir);
    const fd = result.checks[0];
    expect(fd.status).toBe("not-applicable");
    expect(fd.reason).toBe(
      'sweep "level-sweep": Q = ε·ΔN with ε = 0.08 meV in every realisation (transport through a single level), so the heat and particle channels are one current driven by the combination a_Q·ε + a_N; the 2×2 response and fluctuation matrices are singular whatever the number of realisations, and this check does not fit the single combined channel.',
    );
  });
});
