import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { exampleHistogramCsv } from "../../src/cli/commands/init.ts";
import { cli } from "../helpers/cliInProcess.ts";

describe("init and run for a new user", () => {
  it("init writes an example dataset matching the commented audit.yaml, and the new audit runs and passes", async () => {
    const dir = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ta-init-run-")), "first-audit");
    expect((await cli(["init", dir])).code).toBe(0);
    expect(fs.readFileSync(path.join(dir, "data", "run-1.csv"), "utf8")).toBe(exampleHistogramCsv());
    const run = await cli(["run", dir, "--json"]);
    expect(run.code).toBe(0);
    const doc = JSON.parse(run.stdout) as { stamp: string; checks: { check: string; status: string; values: Record<string, unknown> }[] };
    expect(doc.stamp).toBe("pass");
    // The example is built to obey the exchange relation (exact before rounding to whole counts): slope 1 within its interval.
    const exchange = doc.checks.find((c) => c.check === "exchange-fluctuation")!;
    const [lo, hi] = exchange.values.slope_ci as [number, number];
    expect(lo <= 1 && 1 <= hi).toBe(true);
  });

  it("the example's counts for ±Q stand in the ratio exp(a_Q Q) of the exchange relation, up to whole-count rounding", () => {
    // a_Q = 1/k_B(1 K) − 1/k_B(1.3 K) with k_B = 0.086 173 332 62 meV/K (CODATA 2018, exact); at Q = 1 meV: ratio e^{2.677}.
    const rows = exampleHistogramCsv().trim().split("\n").slice(1).map((l) => l.split(",").map(Number));
    const at = (q: number) => rows.find((r) => Math.abs(r[0] - q) < 1e-9)![3];
    const aQ = 1 / 0.08617333262 - 1 / (0.08617333262 * 1.3);
    // Tolerance: each count is rounded by at most 0.5, relative 0.5/count on each side.
    const ratio = at(1) / at(-1);
    expect(Math.abs(Math.log(ratio) - aQ)).toBeLessThan(0.5 / at(-1) + 0.5 / at(1) + 1e-9);
  });

  it("run accepts the audit.yaml itself in place of its folder", async () => {
    const dir = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ta-init-run-")), "second");
    await cli(["init", dir]);
    const run = await cli(["run", path.join(dir, "audit.yaml"), "--json"]);
    expect(run.code).toBe(0);
    expect(JSON.parse(run.stdout).audit).toBe("second");
  });
});
