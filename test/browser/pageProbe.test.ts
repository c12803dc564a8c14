/**
 * The page probe itself: on a page built to break every rule, it must report
 * each fault, so that the site tests' empty lists mean something.
 */
import { afterAll, beforeAll, expect, test } from "vitest";
import { launchChromium, type LaunchedBrowser } from "../../src/report/pdf/launchChromium.ts";
import { PROBE, pageKind, type PageProbe } from "./crawl.ts";

let chromium: LaunchedBrowser;
beforeAll(async () => {
  chromium = await launchChromium();
});
afterAll(async () => {
  await chromium?.close();
});

const FAULTY = `<!doctype html><html lang="en"><head><title>faulty</title></head>
<body style="margin:0;background:#ffffff;color:#000000">
<h1>Title</h1>
<h3>Skipped a level</h3>
<p style="color:#aaaaaa">Pale grey text on white</p>
<div class="equation"><span class="katex-error" title="ParseError">\\frac{</span></div>
<div class="equation"><span>no maths here</span></div>
<figure class="plot-figure" id="empty"><svg xmlns="http://www.w3.org/2000/svg" class="plot" role="img" viewBox="0 0 10 10"><g class="series line"><path d=""/></g></svg></figure>
<svg class="plot"></svg>
<table><tr><th>no caption</th></tr></table>
<a href="#nowhere">broken anchor</a>
<span class="stamp stamp-pass"><span class="stamp-symbol">✓</span> Pass</span>
<div style="width:600px">wide</div>
</body></html>`;

test("the probe reports every fault of a deliberately faulty page", async () => {
  const page = await chromium.browser.newPage({ viewport: { width: 375, height: 740 } });
  try {
    await page.setContent(FAULTY);
    const p = (await page.evaluate(PROBE)) as PageProbe;
    expect(p.headings.map((h) => h.level)).toEqual([1, 3]);
    expect(p.equations.errors).toEqual(["\\frac{"]);
    expect(p.equations.containersWithoutKatex).toBe(2);
    expect(p.plots).toHaveLength(1);
    expect(p.plots[0].marks).toBe(0);
    expect(p.plots[0].label).toBe("");
    expect(p.loosePlots).toBe(1);
    expect(p.tables).toEqual([{ caption: "", headerCells: 1, columnHeadersWithoutScope: 0, bodyRows: 1 }]);
    expect(p.missingFragments).toEqual(["nowhere"]);
    expect(p.stamps).toEqual([{ classes: "stamp stamp-pass", text: "✓ Pass", symbol: "✓", borderStyle: "none" }]);
    // #aaaaaa on white is 2.32:1 by the WCAG 2.1 formula (relative luminance of #aaa is 0.402).
    expect(p.lowContrast).toEqual([{ text: "Pale grey text on white", color: "rgb(170, 170, 170)", ratio: 2.32, needed: 4.5 }]);
    expect(p.scrollWidth).toBe(600);
  } finally {
    await page.close();
  }
});

test("page kinds follow the shape of the path, not the names of audits", () => {
  expect(pageKind("http://127.0.0.1:1/")).toBe("index");
  expect(pageKind("http://127.0.0.1:1/index.html")).toBe("index");
  expect(pageKind("http://127.0.0.1:1/any-audit/")).toBe("report");
  expect(pageKind("http://127.0.0.1:1/any-audit/index.html#x")).toBe("report");
  expect(pageKind("http://127.0.0.1:1/any-audit/v3/")).toBe("report-n");
  expect(pageKind("http://127.0.0.1:1/any-audit/draft/")).toBe("report-draft");
});
