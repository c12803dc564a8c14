/**
 * `pdf --out` never writes over a file of an audit folder (its data, its
 * audit.yaml, its versions) or over a folder, and a full disk while writing
 * the PDF leaves the previous file whole. The refusals come before any work,
 * so these tests need no browser.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { cli } from "./harness.ts";
import { makeTempArchive } from "../archive/tempArchive.ts";
import { treeDigest } from "../helpers/treeDigest.ts";
import { writeFileReplacing } from "../../src/output/pdfTarget.ts";
import { FAULT_ENV } from "../../src/output/faults.ts";
import { describeSystemError, findSystemError } from "../../src/output/systemError.ts";

afterEach(() => {
  delete process.env[FAULT_ENV];
});

describe("pdf --out", () => {
  it("refuses to write over the audit's data, its audit.yaml and its versions, and changes none of them", async () => {
    const a = makeTempArchive();
    fs.mkdirSync(path.join(a.auditDir, "versions", "1"), { recursive: true });
    fs.writeFileSync(path.join(a.auditDir, "versions", "1", "result.json"), "{}");
    const before = treeDigest(a.auditDir);
    const cases: [string, string][] = [
      [
        a.dataFile,
        `error: --out ${a.dataFile}: is a file of the audit folder ${a.auditDir} (data/exchange.csv); pdf never writes over an audit's data, definition or versions. Name a file outside the audit folder\n`,
      ],
      [
        path.join(a.auditDir, "audit.yaml"),
        `error: --out ${a.auditDir}/audit.yaml: is a file of the audit folder ${a.auditDir} (audit.yaml); pdf never writes over an audit's data, definition or versions. Name a file outside the audit folder\n`,
      ],
      [
        path.join(a.auditDir, "versions", "1", "result.json"),
        `error: --out ${a.auditDir}/versions/1/result.json: is a file of the audit folder ${a.auditDir} (versions/1/result.json); pdf never writes over an audit's data, definition or versions. Name a file outside the audit folder\n`,
      ],
      [
        path.join(a.auditDir, "versions", "2.pdf"),
        `error: --out ${a.auditDir}/versions/2.pdf: lies among the published versions of ${a.auditDir}, which are never changed; name a file outside the audit folder\n`,
      ],
    ];
    for (const [out, message] of cases) {
      const r = await cli(["pdf", a.auditDir, "--out", out]);
      expect([r.code, r.stderr, r.stdout]).toEqual([2, message, ""]);
    }
    expect(treeDigest(a.auditDir)).toEqual(before);
  });

  it("refuses a symbolic link outside the audit that points at its data", async () => {
    const a = makeTempArchive();
    const link = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ta-pdf-")), "report.pdf");
    fs.symlinkSync(a.dataFile, link);
    const r = await cli(["pdf", a.auditDir, "--out", link]);
    expect([r.code, r.stderr]).toEqual([
      2,
      `error: --out ${link}: is a file of the audit folder ${a.auditDir} (data/exchange.csv); pdf never writes over an audit's data, definition or versions. Name a file outside the audit folder\n`,
    ]);
  });

  it("refuses an existing folder with a message, not a stack trace", async () => {
    const a = makeTempArchive();
    const folder = fs.mkdtempSync(path.join(os.tmpdir(), "ta-pdf-dir-"));
    const r = await cli(["pdf", a.auditDir, "--out", folder]);
    expect([r.code, r.stderr]).toEqual([2, `error: --out ${folder}: is a folder; name the PDF file to write in it, for example ${folder}/report.pdf\n`]);
  });
});

describe("writing the PDF on a full disk", () => {
  it("keeps the previous file, leaves no partial file, and explains the error in one line", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-pdf-full-"));
    const out = path.join(dir, "audit.pdf");
    fs.writeFileSync(out, "%PDF-1.7 previous\n");
    process.env[FAULT_ENV] = "pdf:printed:ENOSPC";
    const err = await writeFileReplacing(out, new TextEncoder().encode("%PDF-1.7 new\n"), "pdf:printed").then(
      () => null,
      (e: unknown) => e,
    );
    const system = findSystemError(err);
    expect(system && describeSystemError(system)).toBe(`${dir}/.audit.pdf.${process.pid}.partial: no space left on the device (ENOSPC, write)`);
    expect(fs.readFileSync(out, "utf8")).toBe("%PDF-1.7 previous\n");
    expect(fs.readdirSync(dir)).toEqual(["audit.pdf"]);
  });
});
