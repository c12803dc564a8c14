import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";

const REPO = path.resolve(import.meta.dirname, "..", "..");
const BIN = path.join(REPO, "bin", "transport-audit.js");

function cli(args: string[], cwd = REPO) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: "utf8", env: { ...process.env, NO_COLOR: "1" } });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe("transport-audit command line (contract: audit-format.md)", () => {
  it("run --json prints only the result document, with the contract's fields", () => {
    const r = cli(["run", "audits/vq3-heat-exchange", "--json"]);
    const doc = JSON.parse(r.stdout);
    expect(doc.audit).toBe("vq3-heat-exchange");
    expect(doc.tool).toEqual({ name: "transport-audit", version: expect.any(String) });
    expect(doc.fingerprint).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(["pass", "fail", "inconclusive"]).toContain(doc.stamp);
    // energy_unit: an extension of the contract, the unit the report shows this dataset's energies in.
    expect(doc.datasets[0]).toEqual({ id: "pulse-40ns", file: "data/exchange.csv", sha256: expect.stringMatching(/^[0-9a-f]{64}$/), rows: expect.any(Number), energy_unit: "meV", format: "comma-separated text (detected)" });
    const secondLaw = doc.checks.find((c: { check: string }) => c.check === "second-law");
    expect(secondLaw).toMatchObject({ dataset: "pulse-40ns", status: expect.any(String), summary: expect.any(String) });
    expect(secondLaw.values.ci).toHaveLength(2);
    expect(r.code).toBe(doc.checks.some((c: { status: string }) => c.status === "fail") ? 1 : 0);
  });

  it("run prints a summary table with the stamp and fingerprint", () => {
    const r = cli(["run", "audits/vq3-heat-exchange"]);
    expect(r.stdout).toContain("second-law");
    expect(r.stdout).toMatch(/stamp: (PASS|FAIL|INCONCLUSIVE)\s+fingerprint: sha256:/);
  });

  it("exits 2 and names file, row and column when a data cell is malformed", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-cli-"));
    fs.cpSync(path.join(REPO, "audits", "vq3-heat-exchange"), dir, { recursive: true });
    const csv = path.join(dir, "data", "exchange.csv");
    const lines = fs.readFileSync(csv, "utf8").split("\n");
    lines[3] = lines[3].replace(/^[^,]*/, "oops");
    fs.writeFileSync(csv, lines.join("\n"));
    const r = cli(["run", dir, "--json"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toContain('error: data/exchange.csv:4, column "q_meV": expected a number, found "oops"');
  });

  it("exits 2 with the key path when audit.yaml is invalid", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-cli-"));
    fs.writeFileSync(path.join(dir, "audit.yaml"), "id: x\ntitle: t\nauthors: []\ndatasets: []\n");
    const r = cli(["run", dir]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("audit.yaml:3 authors: must list at least one author");
  });

  it("init scaffolds an audit.yaml that validates, and refuses to overwrite it", () => {
    const dir = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ta-init-")), "My Device");
    expect(cli(["init", dir]).code).toBe(0);
    const yaml = fs.readFileSync(path.join(dir, "audit.yaml"), "utf8");
    expect(yaml).toContain("id: my-device");
    // The scaffold comes with an example data file, so the new audit runs at once (test/cli/initRun.test.ts).
    fs.rmSync(path.join(dir, "data", "run-1.csv"));
    const r = cli(["run", dir]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("data/run-1.csv: cannot read the file (does it exist?)");
    const again = cli(["init", dir]);
    expect(again.code).toBe(2);
    expect(again.stderr).toContain("already exists; init never overwrites an audit");
  });
});
