/**
 * A full disk, a failing disk or a read-only mount while publishing ends with
 * one line naming the file and the cause (exit 2), never a stack trace, and
 * leaves no version, no staging folder and no lock. The errors are injected
 * at a step of the publish (TRANSPORT_AUDIT_FAULT), as the disk would raise
 * them on that file.
 */
import fs from "node:fs";
import path from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { cli, STACK_LINE } from "./harness.ts";
import { makeTempArchive } from "../archive/tempArchive.ts";
import { FAULT_ENV } from "../../src/output/faults.ts";
import { stagingFolders } from "../helpers/treeDigest.ts";

afterEach(() => {
  delete process.env[FAULT_ENV];
});

describe("publish when the disk fails", () => {
  const cases = [
    ["staged-result", "ENOSPC", "result.json", "no space left on the device"],
    ["staged-manifest", "EIO", "version.json", "input/output error (a failing disk or a lost network file system)"],
    ["staged-definition", "EROFS", "audit.yaml", "the file system is read-only"],
  ] as const;
  for (const [step, code, file, cause] of cases) {
    it(`${code} at ${step}: one line naming the file, exit 2, nothing left behind`, async () => {
      const a = makeTempArchive();
      process.env[FAULT_ENV] = `publish:${step}:${code}`;
      const r = await cli(["publish", a.auditDir]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(new RegExp(`^error: ${a.auditDir}/versions/\\.staging-${process.pid}@[^/]+-[A-Za-z0-9]{6}/${file.replace(".", "\\.")}: ${cause.replace(/[()]/g, "\\$&")} \\(${code}, write\\)\\n$`));
      expect(r.stderr).not.toMatch(STACK_LINE);
      expect(r.stdout).toBe("");
      expect(fs.readdirSync(path.join(a.auditDir, "versions"))).toEqual([]);
      expect(stagingFolders(path.join(a.auditDir, "versions"))).toEqual([]);
    });
  }
});
