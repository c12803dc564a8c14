/**
 * Issue 9, integrity: published versions are never damaged, and damage done
 * from outside is found. Most of the points are tested where the
 * archive code lives; each test named here asserts the point it is listed for:
 *
 * - a half-written version (a failure injected between the writes and the
 *   rename, at every step): test/archive/publish.test.ts, "a publish that fails
 *   half-way" › "leaves the previous state intact when it fails at …" and
 *   "survives SIGKILL before the rename …" (compares every byte of versions/);
 * - never overwriting a version: publish.test.ts, "does not take a number
 *   another publisher took while it was writing …" (the other publisher's file
 *   is unchanged byte for byte) and "refuses to add a version on top of a
 *   damaged one, naming the damaged file";
 * - two concurrent publishes: publish.test.ts, "lets exactly one of two
 *   publishes started at the same time take the next number" (two processes);
 * - verify finding a changed data file, a changed result and a broken hash
 *   chain: test/archive/verify.test.ts, "names a data file whose bytes changed
 *   …", "names the published result file and the check value that were
 *   tampered with", "detects an earlier version altered after a later one was
 *   published (hash chain)".
 *
 * Added here: bad input never produces a version; damage is reported through
 * the command line with the exit status of the contract; a data file replaced
 * by something unreadable is a finding of verify, not a crash.
 */
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { checkArchive } from "../../src/archive/integrity.ts";
import { listVersionNumbers, LOCK_FILE } from "../../src/archive/layout.ts";
import { publishAudit } from "../../src/archive/publish.ts";
import { verifyVersion } from "../../src/archive/verify.ts";
import { expectedRecordDigest } from "../archive/recordDigest.ts";
import { fixedClock, makeTempArchive } from "../archive/tempArchive.ts";
import { cli } from "./harness.ts";

/** What the versions folder holds (names only), to see that nothing was left behind. */
function versionsFolder(auditDir: string): string[] {
  const dir = path.join(auditDir, "versions");
  return fs.existsSync(dir) ? (fs.readdirSync(dir, { recursive: true }) as string[]).sort() : [];
}

describe("bad input never becomes a version", () => {
  it("publish exits with status 2 on a malformed data file and writes nothing: no version, no staging folder, no lock", async () => {
    const a = makeTempArchive();
    fs.writeFileSync(a.dataFile, "q_meV,n\n0.1,1\n0.2,two\n");
    const r = await cli(["publish", a.auditDir]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toBe('error: data/exchange.csv:3, column "n": expected a number, found "two"\n');
    expect(versionsFolder(a.auditDir)).toEqual([]);
    // Once the data are fixed, the first version is number 1.
    a.writeData();
    expect((await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") })).version).toBe(1);
  });

  it("publish exits with status 2 on a path that leaves the audit folder, and writes nothing", async () => {
    const a = makeTempArchive();
    const yaml = path.join(a.auditDir, "audit.yaml");
    fs.writeFileSync(yaml, fs.readFileSync(yaml, "utf8").replace("file: data/exchange.csv", "file: ../../secret.csv"));
    const r = await cli(["publish", a.auditDir]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('error: audit.yaml datasets[0].file: must stay inside the audit folder, found "../../secret.csv"\n');
    expect(versionsFolder(a.auditDir)).toEqual([]);
  });
});

describe("damage is reported with the exit status of the contract", () => {
  it("verify exits 1 and says NOT REPRODUCED for a changed result", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const file = path.join(a.auditDir, "versions", "1", "result.json");
    fs.writeFileSync(file, fs.readFileSync(file, "utf8").replace('"stamp":"pass"', '"stamp":"fail"'));
    const r = await cli(["verify", a.auditDir]);
    expect(r.code).toBe(1);
    expect(r.stdout).toContain("NOT REPRODUCED: version 1 of dot-lab-exchange");
    expect(r.stdout).toContain("versions/1/result.json: altered after publication");
  });

  it("verify exits 1 for a broken hash chain, and publish refuses to build on it", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    a.writeData(380, 1, "second batch");
    await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") });
    const record = path.join(a.auditDir, "versions", "1", "version.json");
    const original = JSON.parse(fs.readFileSync(record, "utf8"));
    const edited = { ...original, stamp: "inconclusive" };
    fs.writeFileSync(record, JSON.stringify(edited, null, 2));
    const r = await cli(["verify", a.auditDir]);
    expect(r.code).toBe(1);
    expect(r.stdout).toContain("(hash chain broken)");
    a.writeData(360, 1, "third batch");
    const before = versionsFolder(a.auditDir);
    const refused = await cli(["publish", a.auditDir]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toBe(
      `error: ${path.join(a.auditDir, "versions")}: the published versions are damaged, so no version is added on top of them:\n` +
        "  versions/1/version.json: field stamp: expected pass, found inconclusive (as result.json of this version states)\n" +
        `  versions/1/version.json: field digest: expected ${original.digest} (written at publication), found ${expectedRecordDigest(edited)} for the record's other fields as they now read: a field was edited after publication\n` +
        `  versions/1/version.json: altered after version 2 was published: its digest is ${expectedRecordDigest(edited)}, version 2 recorded ${original.digest} (hash chain broken)\n`,
    );
    expect(versionsFolder(a.auditDir)).toEqual(before);
    expect(listVersionNumbers(a.auditDir)).toEqual([1, 2]);
  });

  it("finds a version whose result file was deleted", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    fs.rmSync(path.join(a.auditDir, "versions", "1", "result.json"));
    expect(checkArchive(a.auditDir).problems).toEqual([
      { version: 1, file: "versions/1", message: "versions/1/result.json: missing; a published version holds version.json, result.json and audit.yaml" },
    ]);
  });

  it("reports a data file replaced by a binary file as a finding of verify, with the reader's reason, not as a crash", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    fs.writeFileSync(a.dataFile, Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x00, 0x00]));
    const report = await verifyVersion(a.auditDir);
    expect(report.reproduced).toBe(false);
    expect(report.rerunError).toBe(
      "data/exchange.csv: is not a text file (it has a NUL byte at byte 5); transport-audit reads comma-separated text tables (.csv): export the data as CSV",
    );
    const r = await cli(["verify", a.auditDir]);
    expect(r.code).toBe(1);
    expect(fs.existsSync(path.join(a.auditDir, "versions", LOCK_FILE))).toBe(false);
  });
});
