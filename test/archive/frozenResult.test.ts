/**
 * A frozen result document is data read back from disk, which anyone may have
 * edited. build and verify check it against the result schema before using
 * any of its fields: an audit id "../../x" once made build write a page
 * outside its output folder.
 */
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { cli } from "../robustness/harness.ts";
import { publishAudit } from "../../src/archive/publish.ts";
import { readVersion } from "../../src/archive/readVersion.ts";
import { thrownBy } from "../helpers/thrown.ts";
import { ArchiveError } from "../../src/errors.ts";
import { fixedClock, makeTempArchive, TEST_AUDIT_ID, type TempArchive } from "./tempArchive.ts";

function resultFile(a: TempArchive): string {
  return path.join(a.auditDir, "versions", "1", "result.json");
}

/** Rewrite the frozen result document of version 1 through its parsed value. */
function editFrozen(a: TempArchive, edit: (doc: Record<string, any>) => void): void {
  const doc = JSON.parse(fs.readFileSync(resultFile(a), "utf8"));
  edit(doc);
  fs.writeFileSync(resultFile(a), JSON.stringify(doc));
}

describe("a frozen result whose audit id leaves the site", () => {
  it("build refuses the version, names file and key, exits 2 and writes nothing outside its output folder", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    editFrozen(a, (doc) => {
      doc.audit = "../../x";
    });
    const out = path.join(a.root, "site");
    const r = await cli(["build", "--root", a.root, "--out", out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      [
        "built 1 audit report(s): 0 failed, 1 with damaged versions",
        `damaged versions in audits/${TEST_AUDIT_ID}:`,
        '  versions/1/result.json: audit: must use only lower-case letters, digits and single hyphens, e.g. dot-junction-sweep, found "../../x"',
        "",
      ].join("\n"),
    );
    // The page of that version would have gone to <out>/../../x/index.html.
    expect(fs.existsSync(path.resolve(out, "..", "..", "x"))).toBe(false);
    expect(fs.existsSync(path.resolve(out, "..", "x"))).toBe(false);
    expect(fs.readdirSync(out).sort()).toEqual([".transport-audit-site", "assets", TEST_AUDIT_ID, "index.html"]);
  });

  it("verify says which file and key make the version unreadable, and that it is not reproduced", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    editFrozen(a, (doc) => {
      doc.audit = "../../x";
    });
    const r = await cli(["verify", a.auditDir]);
    expect(r.code).toBe(1);
    expect(r.stdout).toContain('versions/1/result.json: audit: must use only lower-case letters, digits and single hyphens, e.g. dot-junction-sweep, found "../../x"\n');
    expect(r.stdout).toContain("NOT REPRODUCED: version 1 of");
  });
});

describe("readVersion checks the frozen result against the result schema", () => {
  let a: TempArchive;
  let original: string;
  beforeAll(async () => {
    a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    original = fs.readFileSync(resultFile(a), "utf8");
  });

  function problemWith(edit: (doc: Record<string, any>) => void): string {
    fs.writeFileSync(resultFile(a), original);
    editFrozen(a, edit);
    return thrownBy(ArchiveError, () => readVersion(a.auditDir, 1)).message;
  }

  it("accepts the document publish wrote", () => {
    fs.writeFileSync(resultFile(a), original);
    expect(readVersion(a.auditDir, 1).result.audit).toBe(TEST_AUDIT_ID);
  });

  it("refuses a data file path that leaves the audit folder, absolute or relative", () => {
    expect(problemWith((d) => (d.datasets[0].file = "../../secret.csv"))).toBe(
      "versions/1/result.json: datasets[0].file: must be a path relative to the audit folder that stays inside it (no '..', not absolute, '/' between folders), found \"../../secret.csv\"",
    );
    expect(problemWith((d) => (d.datasets[0].file = "/etc/passwd"))).toBe(
      "versions/1/result.json: datasets[0].file: must be a path relative to the audit folder that stays inside it (no '..', not absolute, '/' between folders), found \"/etc/passwd\"",
    );
  });

  it("refuses ids, statuses and stamps outside the contract, listing every problem", () => {
    expect(
      problemWith((d) => {
        d.datasets[0].id = "run 1";
        d.checks[0].check = "Second_Law";
        d.checks[0].status = "great";
        d.stamp = "ok";
      }),
    ).toBe(
      [
        "versions/1/result.json: stamp: must be one of pass, fail, inconclusive, found \"ok\"",
        "versions/1/result.json: datasets[0].id: must start with a letter or digit and use only letters, digits, '-' and '_', found \"run 1\"",
        "versions/1/result.json: checks[0].check: must use only lower-case letters, digits and single hyphens, e.g. dot-junction-sweep, found \"Second_Law\"",
        "versions/1/result.json: checks[0].status: must be one of pass, fail, inconclusive, not-applicable, info, found \"great\"",
      ].join("\n"),
    );
  });

  it("refuses a number that is not finite (JSON's 1e999 reads as Infinity) and a missing member", () => {
    fs.writeFileSync(resultFile(a), original.replace(/"rows":\d+/, '"rows":1e999'));
    expect(thrownBy(ArchiveError, () => readVersion(a.auditDir, 1)).message).toBe(
      ["versions/1/result.json: datasets[0].rows: must be a whole number, found Infinity", "versions/1/result.json: datasets[0].rows: must be a finite number, found Infinity"].join("\n"),
    );
    expect(problemWith((d) => delete d.fingerprint)).toBe("versions/1/result.json: fingerprint: is required, found nothing");
  });

  it("refuses a file of the version that is a symbolic link", () => {
    fs.writeFileSync(resultFile(a), original);
    const elsewhere = path.join(a.root, "elsewhere.json");
    fs.writeFileSync(elsewhere, original);
    fs.rmSync(resultFile(a));
    fs.symlinkSync(elsewhere, resultFile(a));
    expect(thrownBy(ArchiveError, () => readVersion(a.auditDir, 1)).message).toBe("versions/1/result.json: is a symbolic link; a published version keeps its own files, so it is not read");
    fs.rmSync(resultFile(a));
    fs.writeFileSync(resultFile(a), original);
  });
});
