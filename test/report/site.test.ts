import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { buildSite, type BuildOutcome } from "../../src/report/buildSite.ts";

const REPO = path.resolve(import.meta.dirname, "..", "..");

describe("the demo archive builds into a static site", () => {
  let outcome: BuildOutcome;
  let out: string;
  beforeAll(async () => {
    out = fs.mkdtempSync(path.join(os.tmpdir(), "ta-site-"));
    outcome = await buildSite({ root: REPO, out });
  });

  it("audits every demo audit without input errors", () => {
    expect(outcome.broken).toEqual([]);
    expect(outcome.audits.length).toBeGreaterThanOrEqual(2);
  });

  it("writes an index that links every audit with its stamp", () => {
    const html = fs.readFileSync(path.join(out, "index.html"), "utf8");
    for (const a of outcome.audits) {
      expect(html).toContain(`href="${a.id}/index.html"`);
    }
    expect(html).toMatch(/class="stamp stamp-(pass|fail|inconclusive)"/);
  });

  it("gives every audit a page with a KaTeX-typeset equation and an inline SVG plot", () => {
    for (const a of outcome.audits) {
      const html = fs.readFileSync(path.join(out, a.id, "index.html"), "utf8");
      expect(html, a.id).toContain('class="katex-display"');
      expect(html, a.id).toContain("<math");
      expect(html, a.id).not.toContain("katex-error");
      expect(html, a.id).toMatch(/<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg" class="plot"[^>]*role="img"/);
      expect(html, a.id).toContain(a.fingerprint);
    }
  });

  it("copies KaTeX's stylesheet and fonts beside the pages", () => {
    expect(fs.existsSync(path.join(out, "assets", "katex", "katex.min.css"))).toBe(true);
    expect(fs.readdirSync(path.join(out, "assets", "katex", "fonts")).some((f) => f.endsWith(".woff2"))).toBe(true);
  });
});

describe("user text is escaped", () => {
  it("shows raw HTML in titles and descriptions as text", async () => {
    const root = fs.mkdtempSync(path.join(os.tmpdir(), "ta-escape-"));
    const src = path.join(REPO, "audits", "vq3-heat-exchange");
    const dst = path.join(root, "audits", "vq3-heat-exchange");
    fs.cpSync(src, dst, { recursive: true });
    // Without published versions the landing page renders the current definition (as a draft).
    fs.rmSync(path.join(dst, "versions"), { recursive: true, force: true });
    const yamlPath = path.join(dst, "audit.yaml");
    const yaml = fs
      .readFileSync(yamlPath, "utf8")
      .replace(/^title: .*$/m, 'title: "Dot <script>alert(1)</script> & co"')
      .replace(/^description: \|\n/m, "description: |\n  <img src=x onerror=alert(2)> raw html\n");
    fs.writeFileSync(yamlPath, yaml);
    const out = path.join(root, "site");
    const outcome = await buildSite({ root, out });
    expect(outcome.broken).toEqual([]);
    const html = fs.readFileSync(path.join(out, "vq3-heat-exchange", "index.html"), "utf8");
    expect(html).not.toContain("<script>alert(1)</script>");
    expect(html).toContain("Dot &lt;script&gt;alert(1)&lt;/script&gt; &amp; co");
    expect(html).not.toContain("<img src=x");
    expect(html).toContain("&lt;img src=x onerror=alert(2)&gt;");
  });
});
