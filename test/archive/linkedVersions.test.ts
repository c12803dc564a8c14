/**
 * A `versions` folder that is a symbolic link would make publish write its
 * records elsewhere, and verify and build trust records kept anywhere. All
 * three refuse it with exit 2 and a message naming the link and its target.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { cli } from "../robustness/harness.ts";
import { makeTempArchive, TEST_AUDIT_ID } from "./tempArchive.ts";
import { treeDigest } from "../helpers/treeDigest.ts";

function linkedArchive() {
  const a = makeTempArchive();
  const elsewhere = fs.mkdtempSync(path.join(os.tmpdir(), "ta-elsewhere-"));
  fs.writeFileSync(path.join(elsewhere, "unrelated.txt"), "someone else's folder\n");
  fs.symlinkSync(elsewhere, path.join(a.auditDir, "versions"));
  const message = `${a.auditDir}/versions: is a symbolic link (to ${elsewhere}); published versions must be kept in the audit folder itself, not elsewhere. Replace the link by the folder it points to`;
  return { a, elsewhere, message };
}

describe("a versions folder that is a symbolic link", () => {
  it("publish refuses it and writes nothing where it points", async () => {
    const { a, elsewhere, message } = linkedArchive();
    const before = treeDigest(elsewhere);
    const r = await cli(["publish", a.auditDir]);
    expect([r.code, r.stderr, r.stdout]).toEqual([2, `error: ${message}\n`, ""]);
    expect(treeDigest(elsewhere)).toEqual(before);
    expect(fs.readdirSync(elsewhere)).toEqual(["unrelated.txt"]);
  });

  it("verify refuses it", async () => {
    const { a, message } = linkedArchive();
    const r = await cli(["verify", a.auditDir]);
    expect([r.code, r.stderr, r.stdout]).toEqual([2, `error: ${message}\n`, ""]);
  });

  it("build leaves the audit off the site and exits 2 with the reason", async () => {
    const { a, message } = linkedArchive();
    const r = await cli(["build", "--root", a.root, "--out", path.join(a.root, "site")]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`built 0 audit report(s): 0 failed, 1 could not be audited\ncould not audit audits/${TEST_AUDIT_ID}:\n  ${message}\n`);
  });
});
