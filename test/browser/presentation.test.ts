/**
 * What a reader sees of numbers, units and equations, on every report page of
 * the demo archive (built and served on 127.0.0.1, read in headless
 * Chromium), and the printed forms (full and compact) read back with
 * pdftotext. Rules: SI Brochure, 9th ed. (2019), §5.4 (numbers and units:
 * no computer e-notation, powers of ten written ×10ⁿ) and Table 7 (prefixes:
 * a quantity with a unit keeps its number between 0.1 and 1000 where a prefix
 * exists).
 */
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Page } from "playwright-core";
import { launchChromium, type LaunchedBrowser } from "../../src/report/pdf/launchChromium.ts";
import { printAuditPdf, type PdfOutcome } from "../../src/report/pdf/printAuditPdf.ts";
import { PROJECT_ROOT, startDemoSite, type DemoSite } from "./demoSite.ts";

let site: DemoSite;
let chromium: LaunchedBrowser;
let tmp: string;
let full: PdfOutcome;
let compact: PdfOutcome;
const PHONE = 390; // CSS pixels: the narrow phone screen of the requirement

beforeAll(async () => {
  site = await startDemoSite();
  chromium = await launchChromium();
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "transport-audit-presentation-"));
  const audit = path.join(PROJECT_ROOT, "audits", "vq3-heat-exchange");
  full = await printAuditPdf({ auditDir: audit, out: path.join(tmp, "full.pdf") });
  compact = await printAuditPdf({ auditDir: path.join(PROJECT_ROOT, "audits", "dd7-counting-backaction"), out: path.join(tmp, "compact.pdf"), compact: true });
});

afterAll(async () => {
  await chromium?.close();
  await site?.close();
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
});

const reportUrls = () => site.outcome.audits.map((a) => `${site.server.origin}/${a.id}/index.html`);

async function withPage<T>(url: string, width: number, fn: (page: Page) => Promise<T>): Promise<T> {
  const context = await chromium.browser.newContext({ viewport: { width, height: 800 } });
  try {
    const page = await context.newPage();
    await page.goto(url, { waitUntil: "load" });
    return await fn(page);
  } finally {
    await context.close();
  }
}

/** Text a person reads: the page without code (digests, file names) and without KaTeX's hidden MathML copy. */
const READ_TEXT = `(() => {
  const clone = document.body.cloneNode(true);
  clone.querySelectorAll("code, .katex-mathml, script, style").forEach((e) => e.remove());
  const svgText = [...document.querySelectorAll("svg text")].map((t) => t.textContent).join("\\n");
  return clone.innerText + "\\n" + svgText;
})()`;

const pageText = (p: Page) => p.evaluate(READ_TEXT) as Promise<string>;

describe("numbers on the report pages", () => {
  test("no number is written in computer e-notation and no power of ten with a caret", async () => {
    for (const url of reportUrls()) {
      const text = await withPage(url, 1100, pageText);
      expect(text.match(/(?<![\p{L}\p{N}])[−-]?\d+(\.\d+)?[eE][+−-]?\d+(?![\p{L}\p{N}])/gu), url).toBeNull();
      expect(text.match(/10\^/g), url).toBeNull();
    }
  });

  test("powers of ten are typeset as ×10ⁿ with superscript digits", async () => {
    // The thermoelectric audit's smallest ZT is 6.69 × 10⁻⁴ in its summary.
    const text = await withPage(`${site.server.origin}/ab2-thermoelectric-field-sweep/index.html`, 1100, pageText);
    expect(text).toMatch(/\d\u202f×\u202f10[⁻]?[⁰¹²³⁴⁵⁶⁷⁸⁹]+/u);
  });

  test("a quantity with a unit in a summary keeps its number in [0.1, 1000) where a prefix exists", async () => {
    const prefixed = /(?<![\p{L}\p{N}.])(−?[\d\u202f]+(?:\.[\d\u202f]+)?)\u202f((?:[yzafpnµmkMGT])?(?:eV\/s|eV|W\/K|W|J|S|V\/K|V|K|s))(?![\p{L}\p{N}/])/gu;
    let seen = 0;
    for (const url of reportUrls()) {
      const summaries = await withPage(url, 1100, (p) => p.evaluate(`[...document.querySelectorAll(".verdict, .reason")].map((e) => e.innerText)`) as Promise<string[]>);
      for (const s of summaries) {
        for (const m of s.matchAll(prefixed)) {
          const value = Math.abs(Number(m[1].replaceAll("\u202f", "").replace("−", "-")));
          if (value === 0) continue;
          seen++;
          // A temperature stops at K (no kK) and declared round numbers may read 0.05; the rule is about the prefix choice.
          expect(value >= 0.1 && value < 1000, `${url}: "${m[0]}" in "${s}"`).toBe(true);
        }
      }
    }
    expect(seen).toBeGreaterThan(5);
  });

  test("an interval in a summary is in its value's unit and prefix, stated after the bracket", async () => {
    // "824 mK [743, 924] mK", not "824 mK [0.7432, 0.9244]" (bounds a thousand times off as read).
    const interval = /(?<=\d|\)) ([^\s\d[\](),;]+)(?: \(\d+ % interval)? \[([^\]∞)]+)\]( [^\s,;)]+)?/gu;
    let seen = 0;
    for (const url of reportUrls()) {
      const sentences = await withPage(url, 1100, (p) => p.evaluate(`[...document.querySelectorAll(".verdict, .reason")].map((e) => e.innerText)`) as Promise<string[]>);
      for (const s of sentences) {
        const text = s.replaceAll("\u202f", " ");
        for (const m of text.matchAll(interval)) {
          seen++;
          expect(m[3], `${url}: "${m[0]}"`).toBe(` ${m[1]}`);
        }
      }
    }
    expect(seen).toBeGreaterThan(5);
  });

  test("a table row's own unit never rescales its z-score or p-values", async () => {
    // The exchange relation's coefficient table names a unit per row (1/J or 1); z and p are pure numbers
    // (a z-score beyond 10³ or a p-value outside [0, 1] is a unit factor applied by mistake).
    let seen = 0;
    for (const url of reportUrls()) {
      const cells = await withPage(
        url,
        1100,
        (p) =>
          p.evaluate(`(() => {
            const out = [];
            for (const table of document.querySelectorAll("table.numbers")) {
              const heads = [...table.querySelectorAll("thead th")].map((th) => (th.childNodes[0]?.textContent ?? "").trim());
              if (!heads.includes("Unit")) continue;
              heads.forEach((h, i) => {
                if (!/^(z|p|p \(Holm\)|Holm-adjusted p)$/.test(h)) return;
                for (const tr of table.querySelectorAll("tbody tr")) out.push({ head: h, text: tr.children[i]?.textContent ?? "" });
              });
            }
            return out;
          })()`) as Promise<{ head: string; text: string }[]>,
      );
      for (const c of cells) {
        if (c.text === "—") continue;
        seen++;
        expect(c.text, `${url}: ${c.head}`).not.toMatch(/×/);
        const v = Math.abs(Number(c.text.replaceAll("\u202f", "").replace("−", "-")));
        expect(c.head === "z" ? v < 1e3 : v <= 1, `${url}: ${c.head} = ${c.text}`).toBe(true);
      }
    }
    expect(seen).toBeGreaterThan(5);
  });

  test("every numeric table column and every plot axis states its unit", async () => {
    for (const url of reportUrls()) {
      const { missing, axes } = await withPage(
        url,
        1100,
        (p) =>
          p.evaluate(`(() => {
            const missing = [];
            for (const th of document.querySelectorAll("table.numbers th.num")) if (!th.querySelector(".unit")?.textContent?.trim()) missing.push(th.textContent ?? "");
            const axes = [...document.querySelectorAll("svg.plot .axis-title")].map((t) => t.textContent ?? "");
            return { missing, axes };
          })()`) as Promise<{ missing: string[]; axes: string[] }>,
      );
      expect(missing, url).toEqual([]);
      // A unit in brackets, or a data file's column name as written (its unit is in its name).
      for (const a of axes) expect(/\([^()]*\)$/.test(a.trim()) || /^[A-Za-z][A-Za-z0-9]*_[A-Za-z0-9_]+$/.test(a.trim()), `${url}: axis "${a}"`).toBe(true);
    }
  });
});

describe("equations on a 390 px phone", () => {
  test("every equation fits its box or scrolls inside it; none is clipped by the page", async () => {
    for (const url of reportUrls()) {
      const bad = await withPage(
        url,
        PHONE,
        (p) =>
          p.evaluate(`(() => {
            const out = [];
            for (const eq of document.querySelectorAll(".equation")) {
              const box = eq.getBoundingClientRect();
              const style = getComputedStyle(eq);
              const overflowing = eq.scrollWidth > eq.clientWidth + 1;
              if (box.right > ${PHONE} + 0.5 || box.left < -0.5) out.push("box " + box.left + "–" + box.right + " outside the screen");
              if (overflowing && !["auto", "scroll"].includes(style.overflowX)) out.push("clipped: scrollWidth " + eq.scrollWidth + " > " + eq.clientWidth + ", overflow-x " + style.overflowX);
            }
            return { out, pageWidth: document.documentElement.scrollWidth };
          })()`) as Promise<{ out: string[]; pageWidth: number }>,
      );
      expect(bad.out, url).toEqual([]);
      expect(bad.pageWidth, url).toBeLessThanOrEqual(PHONE);
    }
  });
});

describe("printed forms", () => {
  const textOf = (file: string, page?: number) =>
    execFileSync("pdftotext", [...(page ? ["-f", String(page), "-l", String(page)] : []), "-layout", file, "-"], { encoding: "utf8" });

  test("page 1 of the full PDF carries the verdict table: its header and the first checks with their verdicts", () => {
    const first = textOf(full.file, 1).replace(/\s+/g, " ");
    expect(first).toMatch(/Check Dataset Verdict Summary/);
    const c = full.audit.checks[0];
    expect(first).toContain(`${c.statusSymbol} ${c.statusLabel}`);
    expect(first).toContain(c.check.slice(0, 8));
  });

  test("the compact PDF has one page per dataset (or group), each with its verdicts and at most two plots", () => {
    const groups = new Set(compact.audit.checks.map((c) => c.dataset));
    const pages = Number(/^Pages:\s+(\d+)/m.exec(execFileSync("pdfinfo", [compact.file], { encoding: "utf8" }))?.[1]);
    expect(pages).toBe(groups.size);
    for (let p = 1; p <= pages; p++) {
      const text = textOf(compact.file, p);
      expect(text).toContain("Verdict");
    }
    const all = textOf(compact.file);
    for (const g of groups) expect(all).toContain(g);
    expect(textOf(compact.file, 1)).toContain("compact form");
  });
});
