import { describe, expect, it } from "vitest";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { runChecks } from "../../src/report/runAudit.ts";
import type { CheckResult } from "../../src/checks/types.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { tiltedSkellam } from "./exchangeFixtures.ts";

/**
 * Discrete exchange data: heat in half-units of k_B·1 K (Q = n/2 with n a tilted Skellam count,
 * so P(Q)/P(−Q) = e^{a_Q Q} exactly) and electrons ΔN a tilted Skellam count. Written once as raw
 * realisations and once as a histogram with a `count` column.
 */
function exchangeFiles(seed: string, n: number, aQ: number, aN: number, withWork: boolean): { raw: string; hist: string } {
  const rng = rngFromText(seed);
  const rows: string[] = [];
  const cells = new Map<string, number>();
  for (let i = 0; i < n; i++) {
    const q = tiltedSkellam(rng, 2, aQ / 2) / 2;
    const dn = tiltedSkellam(rng, 1, aN);
    const w = withWork ? tiltedSkellam(rng, 1, 1.25 / 2) / 2 : 0; // W = m/2 tilted by β̄ = (1/2 + 2)/2 = 1.25 per unit
    const line = withWork ? `${q},${dn},${w}` : `${q},${dn}`;
    rows.push(line);
    cells.set(line, (cells.get(line) ?? 0) + 1);
  }
  const header = withWork ? "q,n,w" : "q,n";
  return {
    raw: `${header}\n${rows.join("\n")}\n`,
    hist: `${header},count\n${[...cells].map(([k, c]) => `${k},${c}`).join("\n")}\n`,
  };
}

function audit(file: string, columns: string, TA: number, TB: number, muA: number, work: string): string {
  return `id: histogram-check
title: Histogram against raw realisations
authors: [{ name: "Test" }]
datasets:
  - id: d
    kind: samples
    file: data/${file}
    columns: ${columns}
    energy_unit: kT
    reference_temperature: 1
    reservoirs: { A: { T: ${TA}, mu: ${muA} }, B: { T: ${TB}, mu: 0 } }
    work: ${work}
checks: all
`;
}

async function runBoth(seed: string, opts: { TA: number; TB: number; muA: number; drawAQ: number; drawAN: number; withWork: boolean; work: string }) {
  const f = exchangeFiles(seed, 40_000, opts.drawAQ, opts.drawAN, opts.withWork);
  const cols = opts.withWork ? "{ Q: q, dN: n, W: w }" : "{ Q: q, dN: n }";
  const rawDir = tempAudit(audit("raw.csv", cols, opts.TA, opts.TB, opts.muA, opts.work), { "data/raw.csv": f.raw });
  const histDir = tempAudit(audit("hist.csv", cols.replace(" }", ", count: count }"), opts.TA, opts.TB, opts.muA, opts.work), { "data/hist.csv": f.hist });
  const raw = runChecks(await ingestAudit(rawDir));
  const hist = runChecks(await ingestAudit(histDir));
  return { raw, hist };
}

function byCheck(results: CheckResult[]): Record<string, CheckResult> {
  return Object.fromEntries(results.map((r) => [r.check, r]));
}

function expectSameVerdicts(raw: CheckResult[], hist: CheckResult[]) {
  const a = byCheck(raw);
  const b = byCheck(hist);
  expect(Object.keys(b).sort()).toEqual(Object.keys(a).sort());
  for (const id of Object.keys(a)) expect(`${id}: ${b[id].status}`).toBe(`${id}: ${a[id].status}`);
  // The likelihood and the means are the same sums, added in another order.
  const sa = a["exchange-fluctuation"].values as { slope: number };
  const sb = b["exchange-fluctuation"].values as { slope: number };
  expectClose(sb.slope, sa.slope, { rtol: 1e-6, source: "identical weighted likelihood (identity); Newton stops within 1e-4 standard errors" });
  const ia = a["integral-fluctuation"].values as { mean: number };
  const ib = b["integral-fluctuation"].values as { mean: number };
  expectClose(ib.mean, ia.mean, { rtol: 1e-12, source: "identical weighted mean (identity)" });
}

describe("a histogram (count) dataset gives the same verdicts as its raw realisations", () => {
  it("on exact data without work (all pass)", async () => {
    // T_A = 2, T_B = 0.5 (a_Q = 2 − 1/2 = 1.5 per unit), μ_A = 0.6 at β_A = 1/2 (a_N = 0.3).
    const { raw, hist } = await runBoth("hist:exact", { TA: 2, TB: 0.5, muA: 0.6, drawAQ: 1.5, drawAN: 0.3, withWork: false, work: "zero" });
    expectSameVerdicts(raw, hist);
    expect(byCheck(raw)["exchange-fluctuation"].status, byCheck(raw)["exchange-fluctuation"].summary).toBe("pass");
    expect(byCheck(raw)["integral-fluctuation"].status).toBe("pass");
  });

  it("on data drawn at another temperature (fail)", async () => {
    const { raw, hist } = await runBoth("hist:wrong", { TA: 2, TB: 0.5, muA: 0.6, drawAQ: 1.2, drawAN: 0.3, withWork: false, work: "zero" });
    expectSameVerdicts(raw, hist);
    expect(byCheck(hist)["exchange-fluctuation"].status).toBe("fail");
  });

  it("on data with work declared zero (the work check fails)", async () => {
    const { raw, hist } = await runBoth("hist:work", { TA: 2, TB: 0.5, muA: 0.6, drawAQ: 1.5, drawAN: 0.3, withWork: true, work: "zero" });
    expectSameVerdicts(raw, hist);
    expect(byCheck(hist)["work"].status).toBe("fail");
  });
});
