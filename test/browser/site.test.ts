/**
 * The demo archive as a reader sees it: built, served on 127.0.0.1, crawled
 * from the index in headless Chromium, and every page checked for rendered
 * equations, drawn plots, working links, a quiet console, a phone layout that
 * does not overflow, accessible structure and readable contrast, on light and
 * dark screens. The tests know nothing of particular audits: they crawl
 * whatever the archive holds and compare pages with the build's own models.
 */
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { BrowserContextOptions } from "playwright-core";
import { launchChromium, type LaunchedBrowser } from "../../src/report/pdf/launchChromium.ts";
import { crawlSite, pageKey, pageKind, screenshot, visitPage, type Crawl, type PageVisit } from "./crawl.ts";
import { ARTIFACTS, startDemoSite, type DemoSite } from "./demoSite.ts";

const PHONE_WIDTH = 375; // a common small phone in CSS pixels (portrait)
const DESKTOP: BrowserContextOptions = { viewport: { width: 1100, height: 800 }, colorScheme: "light" };
const DARK: BrowserContextOptions = { ...DESKTOP, colorScheme: "dark" };
const PHONE: BrowserContextOptions = { viewport: { width: PHONE_WIDTH, height: 740 }, colorScheme: "light" };

let site: DemoSite;
let chromium: LaunchedBrowser;
let crawl: Crawl;
let dark: PageVisit[];
let phone: PageVisit[];

/**
 * The crawl visits every published page three times (desktop, dark, phone), so it grows with the archive: 52
 * pages took about 290 s on a quiet 2-core machine and more under load. The limit only stops a hung browser.
 */
const CRAWL_LIMIT_MS = 30 * 60 * 1000;

beforeAll(async () => {
  site = await startDemoSite();
  chromium = await launchChromium();
  crawl = await crawlSite(chromium.browser, `${site.server.origin}/`, DESKTOP);
  dark = [];
  phone = [];
  for (const p of crawl.pages) {
    dark.push(await visitPage(chromium.browser, p.url, DARK));
    phone.push(await visitPage(chromium.browser, p.url, PHONE));
  }
}, CRAWL_LIMIT_MS);

afterAll(async () => {
  await chromium?.close();
  await site?.close();
});

const reports = () => crawl.pages.filter((p) => pageKind(p.url) === "report");
const modelOf = (url: string) => {
  const id = new URL(url).pathname.split("/").filter(Boolean)[0];
  const model = site.outcome.audits.find((a) => a.id === id);
  if (!model) throw new Error(`no audit model for ${url}`);
  return model;
};
const allVisits = () => [...crawl.pages, ...dark, ...phone];

describe("the demo archive in Chromium", () => {
  test("the crawl from the index reaches every audit report", () => {
    expect(site.outcome.broken).toEqual([]);
    expect(site.outcome.audits.length).toBeGreaterThan(0);
    const urls = new Set(crawl.pages.map((p) => p.url));
    expect(urls.has(`${site.server.origin}/`)).toBe(true);
    for (const a of site.outcome.audits) expect(urls.has(pageKey(`${site.server.origin}/${a.id}/index.html`))).toBe(true);
  });

  test("every page answers HTTP 200 with no console error, uncaught exception or failed request, light, dark and on a phone", () => {
    const problems = allVisits().flatMap((v) => [...(v.status === 200 ? [] : [`HTTP ${v.status}`]), ...v.errors].map((e) => `${v.url}: ${e}`));
    expect(problems).toEqual([]);
  });

  test("every equation is typeset by KaTeX in its own fonts, and none shows an error", () => {
    let expected = 0;
    for (const page of crawl.pages) {
      const eq = page.probe.equations;
      expect(eq.errors, page.url).toEqual([]);
      expect(eq.containersWithoutKatex, page.url).toBe(0);
      if (eq.katex > 0) expect(eq.fontsLoaded, `${page.url}: KaTeX fonts`).toBe(true);
    }
    for (const page of reports()) {
      const want = modelOf(page.url).checks.reduce((n, c) => n + c.equationsHtml.length, 0);
      expected += want;
      expect(page.probe.equations.containers, page.url).toBe(want);
    }
    // The demo checks state their laws: a report with no equation at all would mean the test saw nothing.
    expect(expected).toBeGreaterThan(0);
  });

  test("every plot is an SVG image with data marks, both axis titles, a text alternative and a caption", () => {
    let expected = 0;
    for (const page of reports()) {
      const want = modelOf(page.url).checks.reduce((n, c) => n + c.plots.length, 0);
      expected += want;
      expect(page.probe.plots.length, page.url).toBe(want);
      for (const plot of page.probe.plots) {
        const where = `${page.url}#${plot.id}`;
        expect(plot.isSvg, where).toBe(true);
        expect(plot.role, where).toBe("img");
        expect(plot.marks, `${where}: data marks`).toBeGreaterThan(0);
        expect(plot.axisTitles.length, where).toBe(2);
        for (const t of plot.axisTitles) expect(t.length, where).toBeGreaterThan(0);
        expect(plot.label.length, `${where}: text alternative`).toBeGreaterThan(20);
        expect(plot.caption.length, `${where}: caption`).toBeGreaterThan(0);
        // Drawn at a readable size on a desktop screen (640 units shown at no less than half scale).
        expect(plot.width, where).toBeGreaterThanOrEqual(320);
      }
    }
    for (const page of crawl.pages) expect(page.probe.loosePlots, `${page.url}: plot outside a figure`).toBe(0);
    expect(expected).toBeGreaterThan(0);
  });

  test("every internal link and download answers HTTP 200, every in-page anchor exists, and outside links use https", async () => {
    const targets = new Set([...crawl.pages.map((p) => p.url), ...crawl.files.keys()]);
    const broken: string[] = [];
    for (const url of targets) {
      const res = await fetch(url);
      await res.arrayBuffer();
      if (res.status !== 200) broken.push(`${url}: HTTP ${res.status} (linked from ${(crawl.files.get(url) ?? ["the crawl"]).join(", ")})`);
    }
    expect(broken).toEqual([]);
    for (const page of crawl.pages) expect(page.probe.missingFragments, page.url).toEqual([]);
    for (const [href, from] of crawl.external) expect(new URL(href).protocol, `${href} on ${from.join(", ")}`).toBe("https:");
    for (const page of crawl.pages) {
      for (const link of page.probe.links) expect(link.text.length, `${page.url}: a link without text to ${link.raw}`).toBeGreaterThan(0);
    }
  });

  test(`nothing overflows horizontally on a ${PHONE_WIDTH} px wide phone screen`, () => {
    const wide = phone.filter((v) => v.probe.scrollWidth > PHONE_WIDTH).map((v) => `${v.url}: ${v.probe.scrollWidth} px wide`);
    expect(wide).toEqual([]);
  });

  test("each page has one h1 first and its headings never skip a level", () => {
    for (const page of crawl.pages) {
      const levels = page.probe.headings.map((h) => h.level);
      expect(page.probe.lang, page.url).toBe("en");
      expect(page.probe.title.length, page.url).toBeGreaterThan(0);
      expect(levels[0], page.url).toBe(1);
      expect(levels.filter((l) => l === 1).length, page.url).toBe(1);
      const jumps = levels.flatMap((l, i) => (i > 0 && l > levels[i - 1] + 1 ? [`h${levels[i - 1]} → h${l} at "${page.probe.headings[i].text}"`] : []));
      expect(jumps, page.url).toEqual([]);
    }
  });

  test("every table has a caption and scoped column headers", () => {
    for (const page of crawl.pages) {
      for (const [i, t] of page.probe.tables.entries()) {
        const where = `${page.url}: table ${i + 1}`;
        expect(t.caption.length, where).toBeGreaterThan(0);
        expect(t.headerCells, where).toBeGreaterThan(0);
        expect(t.columnHeadersWithoutScope, where).toBe(0);
      }
    }
  });

  test("every verdict is given by a word and a symbol, and each verdict has its own border style", () => {
    const WORDS: Record<string, string> = { pass: "Pass", fail: "Fail", inconclusive: "Inconclusive", "not-applicable": "Not applicable", info: "Information" };
    const looks = new Map<string, string>();
    let stamps = 0;
    for (const page of crawl.pages) {
      for (const s of page.probe.stamps) {
        stamps++;
        const status = /stamp-([a-z-]+)/.exec(s.classes.replace("stamp ", ""))?.[1] ?? "";
        expect(Object.keys(WORDS), `${page.url}: ${s.classes}`).toContain(status);
        expect(s.text, page.url).toContain(WORDS[status]);
        expect(s.symbol.length, page.url).toBeGreaterThan(0);
        looks.set(status, `${s.symbol} ${s.borderStyle}`);
      }
    }
    expect(stamps).toBeGreaterThan(0);
    // Two different verdicts never look alike once colour is taken away.
    const seen = [...looks.entries()];
    for (const [a, lookA] of seen) for (const [b, lookB] of seen) if (a !== b && !(["info", "not-applicable"].includes(a) && ["info", "not-applicable"].includes(b))) expect(lookA, `${a} vs ${b}`).not.toBe(lookB);
  });

  test("all text keeps WCAG 2.1 AA contrast against its background, on light and dark screens and on a phone", () => {
    const low = allVisits().flatMap((v) => v.probe.lowContrast.map((c) => `${v.url}: "${c.text}" ${c.color} ${c.ratio}:1 < ${c.needed}:1`));
    expect(low).toEqual([]);
  });

  test("a screenshot of each kind of page is kept, light, dark and on a phone", async () => {
    const kinds = new Map<string, string>();
    for (const p of crawl.pages) if (!kinds.has(pageKind(p.url))) kinds.set(pageKind(p.url), p.url);
    expect([...kinds.keys()]).toContain("index");
    expect([...kinds.keys()]).toContain("report");
    for (const [kind, url] of kinds) {
      for (const [look, options] of [["light", DESKTOP], ["dark", DARK], ["phone", PHONE]] as const) {
        const file = path.join(ARTIFACTS, `${kind}-${look}.png`);
        fs.rmSync(file, { force: true });
        await screenshot(chromium.browser, url, options, file);
        expect(fs.statSync(file).size, file).toBeGreaterThan(1000);
      }
    }
  });
});

describe("the archive index", () => {
  const rowsSelector = "#archive-index tbody tr[data-status]";

  test("without script it lists every audit and keeps the filter controls hidden", async () => {
    const context = await chromium.browser.newContext({ ...DESKTOP, javaScriptEnabled: false });
    try {
      const page = await context.newPage();
      await page.goto(`${site.server.origin}/`);
      expect(await page.locator(`${rowsSelector}:visible`).count()).toBe(site.outcome.audits.length);
      expect(await page.locator("#index-controls").isVisible()).toBe(false);
    } finally {
      await context.close();
    }
  });

  test("with script it filters by verdict, device, author and date, and sorts by date and verdict", async () => {
    const context = await chromium.browser.newContext(DESKTOP);
    try {
      const page = await context.newPage();
      await page.goto(`${site.server.origin}/`);
      await expect.poll(() => page.locator("#index-controls").isVisible()).toBe(true);
      const rows = page.locator(rowsSelector);
      const total = await rows.count();
      const visibleData = async (name: string) => {
        const out: string[] = [];
        for (const row of await page.locator(`${rowsSelector}:visible`).all()) out.push((await row.getAttribute(`data-${name}`)) ?? "");
        return out;
      };
      const allData = async (name: string) => {
        const out: string[] = [];
        for (const row of await rows.all()) out.push((await row.getAttribute(`data-${name}`)) ?? "");
        return out;
      };
      await expect.poll(() => page.locator("#index-count").textContent()).toBe(`${total} of ${total} audits shown`);

      // Each select filter: choose every value it offers and compare the rows shown with the rows' own data.
      for (const [field, attribute, matches] of [
        ["status", "status", (v: string, cell: string) => cell === v],
        ["device", "device", (v: string, cell: string) => cell === v],
        ["author", "authors", (v: string, cell: string) => cell.split("\n").includes(v)],
      ] as const) {
        const select = page.locator(`#index-controls select[name=${field}]`);
        const values = (await select.locator("option").evaluateAll((os) => os.map((o) => (o as unknown as { value: string }).value))).filter(Boolean);
        if (field !== "status") expect(values.length, `${field} offers the archive's values`).toBeGreaterThan(0);
        for (const v of values) {
          await select.selectOption(v);
          const want = (await allData(attribute)).filter((cell) => matches(v, cell)).length;
          const shown = await visibleData(attribute);
          expect(shown.length, `${field} = ${v}`).toBe(want);
          for (const cell of shown) expect(matches(v, cell), `${field} = ${v}: ${cell}`).toBe(true);
          await expect.poll(() => page.locator("#index-count").textContent()).toBe(`${want} of ${total} audits shown`);
        }
        await select.selectOption("");
      }

      const dates = (await allData("date")).filter(Boolean).sort();
      expect(dates.length).toBeGreaterThan(0);
      const latest = dates[dates.length - 1];
      await page.locator("#index-controls input[name=from]").fill(latest);
      expect((await visibleData("date")).every((d) => d >= latest)).toBe(true);
      expect((await visibleData("date")).length).toBe(dates.filter((d) => d >= latest).length);
      await page.locator("#index-controls input[name=from]").fill("");
      await page.locator("#index-controls input[name=to]").fill(dates[0]);
      expect((await visibleData("date")).length).toBe(dates.filter((d) => d <= dates[0]).length);
      await page.locator("#index-controls button[type=reset]").click();
      await expect.poll(() => page.locator(`${rowsSelector}:visible`).count()).toBe(total);

      const sortBy = page.locator("#index-controls select[name=sort]");
      await sortBy.selectOption("date-asc");
      const asc = (await visibleData("date")).filter(Boolean);
      expect(asc).toEqual([...asc].sort());
      await sortBy.selectOption("date-desc");
      const desc = (await visibleData("date")).filter(Boolean);
      expect(desc).toEqual([...desc].sort().reverse());
      await sortBy.selectOption("status");
      const severity: Record<string, number> = { fail: 0, inconclusive: 1, pass: 2 };
      const order = (await visibleData("status")).map((s) => severity[s]);
      expect(order).toEqual([...order].sort((a, b) => a - b));
    } finally {
      await context.close();
    }
  });
});
