import { createHash } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { afterEach, describe, expect, it, vi } from "vitest";
import { publishAudit } from "../../src/archive/publish.ts";
import { formatVerifyReport, verifyVersion } from "../../src/archive/verify.ts";
import { cli } from "../helpers/cliInProcess.ts";
import { expectedRecordDigest } from "./recordDigest.ts";
import { auditYaml, fixedClock, makeTempArchive } from "./tempArchive.ts";

const sha256Hex = (bytes: Buffer | string) => createHash("sha256").update(bytes).digest("hex");

afterEach(() => vi.restoreAllMocks());

async function publishedArchive() {
  const a = makeTempArchive();
  const out = await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
  return { a, out };
}

describe("verifyVersion", () => {
  it("reproduces a freshly published version to the last digit", async () => {
    const { a } = await publishedArchive();
    const r = await verifyVersion(a.auditDir);
    expect(r).toMatchObject({ audit: "dot-lab-exchange", version: 1, published: "2026-11-30", reproduced: true, chain: [], data: [], result: [], notes: [] });
    expect(formatVerifyReport(r, a.auditDir).split("\n")).toEqual([
      `verifying dot-lab-exchange version 1 (published 2026-11-30 with ${r.tool.frozen.name} ${r.tool.frozen.version}) in ${a.auditDir}`,
      "hash chain: versions 1 to 1 intact",
      "data files: every digest matches",
      "result: identical to the frozen result document (canonical JSON, every digit)",
      "REPRODUCED: version 1 of dot-lab-exchange",
    ]);
  });

  it("names the published result file and the check value that were tampered with", async () => {
    const { a, out } = await publishedArchive();
    const file = path.join(a.auditDir, "versions", "1", "result.json");
    const text = fs.readFileSync(file, "utf8");
    const mean = (out.result.checks[0].values as { mean_sigma: number }).mean_sigma;
    const forged = mean + 0.5;
    // Change one number, keeping the canonical form, as a careful forger would.
    const tampered = text.replace(`"mean_sigma":${mean}`, `"mean_sigma":${forged}`);
    expect(tampered).not.toBe(text);
    fs.writeFileSync(file, tampered);
    const r = await verifyVersion(a.auditDir);
    expect(r.reproduced).toBe(false);
    expect(r.chain).toEqual([
      {
        version: 1,
        file: "versions/1/result.json",
        message: `altered after publication: its digest is sha256:${sha256Hex(tampered)}, the version record says sha256:${sha256Hex(text)}`,
      },
    ]);
    expect(r.data).toEqual([]);
    expect(r.result).toEqual([{ where: "check second-law on pulse", path: "values.mean_sigma", frozen: String(forged), now: String(mean) }]);
    expect(formatVerifyReport(r, a.auditDir)).toContain(`  check second-law on pulse: values.mean_sigma: published ${forged}, re-run ${mean}`);
  });

  it("names a data file whose bytes changed, with both digests, and the values that moved", async () => {
    const { a } = await publishedArchive();
    const original = fs.readFileSync(a.dataFile);
    a.writeData(400, 1, "a different run");
    const r = await verifyVersion(a.auditDir);
    expect(r.reproduced).toBe(false);
    expect(r.chain).toEqual([]);
    expect(r.data).toEqual([{ dataset: "pulse", file: "data/exchange.csv", frozen: sha256Hex(original), now: sha256Hex(fs.readFileSync(a.dataFile)) }]);
    expect(r.result.map((d) => `${d.where}: ${d.path}`)).toContain("check second-law on pulse: values.mean_sigma");
    expect(r.result.map((d) => `${d.where}: ${d.path}`)).toContain("document: fingerprint");
    // The data digest is reported once, under data files, not again as a result difference.
    expect(r.result.map((d) => d.path)).not.toContain("datasets[0].sha256");
    expect(formatVerifyReport(r, a.auditDir)).toContain(
      `  data/exchange.csv (dataset pulse): changed; published sha256 ${sha256Hex(original)}, now ${sha256Hex(fs.readFileSync(a.dataFile))}`,
    );
  });

  it("names a data file that has gone missing and says why the audit could not be re-run", async () => {
    const { a } = await publishedArchive();
    fs.rmSync(a.dataFile);
    const r = await verifyVersion(a.auditDir);
    expect(r.reproduced).toBe(false);
    expect(r.data).toEqual([{ dataset: "pulse", file: "data/exchange.csv", frozen: expect.stringMatching(/^[0-9a-f]{64}$/), now: null }]);
    expect(r.rerunError).toMatch(/exchange\.csv/);
  });

  it("detects an earlier version altered after a later one was published (hash chain)", async () => {
    const { a } = await publishedArchive();
    a.writeData(380, 1, "second batch");
    await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") });
    const record = path.join(a.auditDir, "versions", "1", "version.json");
    const original = JSON.parse(fs.readFileSync(record, "utf8"));
    const backdated = { ...original, published: "2026-10-01T09:00:00Z" };
    fs.writeFileSync(record, JSON.stringify(backdated, null, 2));
    const r = await verifyVersion(a.auditDir, { version: 2 });
    expect(r.reproduced).toBe(false);
    expect(r.chain).toEqual([
      {
        version: 1,
        file: "versions/1/version.json",
        message:
          `field digest: expected ${original.digest} (written at publication), found ${expectedRecordDigest(backdated)} for the record's other fields as they now read: ` +
          "a field was edited after publication; every field that result.json or the previous version can confirm agrees, so the edited one is covered by this digest alone: published (now 2026-10-01T09:00:00Z)",
      },
      {
        version: 1,
        file: "versions/1/version.json",
        message: `altered after version 2 was published: its digest is ${expectedRecordDigest(backdated)}, version 2 recorded ${original.digest} (hash chain broken)`,
      },
    ]);
    // Version 2's own data and result are untouched: only the chain is reported.
    expect(r.data).toEqual([]);
    expect(r.result).toEqual([]);
  });

  it("re-runs the version's frozen audit.yaml, so a later edit of the definition does not disturb it", async () => {
    const { a } = await publishedArchive();
    fs.writeFileSync(path.join(a.auditDir, "audit.yaml"), auditYaml().replace("margin: 0.05", "margin: 0.2"));
    const r = await verifyVersion(a.auditDir);
    expect(r.reproduced).toBe(true);
    expect(r.notes).toEqual(["audit.yaml has changed since version 1; the version's own frozen copy (versions/1/audit.yaml) is what was re-run."]);
  });

  it("refuses a version that does not exist, and an audit with no version, naming what there is", async () => {
    const { a } = await publishedArchive();
    await expect(verifyVersion(a.auditDir, { version: 3 })).rejects.toThrow(`--version 3: ${a.auditDir} has no such version; published versions: 1`);
    const b = makeTempArchive();
    await expect(verifyVersion(b.auditDir)).rejects.toThrow(
      `${path.join(b.auditDir, "versions")}: no published version to verify; publish one first with: transport-audit publish ${b.auditDir}`,
    );
  });
});

describe("transport-audit verify (exit status of the contract)", () => {
  it("exits 0 when reproduced, 1 when not, 2 when there is nothing to verify", async () => {
    const { a } = await publishedArchive();
    const ok = await cli(["verify", a.auditDir, "--version", "1"]);
    expect(ok.code).toBe(0);
    expect(ok.stdout).toContain("REPRODUCED: version 1 of dot-lab-exchange");
    a.writeData(400, 1, "a different run");
    const bad = await cli(["verify", a.auditDir]);
    expect(bad.code).toBe(1);
    expect(bad.stdout).toContain("NOT REPRODUCED: version 1 of dot-lab-exchange");
    const none = await cli(["verify", makeTempArchive().auditDir]);
    expect(none.code).toBe(2);
    const badNumber = await cli(["verify", a.auditDir, "--version", "two"]);
    expect(badNumber.code).toBe(2);
    expect(badNumber.stderr).toContain(`option '--version <N>' argument 'two' is invalid. expected a version number 1, 2, 3, …, found "two"`);
  });

  it("publish prints the version and the verify command, and refuses a repeat with exit status 2", async () => {
    const a = makeTempArchive();
    const first = await cli(["publish", a.auditDir]);
    expect(first.code).toBe(0);
    expect(first.stdout).toContain(`published dot-lab-exchange version 1 in ${path.join(a.auditDir, "versions", "1")}`);
    expect(first.stdout).toContain(`verify it with: transport-audit verify ${a.auditDir} --version 1`);
    const again = await cli(["publish", a.auditDir]);
    expect(again.code).toBe(2);
    expect(again.stderr).toContain("nothing changed since version 1");
  });
});
