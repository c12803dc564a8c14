import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { runAudit } from "../../src/report/runAudit.ts";
import { synthDot } from "../../src/synth/index.ts";
import { writeAuditFolder } from "../../src/synth/auditFolder.ts";

/**
 * A series of `synth dot` audits at four window lengths, as one audit whose datasets share `series:`.
 * The long-time slope of ln P(n)/P(−n) is the affinity per electron (Lebowitz & Spohn, J. Stat. Phys. 95,
 * 333 (1999); Bagrets & Nazarov, PRB 67, 085316 (2003)); expected.json gives the dynamics' true value.
 */
async function dotSeries(extra: Record<string, string>) {
  const taus = [2, 4, 8, 16];
  const files: Record<string, string> = {};
  let yaml = "";
  let head = "";
  let expected: { affinity_per_electron: { true: number; declared: number }; effective_temperature_a_K: number | null } | null = null;
  for (const tau of taus) {
    const a = synthDot({ ...extra, tau: String(tau), samples: "30000", seed: `series ${tau}` });
    files[`data/dot-${tau}.csv`] = a.files["data/dot.csv"];
    expected = JSON.parse(a.files["data/expected.json"]);
    const [before, dataset] = a.yaml.split("datasets:\n");
    head = `${before}datasets:\n`;
    yaml += dataset.replace("checks: all\n", "").replace("id: dot", `id: dot-${tau}`).replace("data/dot.csv", `data/dot-${tau}.csv`) + "    series: dot-windows\n";
  }
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-ssc-"));
  writeAuditFolder(dir, { yaml: `${head}${yaml}checks: [steady-state-counting]\n`, files });
  const { result } = await runAudit(dir);
  return { check: result.checks.find((c) => c.check === "steady-state-counting")!, expected: expected! };
}

describe("steady-state-counting", () => {
  it("recovers the affinity per electron of a stationary dot from four window lengths", async () => {
    const { check, expected } = await dotSeries({});
    const v = check.values as { affinity_infinite: number; ci: [number, number]; declared_affinity: number };
    // The interval is a 95 % one: with this fixed seed it covers the exact value (the bench measures coverage).
    expect(v.ci[0]).toBeLessThanOrEqual(expected.affinity_per_electron.true);
    expect(v.ci[1]).toBeGreaterThanOrEqual(expected.affinity_per_electron.true);
    expect(Math.abs(v.declared_affinity - expected.affinity_per_electron.declared)).toBeLessThan(1e-12);
    expect(check.status).not.toBe("fail");
    expect(check.plots[0].id).toBe("slope-against-inverse-window");
  }, 120000);

  it("fails when a heating detector drives lead A's transitions, and recovers lead A's effective temperature", async () => {
    const { check, expected } = await dotSeries({ "detector-heating": "2.5" });
    expect(check.status).toBe("fail");
    const eff = (check.values as { effective: { T_A: number; T_A_ci: [number, number] } }).effective;
    // The bath drives every A transition, so lead A's effective temperature is exactly the bath's, 2.5 K.
    expect(expected.effective_temperature_a_K).toBe(2.5);
    expect(eff.T_A_ci[0]).toBeLessThanOrEqual(2.5);
    expect(eff.T_A_ci[1]).toBeGreaterThanOrEqual(2.5);
    expect(check.summary).toContain("lead A at");
  }, 120000);
});
