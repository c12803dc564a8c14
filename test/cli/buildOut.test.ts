/**
 * `build --out` never removes what a user owns: an output folder in the
 * archive is refused, a folder build did not write is replaced only with
 * --force, the new site is written aside and swapped in when complete, so a
 * full disk (injected with TRANSPORT_AUDIT_FAULT) leaves the old site whole.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { cli } from "../robustness/harness.ts";
import { makeTempArchive, TEST_AUDIT_ID } from "../archive/tempArchive.ts";
import { stagingFolders, treeDigest } from "../helpers/treeDigest.ts";
import { FAULT_ENV } from "../../src/output/faults.ts";
import { SITE_STAMP_FILE } from "../../src/output/siteFolder.ts";

afterEach(() => {
  delete process.env[FAULT_ENV];
});

describe("build --out inside the archive", () => {
  it("refuses the audits folder, the root, an audit folder and a folder inside one, and changes nothing", async () => {
    const a = makeTempArchive();
    const before = treeDigest(a.root);
    const refusals: [string, string][] = [
      [
        path.join(a.root, "audits"),
        `error: --out ${a.root}/audits: is the audits folder ${a.root}/audits; the site is written into a folder of its own (for example ${a.root}/site), which build replaces whole\n`,
      ],
      [a.root, `error: --out ${a.root}: is the archive root ${a.root}; the site is written into a folder of its own (for example ${a.root}/site), which build replaces whole\n`],
      [
        path.dirname(a.root),
        `error: --out ${path.dirname(a.root)}: contains the archive root ${a.root}; the site is written into a folder of its own (for example ${a.root}/site), which build replaces whole\n`,
      ],
      [
        a.auditDir,
        `error: --out ${a.auditDir}: lies inside the audits folder ${a.root}/audits; the site must be written outside the audits (for example ${a.root}/site)\n`,
      ],
      [
        path.join(a.auditDir, "data", "site"),
        `error: --out ${a.auditDir}/data/site: lies inside the audits folder ${a.root}/audits; the site must be written outside the audits (for example ${a.root}/site)\n`,
      ],
    ];
    for (const [out, message] of refusals) {
      const r = await cli(["build", "--root", a.root, "--out", out]);
      expect({ code: r.code, stderr: r.stderr, stdout: r.stdout }).toEqual({ code: 2, stderr: message, stdout: "" });
    }
    expect(treeDigest(a.root)).toEqual(before);
  });

  it("sees through a symbolic link to the archive: a link elsewhere naming the audits folder is refused", async () => {
    const a = makeTempArchive();
    const link = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ta-link-")), "site");
    fs.symlinkSync(path.join(a.root, "audits"), link);
    const before = treeDigest(a.root);
    const r = await cli(["build", "--root", a.root, "--out", link]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`error: --out ${link}: is the audits folder ${a.root}/audits; the site is written into a folder of its own (for example ${a.root}/site), which build replaces whole\n`);
    expect(treeDigest(a.root)).toEqual(before);
  });
});

describe("build --out a folder build did not write", () => {
  it("refuses a non-empty folder without the stamp and keeps its files; replaces it with --force", async () => {
    const a = makeTempArchive();
    const out = path.join(a.root, "notes");
    fs.mkdirSync(out);
    fs.writeFileSync(path.join(out, "thesis-draft.tex"), "\\documentclass{article}\n");
    const r = await cli(["build", "--root", a.root, "--out", out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      `error: --out ${out}: holds files that transport-audit build did not write (no ${SITE_STAMP_FILE} in it), and build replaces the whole folder. ` +
        "Name a new or empty folder, or pass --force to replace this one and everything in it\n",
    );
    expect(fs.readFileSync(path.join(out, "thesis-draft.tex"), "utf8")).toBe("\\documentclass{article}\n");

    const forced = await cli(["build", "--root", a.root, "--out", out, "--force"]);
    expect(forced.code).toBe(0);
    expect(fs.existsSync(path.join(out, "thesis-draft.tex"))).toBe(false);
    expect(fs.existsSync(path.join(out, SITE_STAMP_FILE))).toBe(true);
    expect(fs.existsSync(path.join(out, TEST_AUDIT_ID, "index.html"))).toBe(true);
  });

  it("refuses a file and a symbolic link as the output folder", async () => {
    const a = makeTempArchive();
    const file = path.join(a.root, "site.txt");
    fs.writeFileSync(file, "mine\n");
    const r = await cli(["build", "--root", a.root, "--out", file]);
    expect([r.code, r.stderr]).toEqual([2, `error: --out ${file}: is a file, not a folder; build writes a folder of pages, so name a new or empty folder\n`]);
    const elsewhere = fs.mkdtempSync(path.join(os.tmpdir(), "ta-elsewhere-"));
    const link = path.join(a.root, "site-link");
    fs.symlinkSync(elsewhere, link);
    const l = await cli(["build", "--root", a.root, "--out", link]);
    expect([l.code, l.stderr]).toEqual([2, `error: --out ${link}: is a symbolic link (to ${elsewhere}); build replaces the output folder whole, so name the folder itself\n`]);
    expect(fs.readFileSync(file, "utf8")).toBe("mine\n");
  });

  it("rebuilds its own stamped site in place and leaves the folders beside it alone", async () => {
    const a = makeTempArchive();
    const out = path.join(a.root, "site");
    const neighbour = path.join(a.root, "site-notes.txt");
    fs.writeFileSync(neighbour, "kept\n");
    expect((await cli(["build", "--root", a.root, "--out", out])).code).toBe(0);
    expect((await cli(["build", "--root", a.root, "--out", out])).code).toBe(0);
    expect(fs.readFileSync(neighbour, "utf8")).toBe("kept\n");
    expect(fs.existsSync(path.join(out, TEST_AUDIT_ID, "index.html"))).toBe(true);
    expect(stagingFolders(a.root)).toEqual([]);
  });
});

describe("build --out a site built before sites were stamped", () => {
  it("replaces a folder whose index page names transport-audit as its generator, and refuses one whose page does not", async () => {
    const a = makeTempArchive();
    const out = path.join(a.root, "site");
    expect((await cli(["build", "--root", a.root, "--out", out])).code).toBe(0);
    fs.rmSync(path.join(out, SITE_STAMP_FILE)); // as an earlier version of the tool left it
    expect((await cli(["build", "--root", a.root, "--out", out])).code).toBe(0);
    expect(fs.existsSync(path.join(out, SITE_STAMP_FILE))).toBe(true);

    const other = path.join(a.root, "homepage");
    fs.mkdirSync(other);
    fs.writeFileSync(path.join(other, "index.html"), '<!doctype html><meta name="generator" content="a hand-written page">\n');
    const r = await cli(["build", "--root", a.root, "--out", other]);
    expect(r.code).toBe(2);
    expect(fs.readdirSync(other)).toEqual(["index.html"]);
  });
});

describe("build on a full disk", () => {
  it("keeps the old site whole, removes the staged one and says which file and why in one line (exit 2)", async () => {
    const a = makeTempArchive();
    const out = path.join(a.root, "site");
    expect((await cli(["build", "--root", a.root, "--out", out])).code).toBe(0);
    const before = treeDigest(out);
    a.writeData(300, 1, "changed data"); // the new site would differ
    process.env[FAULT_ENV] = "build:rendered:ENOSPC";
    const r = await cli(["build", "--root", a.root, "--out", out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(new RegExp(`^error: ${a.root}/\\.staging-${process.pid}@[^/]+-[A-Za-z0-9]{6}/index\\.html: no space left on the device \\(ENOSPC, write\\)\\n$`));
    expect(r.stdout).toBe("");
    expect(treeDigest(out)).toEqual(before);
    expect(stagingFolders(a.root)).toEqual([]);
  });
});
