/**
 * Issue 9, rendering: user text (titles, names, descriptions, ids, headers
 * quoted in error messages) is shown as text and cannot run; Markdown links
 * only to http(s) or relative targets; TeX is typeset only from our own
 * equations, with KaTeX's `trust` off. The same archive is loaded in Chromium
 * by test/browser/injection.test.ts.
 */
import fs from "node:fs";
import path from "node:path";
import katex from "katex";
import { beforeAll, describe, expect, it } from "vitest";
import { buildSite, type BuildOutcome } from "../../src/report/buildSite.ts";
import { renderUserTex } from "../../src/report/equations.ts";
import { escapeHtml } from "../../src/report/escape.ts";
import { isAllowedLinkTarget, renderMarkdown } from "../../src/report/markdown.ts";
import { makeHostileArchive, PAYLOADS } from "./hostileArchive.ts";

describe("escapeHtml", () => {
  it("escapes the five characters that can end text or an attribute value (HTML Living Standard §13.1)", () => {
    expect(escapeHtml(`<a href="x" title='y'>&amp;</a>`)).toBe("&lt;a href=&quot;x&quot; title=&#39;y&#39;&gt;&amp;amp;&lt;/a&gt;");
  });
});

describe("Markdown descriptions", () => {
  it("shows raw HTML as text", () => {
    expect(renderMarkdown('<script>alert(1)</script>\n\n<img src=x onerror="alert(2)">')).toBe(
      "<p>&lt;script&gt;alert(1)&lt;/script&gt;</p>\n<p>&lt;img src=x onerror=&quot;alert(2)&quot;&gt;</p>\n",
    );
  });

  it("links to web addresses and relative targets", () => {
    expect(renderMarkdown("[a](https://example.org/x) [b](http://example.org) [c](data/run.csv) [d](#top) [e](../v1/) [f](?q=1)")).toBe(
      '<p><a href="https://example.org/x">a</a> <a href="http://example.org">b</a> <a href="data/run.csv">c</a> <a href="#top">d</a> <a href="../v1/">e</a> <a href="?q=1">f</a></p>\n',
    );
  });

  it("shows links with any other scheme as the Markdown text, never as a link", () => {
    for (const target of ["javascript:alert(1)", "JavaScript:alert(1)", "java\tscript:alert(1)", "vbscript:x", "data:text/html,x", "file:///etc/passwd", "mailto:a@b.c", "//evil.example/x"]) {
      const html = renderMarkdown(`[x](<${target}>)`);
      expect(html, target).not.toContain("<a ");
    }
    expect(renderMarkdown("![i](data:image/png;base64,AAAA)")).toBe("<p>![i](data:image/png;base64,AAAA)</p>\n");
  });

  it("decides link targets by scheme (RFC 3986 §3.1), ignoring tabs and newlines as browsers do", () => {
    expect(isAllowedLinkTarget("https://example.org")).toBe(true);
    expect(isAllowedLinkTarget("HTTP://example.org")).toBe(true);
    expect(isAllowedLinkTarget("data/file.csv")).toBe(true);
    expect(isAllowedLinkTarget("j\na\tvascript:alert(1)")).toBe(false);
    expect(isAllowedLinkTarget(" javascript:alert(1)")).toBe(false);
    expect(isAllowedLinkTarget("ftp://example.org")).toBe(false);
    expect(isAllowedLinkTarget("\\\\server\\share")).toBe(false);
    expect(isAllowedLinkTarget("java%09script:alert(1)")).toBe(false);
    expect(isAllowedLinkTarget("data/a%20b.csv")).toBe(true);
  });

  it("does not typeset TeX in a description", () => {
    expect(renderMarkdown("$\\href{javascript:alert(1)}{x}$")).toBe("<p>$\\href{javascript:alert(1)}{x}$</p>\n");
  });
});

describe("KaTeX on text that is not ours", () => {
  it("keeps trust off: \\href and \\url render no link", () => {
    const html = renderUserTex("\\href{javascript:alert(1)}{x} \\url{javascript:alert(2)}");
    expect(html).not.toContain("<a ");
    expect(html).not.toContain('href="javascript');
  });

  it("stops a self-expanding macro at KaTeX's expansion limit instead of hanging (maxExpand, default 1000)", () => {
    const html = renderUserTex("\\def\\x{\\x\\x}\\x");
    expect(html).toContain('class="katex-error"');
    expect(html).toContain("Too many expansions");
    // The same input with errors thrown names the limit (KaTeX documentation, option maxExpand).
    expect(() => katex.renderToString("\\def\\x{\\x\\x}\\x", { throwOnError: true, trust: false })).toThrow(/Too many expansions/);
  });
});

describe("a built site with hostile text everywhere", () => {
  let outcome: BuildOutcome;
  let report: string;
  let index: string;

  beforeAll(async () => {
    const root = makeHostileArchive();
    outcome = await buildSite({ root, out: path.join(root, "site") });
    report = fs.readFileSync(path.join(outcome.out, "hostile-text", "index.html"), "utf8");
    index = fs.readFileSync(outcome.index, "utf8");
  }, 120_000);

  it("runs the good audit and lists the broken one with its error", () => {
    expect(outcome.audits.map((a) => a.id)).toEqual(["hostile-text"]);
    expect(outcome.broken.map((b) => b.folder)).toEqual(["audits/hostile-broken"]);
  });

  it("contains no markup from user text, only its escaped form", () => {
    for (const html of [report, index]) {
      expect(html).not.toMatch(/<script>alert|<script>window|<img class="injected"|<svg class="injected"|<iframe class="injected"|<b class="injected"|<div class="injected"|<style>body/);
      expect(html).not.toMatch(/href="javascript:/i);
    }
    expect(report).toContain(escapeHtml(PAYLOADS.title));
    expect(report).toContain(escapeHtml(PAYLOADS.author));
    expect(report).toContain(escapeHtml(PAYLOADS.affiliation));
    expect(report).toContain(escapeHtml(PAYLOADS.device));
    expect(report).toContain(escapeHtml(PAYLOADS.sweep));
    expect(index).toContain(escapeHtml(PAYLOADS.title));
    expect(index).toContain(escapeHtml(PAYLOADS.header.replaceAll('"', "'")));
  });

  it("renders the description's web and relative links and shows the javascript: link as text", () => {
    expect(report).toContain('<a href="https://example.org/report">web link</a>');
    expect(report).toContain('<a href="data/run.csv">relative link</a>');
    expect(report).toContain("A [bad link](javascript:window.__injected='link')");
  });

  it("escapes the report's title element exactly once", () => {
    expect(report).toContain(`<title>Draft (unpublished): ${escapeHtml(PAYLOADS.title)} — audit hostile-text</title>`);
  });
});
