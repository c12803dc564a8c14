/**
 * Issue 9, rendering in a real browser: an archive whose free-text fields all
 * carry markup (test/robustness/hostileArchive.ts) is built with the
 * programmatic build, served on 127.0.0.1 and every page is loaded in headless
 * Chromium. No dialog may open, no payload may run or leave an element, and the
 * text must read literally, as the author typed it.
 */
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { buildSite, type BuildOutcome } from "../../src/report/buildSite.ts";
import { launchChromium, type LaunchedBrowser } from "../../src/report/pdf/launchChromium.ts";
import { makeHostileArchive, PAYLOADS } from "../robustness/hostileArchive.ts";
import { serveStatic, type StaticServer } from "./staticServer.ts";

interface PageState {
  url: string;
  dialogs: string[];
  injectedFlag: unknown;
  injectedElements: number;
  foreignScripts: string[];
  frames: number;
  javascriptLinks: number;
  bodyDisplay: string;
  title: string;
  h1: string;
  authors: string;
  kicker: string;
  brokenErrors: string[];
  checkCells: string[];
}

let root: string;
let outcome: BuildOutcome;
let server: StaticServer;
let chromium: LaunchedBrowser;
const pages: PageState[] = [];

/** Every HTML file of the built site, as site-relative paths. */
function htmlFiles(dir: string): string[] {
  return (fs.readdirSync(dir, { recursive: true }) as string[]).filter((f) => f.endsWith(".html")).map((f) => f.split(path.sep).join("/"));
}

async function visit(url: string): Promise<PageState> {
  const context = await chromium.browser.newContext({ viewport: { width: 1100, height: 800 } });
  const page = await context.newPage();
  const dialogs: string[] = [];
  page.on("dialog", (d) => {
    dialogs.push(d.message());
    void d.dismiss();
  });
  try {
    await page.goto(url, { waitUntil: "load" });
    // Give handlers that fire late (image errors, SVG load) a chance, and hover every element once.
    await page.evaluate(`(() => {
      for (const el of document.querySelectorAll("body *")) el.dispatchEvent(new MouseEvent("mouseover", { bubbles: true }));
      return new Promise((r) => setTimeout(r, 200));
    })()`);
    const state = (await page.evaluate(`(() => ({
      injectedFlag: window.__injected,
      injectedElements: document.querySelectorAll(".injected").length,
      foreignScripts: [...document.scripts].map((s) => s.getAttribute("src") ?? "inline:" + s.textContent).filter((s) => !/^(\\.\\.\\/)*assets\\/[a-z-]+\\.js$/.test(s)),
      frames: document.querySelectorAll("iframe, object, embed").length,
      javascriptLinks: [...document.querySelectorAll("a[href]")].filter((a) => /^\\s*javascript:/i.test(a.getAttribute("href"))).length,
      bodyDisplay: getComputedStyle(document.body).display,
      title: document.title,
      h1: document.querySelector("h1")?.textContent ?? "",
      authors: document.querySelector(".authors")?.textContent ?? "",
      kicker: document.querySelector(".kicker")?.textContent ?? "",
      brokenErrors: [...document.querySelectorAll(".broken pre")].map((p) => p.textContent),
      checkCells: [...document.querySelectorAll(".checks-overview td")].map((td) => td.textContent),
    }))()`)) as Omit<PageState, "url" | "dialogs">;
    return { url, dialogs, ...state };
  } finally {
    await context.close();
  }
}

beforeAll(async () => {
  root = makeHostileArchive();
  outcome = await buildSite({ root, out: path.join(root, "site") });
  server = await serveStatic(outcome.out);
  chromium = await launchChromium();
  for (const file of htmlFiles(outcome.out)) pages.push(await visit(`${server.origin}/${file}`));
});

afterAll(async () => {
  await chromium?.close();
  await server?.close();
  if (root) fs.rmSync(root, { recursive: true, force: true });
});

const reportPage = () => {
  const p = pages.find((x) => x.url.endsWith("/hostile-text/index.html"));
  if (!p) throw new Error("the report page of hostile-text was not built");
  return p;
};

describe("hostile text in Chromium", () => {
  test("the site has the index and the report page, and lists the audit that could not be run", () => {
    expect(pages.map((p) => new URL(p.url).pathname).sort()).toEqual(["/hostile-text/index.html", "/index.html"]);
    expect(outcome.broken.map((b) => b.folder)).toEqual(["audits/hostile-broken"]);
  });

  test("no page opens a dialog, runs a payload, or holds an injected element, script, frame or javascript: link", () => {
    for (const p of pages) {
      expect(p.dialogs, p.url).toEqual([]);
      expect(p.injectedFlag, p.url).toBeUndefined();
      expect(p.injectedElements, p.url).toBe(0);
      expect(p.foreignScripts, p.url).toEqual([]);
      expect(p.frames, p.url).toBe(0);
      expect(p.javascriptLinks, p.url).toBe(0);
      expect(p.bodyDisplay, p.url).not.toBe("none");
    }
  });

  test("the report shows title, author, affiliation and device literally", () => {
    const p = reportPage();
    expect(p.h1).toBe(PAYLOADS.title);
    expect(p.title).toBe(`Draft (unpublished): ${PAYLOADS.title} — audit hostile-text`);
    expect(p.authors.trim()).toBe(`${PAYLOADS.author} (${PAYLOADS.affiliation})`);
    expect(p.kicker).toContain(`device ${PAYLOADS.device}`);
  });

  test("a sweep name reaches the check summaries as text", () => {
    expect(reportPage().checkCells.some((c) => c.includes(PAYLOADS.sweep))).toBe(true);
  });

  test("the index shows the broken audit's error, which quotes the hostile CSV header, as text", () => {
    const index = pages.find((p) => new URL(p.url).pathname === "/index.html")!;
    expect(index.brokenErrors).toHaveLength(1);
    expect(index.brokenErrors[0]).toContain(`the header has "q", "${PAYLOADS.header.replaceAll('"', "'")}"`);
  });
});
