import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import type { Browser, BrowserContextOptions } from "playwright-core";

export const PROBE = fs.readFileSync(path.join(path.dirname(fileURLToPath(import.meta.url)), "pageProbe.js"), "utf8");

/** What test/browser/pageProbe.js (PROBE, its source) reports about one page. */
export interface PageProbe {
  url: string;
  title: string;
  lang: string;
  headings: { level: number; text: string }[];
  equations: { containers: number; containersWithoutKatex: number; katex: number; errors: string[]; fontsLoaded: boolean };
  plots: { id: string; isSvg: boolean; role: string | null; label: string; caption: string; marks: number; axisTitles: string[]; width: number; height: number }[];
  loosePlots: number;
  tables: { caption: string; headerCells: number; columnHeadersWithoutScope: number; bodyRows: number }[];
  links: { href: string; raw: string; download: boolean; text: string }[];
  missingFragments: string[];
  stamps: { classes: string; text: string; symbol: string; borderStyle: string }[];
  lowContrast: { text: string; color: string; ratio: number; needed: number }[];
  scrollWidth: number;
  viewportWidth: number;
}

export interface PageVisit {
  url: string;
  status: number;
  probe: PageProbe;
  /** Console messages of type error, uncaught exceptions, failed or 4xx/5xx sub-resource loads. */
  errors: string[];
}

/** A page's URL without its fragment; folders and their index.html are one page. */
export function pageKey(href: string): string {
  const u = new URL(href);
  u.hash = "";
  u.search = "";
  if (u.pathname.endsWith("/index.html")) u.pathname = u.pathname.slice(0, -"index.html".length);
  return u.href;
}

/** A link that opens another HTML page of the site (rather than a download). */
export function isPageLink(href: string): boolean {
  const p = new URL(href).pathname;
  return p.endsWith("/") || p.endsWith(".html");
}

/**
 * The kind of a page from the shape of its path, independent of which audits
 * exist: `/` is the index, `/<audit>/` a report, and deeper pages keep their
 * own folder names with numbers generalised (`/<audit>/versions/<n>/`).
 */
export function pageKind(href: string): string {
  const segments = new URL(pageKey(href)).pathname.split("/").filter(Boolean);
  if (segments.length === 0) return "index";
  if (segments.length === 1) return segments[0].endsWith(".html") ? segments[0].replace(/\.html$/, "") : "report";
  return ["report", ...segments.slice(1).map((s) => (/^v?\d+$/.test(s) ? "n" : s.replace(/\.html$/, "")))].join("-");
}

/** Open one page, let fonts and scripts settle, and probe it. */
export async function visitPage(browser: Browser, url: string, options: BrowserContextOptions): Promise<PageVisit> {
  const context = await browser.newContext(options);
  const page = await context.newPage();
  const errors: string[] = [];
  page.on("console", (m) => {
    if (m.type() === "error") errors.push(`console error: ${m.text()}`);
  });
  page.on("pageerror", (e) => errors.push(`uncaught: ${e.message}`));
  page.on("requestfailed", (r) => errors.push(`request failed: ${r.url()} (${r.failure()?.errorText ?? "?"})`));
  page.on("response", (r) => {
    if (r.status() >= 400) errors.push(`HTTP ${r.status()}: ${r.url()}`);
  });
  try {
    const response = await page.goto(url, { waitUntil: "load" });
    await page.evaluate("document.fonts.ready.then(() => true)");
    const probe = (await page.evaluate(PROBE)) as PageProbe;
    return { url, status: response?.status() ?? 0, probe, errors };
  } finally {
    await context.close();
  }
}

/** Take a full-page screenshot of one page. */
export async function screenshot(browser: Browser, url: string, options: BrowserContextOptions, file: string): Promise<void> {
  const context = await browser.newContext(options);
  try {
    const page = await context.newPage();
    await page.goto(url, { waitUntil: "load" });
    await page.evaluate("document.fonts.ready.then(() => true)");
    fs.mkdirSync(path.dirname(file), { recursive: true });
    await page.screenshot({ path: file, fullPage: true });
  } finally {
    await context.close();
  }
}

export interface Crawl {
  pages: PageVisit[];
  /** Every same-origin link target that is not a page (downloads, data files), with the pages linking to it. */
  files: Map<string, string[]>;
  /** Every link that leaves the site, with the pages linking to it. */
  external: Map<string, string[]>;
}

/** Breadth-first walk over every page reachable from the start page by same-origin links. */
export async function crawlSite(browser: Browser, start: string, options: BrowserContextOptions): Promise<Crawl> {
  const origin = new URL(start).origin;
  const queue = [pageKey(start)];
  const queued = new Set(queue);
  const pages: PageVisit[] = [];
  const files = new Map<string, string[]>();
  const external = new Map<string, string[]>();
  const note = (map: Map<string, string[]>, key: string, from: string) => map.set(key, [...(map.get(key) ?? []), from]);
  while (queue.length > 0) {
    const url = queue.shift() as string;
    const visit = await visitPage(browser, url, options);
    pages.push(visit);
    for (const link of visit.probe.links) {
      const target = new URL(link.href);
      if (target.protocol === "mailto:") continue;
      if (target.origin !== origin) {
        note(external, link.href, url);
        continue;
      }
      if (isPageLink(link.href) && !link.download) {
        const key = pageKey(link.href);
        if (!queued.has(key)) {
          queued.add(key);
          queue.push(key);
        }
      } else {
        note(files, pageKey(link.href), url);
      }
    }
  }
  return { pages, files, external };
}
