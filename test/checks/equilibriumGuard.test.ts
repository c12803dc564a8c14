import { describe, expect, it } from "vitest";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { runChecks } from "../../src/report/runAudit.ts";
import { tempAudit } from "../helpers/tempAudit.ts";

function audit(TB: number): string {
  // Symmetric transfers of heat between two reservoirs; 200 realisations.
  const rows = Array.from({ length: 200 }, (_, i) => String(((i % 7) - 3) * 0.01));
  return tempAudit(
    `id: equilibrium
title: Equal reservoirs
authors: [{ name: "Test" }]
datasets:
  - id: eq
    kind: samples
    file: data/eq.csv
    columns: { Q: q }
    energy_unit: meV
    reservoirs: { A: { T: 1.0 }, B: { T: ${TB} } }
    work: zero
checks: [second-law, integral-fluctuation]
`,
    { "data/eq.csv": `q\n${rows.join("\n")}\n` },
  );
}

describe("laws that hold trivially when Σ vanishes in every realisation", () => {
  it("are not applicable, with the reason, when both reservoirs share one state and there is no work", async () => {
    // Σ = β̄W + a_Q Q + a_N ΔN is exactly 0 when a_Q = a_N = 0 and W = 0 (physics.md §1): <Σ> >= 0 and
    // <e^−Σ> = 1 then hold with equality for any data (common practice: a test that cannot fail is no test).
    const results = runChecks(await ingestAudit(audit(1.0)));
    expect(results.map((r) => [r.check, r.status])).toEqual([
      ["second-law", "not-applicable"],
      ["integral-fluctuation", "not-applicable"],
    ]);
    expect(results[0].summary).toBe("Not applicable: the entropy production vanishes in every realisation, so the law is satisfied trivially.");
    expect(results[0].equations.length).toBeGreaterThan(0);
  });

  it("run as usual as soon as the reservoirs differ", async () => {
    const results = runChecks(await ingestAudit(audit(0.9)));
    expect(results.every((r) => r.status !== "not-applicable")).toBe(true);
  });
});
