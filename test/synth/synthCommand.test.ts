import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { cli } from "../helpers/cliInProcess.ts";
import { DOT_PARAMETERS, DOUBLE_DOT_PARAMETERS, FERMION_PARAMETERS, TILTED_PARAMETERS } from "../../src/synth/index.ts";
import { parseParameters } from "../../src/synth/parameters.ts";

describe("transport-audit synth (contract: audit-format.md)", () => {
  for (const [model, table] of [
    ["fermions", FERMION_PARAMETERS],
    ["dot", DOT_PARAMETERS],
    ["double-dot", DOUBLE_DOT_PARAMETERS],
    ["tilted", TILTED_PARAMETERS],
  ] as const) {
    it(`synth ${model} --help lists every parameter with its unit and default`, async () => {
      const r = await cli(["synth", model, "--help"]);
      expect(r.code).toBe(0);
      const help = r.stdout.replace(/\s+/g, " ");
      for (const p of table) {
        expect(help).toContain(`--${p.name} `);
        if (p.unit) expect(help).toContain(`[${p.unit}]`);
        if (p.default !== "") expect(help).toContain(`(default: ${p.default})`);
      }
      expect(help).toContain("--out <dir>");
    });
  }

  it("synth dot --out writes audit.yaml, the histogram and the exact expectations, and run audits them", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-synth-cli-"));
    const r = await cli(["synth", "dot", "--out", dir, "--samples", "2000"]);
    expect(r.code).toBe(0);
    expect(fs.readdirSync(path.join(dir, "data")).sort()).toEqual(["dot.csv", "expected.json", "trace.csv"]);
    const expected = JSON.parse(fs.readFileSync(path.join(dir, "data", "expected.json"), "utf8"));
    let total = 0;
    for (const cell of expected.joint_distribution) total += cell.probability.reduce((s: number, p: number) => s + p, 0);
    expect(Math.abs(total - 1)).toBeLessThan(1e-12);
    const run = await cli(["run", dir, "--json"]);
    expect([0, 1]).toContain(run.code);
    expect(JSON.parse(run.stdout).datasets[0].id).toBe("dot");
    // A second write into the same folder is refused without --force.
    const again = await cli(["synth", "dot", "--out", dir, "--samples", "2000"]);
    expect(again.code).toBe(2);
    expect(again.stderr.trim()).toBe(`error: ${path.join(dir, "audit.yaml")}: already exists; choose another --out folder, or pass --force to replace the simulated audit`);
  });

  it("synth fermions rejects a grid size without a width, naming the option", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-synth-cli-"));
    const r = await cli(["synth", "fermions", "--out", dir, "--lattice-b", "grid", "--size-b", "12"]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe('error: --size-b: a grid needs LxW (e.g. 8x4), found "12"');
  });

  it("synth fermions refuses a Peierls phase without a loop of contact bonds", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-synth-cli-"));
    const r = await cli(["synth", "fermions", "--out", dir, "--flux", "0.5"]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe("error: --flux: a Peierls phase needs a loop, so --bonds must be at least 2 (found 1)");
  });
});

describe("parseParameters", () => {
  it("parseParameters names the option, the unit and a decimal-comma fix in its errors", () => {
    expect(() => parseParameters(DOT_PARAMETERS, { tau: "2,5" })).toThrow('--tau: expected a number of ns, found "2,5" (use a decimal point: 2.5)');
    expect(() => parseParameters(DOT_PARAMETERS, { "rate-a": "0" })).toThrow("--rate-a: must be greater than 0 1/ns, found 0");
    expect(() => parseParameters(DOT_PARAMETERS, { start: "warm" })).toThrow('--start: must be one of stationary, equilibrium-a, found "warm"');
    expect(() => parseParameters(DOT_PARAMETERS, { samples: "1.5" })).toThrow('--samples: expected a whole number, found "1.5"');
    expect(parseParameters(DOT_PARAMETERS, { level: "0.2" })).toMatchObject({ level: 0.2, tau: 5, start: "stationary" });
  });
});
