import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { parse as parseYaml } from "yaml";
import { publishAudit } from "../../src/archive/publish.ts";
import { buildSite } from "../../src/report/buildSite.ts";
import { auditYaml, fixedClock, makeTempArchive, TEST_AUDIT_ID } from "../archive/tempArchive.ts";

const read = (file: string) => fs.readFileSync(file, "utf8");

/** Page text without tags, white space collapsed: what a reader sees. */
function visibleText(html: string): string {
  return html
    .replace(/<svg[\s\S]*?<\/svg>/g, " ")
    .replace(/<[^>]+>/g, " ")
    .replace(/&amp;/g, "&")
    .replace(/&quot;/g, '"')
    .replace(/&#39;/g, "'")
    .replace(/&lt;/g, "<")
    .replace(/&gt;/g, ">")
    .replace(/\s+/g, " ");
}

/** Every link and resource address of a page. */
function addresses(html: string): string[] {
  return [...html.matchAll(/\s(?:href|src)="([^"]*)"/g)].map((m) => m[1]);
}

/** The site must work from file:// and under any base path: no address may start at the server root. */
function expectRelativeOnly(html: string): void {
  for (const a of addresses(html)) {
    if (/^(https?:|mailto:)/.test(a)) continue; // external: ORCID, DOI, the version's permanent address
    expect(a.startsWith("/"), `address ${a} is absolute`).toBe(false);
  }
}

function outDir(): string {
  return fs.mkdtempSync(path.join(os.tmpdir(), "ta-site-"));
}

describe("versioned site", () => {
  it("shows an audit with no published version only as a marked draft", async () => {
    const a = makeTempArchive();
    const out = outDir();
    const outcome = await buildSite({ root: a.root, out });
    expect(outcome.versionPages).toEqual([]);
    expect(outcome.draftPages).toEqual([]);
    const landing = read(path.join(out, TEST_AUDIT_ID, "index.html"));
    expect(landing).toContain("<title>Draft (unpublished): Heat &amp; electron exchange through test dot T-1 — audit dot-lab-exchange</title>");
    const text = visibleText(landing);
    expect(text).toContain("Draft: not a published version");
    expect(text).toContain("No version has been published yet.");
    expect(text).toContain(`npx transport-audit publish audits/${TEST_AUDIT_ID}`);
    expect(text).not.toContain("Cite this version as");
    expect(fs.existsSync(path.join(out, TEST_AUDIT_ID, "v1"))).toBe(false);
    expect(read(path.join(out, TEST_AUDIT_ID, "badge.svg"))).toContain("transport audit: draft, unpublished");
    expect(JSON.parse(read(path.join(out, TEST_AUDIT_ID, "draft-result.json"))).audit).toBe(TEST_AUDIT_ID);
    expectRelativeOnly(landing);
  });

  it("renders every version at its own address, the changes since the previous one, the history, the draft and the downloads", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    a.writeData(400, -1); // heat now flows from cold to hot: the second law fails
    await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") });
    fs.writeFileSync(path.join(a.auditDir, "audit.yaml"), auditYaml().replace("margin: 0.05", "margin: 0.1")); // unpublished change
    const out = outDir();
    const outcome = await buildSite({ root: a.root, out });
    expect(outcome.versionPages.map((p) => p.versioning?.path)).toEqual([`${TEST_AUDIT_ID}/v1/index.html`, `${TEST_AUDIT_ID}/v2/index.html`]);
    const dir = path.join(out, TEST_AUDIT_ID);

    // Version 2: what changed since version 1.
    const v2 = read(path.join(dir, "v2", "index.html"));
    const v2text = visibleText(v2);
    expect(v2).toContain("<title>Heat &amp; electron exchange through test dot T-1 — audit dot-lab-exchange, version 2</title>");
    expect(v2text).toContain("Version 2 , published 2026-12-01. This is the latest version.");
    expect(v2text).toContain("Changes since version 1");
    expect(v2text).toContain("Overall verdict: Pass → Fail .");
    expect(v2text).toContain("Checks whose verdict changed Check Dataset Before Now second-law pulse Pass Fail");
    expect(v2text).toMatch(/Data files that changed File Dataset Change Before Now data\/exchange\.csv pulse changed sha256 [0-9a-f]{12}…, 400 rows sha256 [0-9a-f]{12}…, 400 rows/);
    expect(v2text).toContain("There are unpublished changes (draft)");
    expect(v2).toContain('href="../draft/index.html"');
    expect(v2text).toContain(`npx transport-audit verify audits/${TEST_AUDIT_ID} --version 2`);
    expect(v2text).toContain("Permanent address: https://audits.example.org/dot-lab-exchange/v2/");
    expectRelativeOnly(v2);

    // Version 1 points to the newer version and has no changes section.
    const v1 = read(path.join(dir, "v1", "index.html"));
    expect(visibleText(v1)).toContain("A newer version exists: version 2");
    expect(v1).toContain('href="../v2/index.html"');
    expect(visibleText(v1)).not.toContain("Changes since");

    // The landing page shows the latest version and the history, newest first.
    const landing = read(path.join(dir, "index.html"));
    const landingText = visibleText(landing);
    expect(landingText).toContain("Version 2 , published 2026-12-01.");
    expect(landingText).toMatch(/Version history .* version 2 \(latest\) 2026-12-01 ✗ Fail .* version 1 2026-11-30 ✓ Pass/);
    expect(landing).toContain('href="v1/index.html"');
    expect(landing).toContain('href="v2/CITATION.cff"');
    expectRelativeOnly(landing);

    // The draft is marked as such and lists what is not yet published.
    const draft = read(path.join(dir, "draft", "index.html"));
    const draftText = visibleText(draft);
    expect(draft).toContain("<title>Draft (unpublished): Heat &amp; electron exchange through test dot T-1 — audit dot-lab-exchange</title>");
    expect(draftText).toContain("Draft: not a published version");
    expect(draftText).toContain("The latest published version is version 2");
    expect(draftText).toContain("Unpublished changes since version 2");
    expect(draftText).toContain("The audit definition (audit.yaml) changed.");
    expect(draftText).toContain("This draft is not frozen, so there is nothing to verify yet.");
    expectRelativeOnly(draft);

    // Downloads beside each version page.
    for (const f of ["result.json", "version.json", "CITATION.cff", "citation.bib", "citation.txt", "checks-table.tex", "numbers.csv", "badge.svg"]) {
      expect(fs.existsSync(path.join(dir, "v2", f)), f).toBe(true);
      expect(v2).toContain(`href="../v2/${f}"`);
    }
    expect(read(path.join(dir, "v2", "result.json"))).toBe(read(path.join(a.auditDir, "versions", "2", "result.json")));
    const cff = parseYaml(read(path.join(dir, "v2", "CITATION.cff"))) as Record<string, unknown>;
    expect(cff.version).toBe("2");
    expect(read(path.join(dir, "v2", "badge.svg"))).toContain("transport audit: fail, version 2");
  });

  it("keeps the published versions on the site when the current state cannot be run, and flags a damaged version", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const resultFile = path.join(a.auditDir, "versions", "1", "result.json");
    fs.writeFileSync(resultFile, read(resultFile).replace('"stamp":"pass"', '"stamp":"pass" '));
    fs.rmSync(a.dataFile);
    const out = outDir();
    const outcome = await buildSite({ root: a.root, out });
    expect(outcome.broken.map((b) => b.folder)).toEqual([`audits/${TEST_AUDIT_ID}`]);
    const landing = visibleText(read(path.join(out, TEST_AUDIT_ID, "index.html")));
    expect(landing).toContain("Version 1 , published 2026-11-30.");
    expect(landing).toContain("The stored versions of this audit are damaged.");
    expect(landing).toContain("versions/1/result.json: altered after publication");
  });
});
