/**
 * Issue 9, paths: a data path in audit.yaml that leaves the audit folder —
 * with `..`, as an absolute path, or through a symbolic link whose target lies
 * outside — is refused before any data file is read, with exit status 2.
 * confinePath itself is unit-tested in test/config/confinePath.test.ts; here the
 * refusal is checked through ingestion and the command line.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { PathError } from "../../src/errors.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { cli, VALID_CSV, VALID_YAML } from "./harness.ts";
import { rejectedWith } from "../helpers/thrown.ts";

/**
 * An archive-like layout: <root>/outside.csv (a valid table beside the audit
 * folder) and <root>/audit/ whose first dataset is a file with a bad cell.
 * If ingestion read anything before checking the paths, the bad cell would be
 * reported instead of the path.
 */
function layout(secondFile: string): { root: string; audit: string } {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), "ta-paths-"));
  const audit = path.join(root, "audit");
  fs.mkdirSync(path.join(audit, "data"), { recursive: true });
  fs.writeFileSync(path.join(root, "outside.csv"), VALID_CSV);
  fs.writeFileSync(path.join(audit, "data", "run.csv"), "q,n\nnot-a-number,1\n");
  const second = VALID_YAML.slice(VALID_YAML.indexOf("  - id: run-1")).replace("id: run-1", "id: run-2").replace("file: data/run.csv", `file: ${JSON.stringify(secondFile)}`);
  fs.writeFileSync(path.join(audit, "audit.yaml"), VALID_YAML + second);
  return { root, audit };
}

async function refusal(audit: string): Promise<string> {
  return (await rejectedWith(PathError, () => ingestAudit(audit))).message;
}

describe("data paths stay inside the audit folder", () => {
  it("refuses .. that climbs out, before reading the other datasets", async () => {
    const { audit } = layout("../outside.csv");
    expect(await refusal(audit)).toBe('audit.yaml datasets[1].file: must stay inside the audit folder, found "../outside.csv"');
  });

  it("refuses .. hidden in the middle of a path", async () => {
    const { audit } = layout("data/../../outside.csv");
    expect(await refusal(audit)).toBe('audit.yaml datasets[1].file: must stay inside the audit folder, found "data/../../outside.csv"');
  });

  it("refuses an absolute path, even one that points inside the folder", async () => {
    const { audit } = layout("/placeholder");
    const inside = path.join(audit, "data", "run.csv");
    const yamlPath = path.join(audit, "audit.yaml");
    fs.writeFileSync(yamlPath, fs.readFileSync(yamlPath, "utf8").replace('"/placeholder"', JSON.stringify(inside)));
    expect(await refusal(audit)).toBe(`audit.yaml datasets[1].file: must be a path inside the audit folder, found the absolute path ${JSON.stringify(inside)}`);
  });

  it("refuses a symbolic link whose target is outside", async () => {
    const { root, audit } = layout("data/link.csv");
    fs.symlinkSync(path.join(root, "outside.csv"), path.join(audit, "data", "link.csv"));
    expect(await refusal(audit)).toBe(`audit.yaml datasets[1].file: "data/link.csv" is a link to ${fs.realpathSync(path.join(root, "outside.csv"))}, outside the audit folder`);
  });

  it("refuses a file inside a linked folder whose target is outside", async () => {
    const { root, audit } = layout("shared/outside.csv");
    fs.symlinkSync(root, path.join(audit, "shared"));
    expect(await refusal(audit)).toBe(`audit.yaml datasets[1].file: "shared/outside.csv" is a link to ${fs.realpathSync(path.join(root, "outside.csv"))}, outside the audit folder`);
  });

  it("accepts a symbolic link that stays inside the folder", async () => {
    const { audit } = layout("data/alias.csv");
    fs.writeFileSync(path.join(audit, "data", "run.csv"), VALID_CSV);
    fs.symlinkSync(path.join(audit, "data", "run.csv"), path.join(audit, "data", "alias.csv"));
    const ingested = await ingestAudit(audit);
    expect(ingested.datasets.map((d) => d.rows)).toEqual([5, 5]);
  });

  it("exits with status 2 through the command line, with the key path on stderr and nothing on stdout", async () => {
    const { audit } = layout("../outside.csv");
    const r = await cli(["run", audit, "--json"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toBe('error: audit.yaml datasets[1].file: must stay inside the audit folder, found "../outside.csv"\n');
  });
});
