/**
 * The plot renderer: labels as a physicist writes them, uncertainties drawn,
 * series that stay apart without colour, and a text alternative; then the
 * SVG drawn by Chromium, where every mark must land inside the frame.
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { PlotSpec } from "../../src/checks/plotSpec.ts";
import { renderPlot } from "../../src/report/plots/renderPlot.ts";
import { linearTickLabels, logTickLabel, numberText } from "../../src/report/plots/tickLabel.ts";
import { richTextSvg } from "../../src/report/plots/richText.ts";
import { launchChromium, type LaunchedBrowser } from "../../src/report/pdf/launchChromium.ts";

const xs = [0, 1, 2, 3, 4];
const spec = (series: PlotSpec["series"], over: Partial<PlotSpec> = {}): PlotSpec => ({
  id: "p",
  title: "A test figure",
  alt: "What the figure shows.",
  x: { label: "Bias V", unit: "mV" },
  y: { label: "Heat current J_Q", unit: "fW" },
  series,
  ...over,
});

describe("labels", () => {
  test("numbers read as in print: a minus sign, powers of ten for very small and very large values", () => {
    expect(numberText(0)).toBe("0");
    expect(numberText(-0.5)).toBe("\u22120.5");
    expect(numberText(12345)).toBe("12\u202f345"); // SI Brochure §5.4.4: groups of three, thin space
    expect(numberText(1e-7)).toBe("10⁻⁷");
    expect(numberText(2.5e6)).toBe("2.5\u202f×\u202f10⁶");
    expect(numberText(0.1 + 0.2)).toBe("0.3"); // d3 ticks carry binary rounding; six digits drop it
  });

  test("an axis has one tick style: equal decimals on every tick, a shared power of ten, decades alone on log axes", () => {
    expect(linearTickLabels([0, 0.5, 1, 1.5])).toEqual({ labels: ["0.0", "0.5", "1.0", "1.5"], exponent: 0 });
    expect(linearTickLabels([0, 2e-5, 4e-5, 6e-5])).toEqual({ labels: ["0", "2", "4", "6"], exponent: -5 });
    expect(linearTickLabels([-20, -10, 0, 10])).toEqual({ labels: ["\u221220", "\u221210", "0", "10"], exponent: 0 });
    expect([1e-3, 2e-3, 1e-2, 1, 10].map(logTickLabel)).toEqual(["10⁻³", "", "10⁻²", "10⁰", "10¹"]);
  });

  test("k_B and e^{−Σ} become subscripts and superscripts, and markup in a label is escaped", () => {
    expect(richTextSvg("Probability density (1/k_B)")).toBe('Probability density (1/k<tspan baseline-shift="sub" font-size="75%">B</tspan>)');
    expect(richTextSvg("e^{−Σ}")).toBe('e<tspan baseline-shift="super" font-size="75%">−Σ</tspan>');
    expect(richTextSvg("a <b> & c")).toBe("a &lt;b&gt; &amp; c");
    expect(richTextSvg("plain_")).toBe("plain_");
    // A column name is shown as written: Vg_mV is not V with a subscripted g.
    expect(richTextSvg("Vg_mV")).toBe("Vg_mV");
  });
});

describe("renderPlot", () => {
  test("error bars are drawn with caps at both ends, for asymmetric intervals too", () => {
    const svg = renderPlot(spec([{ type: "points", name: "data", x: xs, y: xs, yErrLow: [0.1, 0.1, 0.1, 0.1, 0.1], yErrHigh: [0.3, 0.3, 0.3, 0.3, 0.3] }]));
    const bars = svg.match(/<g class="err"[^>]*>(.*?)<\/g>/)?.[1] ?? "";
    // One path per point: the bar (V) and two caps (h).
    expect(bars.match(/<path /g)?.length).toBe(5);
    expect(bars.match(/h7/g)?.length).toBe(10);
  });

  test("series stay apart without colour: each points series its own marker, each line its own dashes, each histogram after the first a hatching", () => {
    const names = ["a", "b", "c", "d", "e", "f", "g"];
    const points = renderPlot(spec(names.map((name) => ({ type: "points" as const, name, x: xs, y: xs }))));
    const firstMark = (name: string) => new RegExp(`data-series="${name}"[^>]*><g fill="currentColor"><(\\w+)`).exec(points)?.[1];
    const shapes = names.map((n) => {
      const tag = firstMark(n);
      const d = new RegExp(`data-series="${n}"[^>]*><g fill="currentColor"><path d="(M[^"]*?)"`).exec(points)?.[1] ?? "";
      return `${tag}:${d.replace(/\d+(\.\d+)?/g, "#")}`; // the path with its numbers blanked: its shape and directions
    });
    expect(new Set(shapes).size).toBe(7);

    const lines = renderPlot(spec(["a", "b", "c", "d"].map((name) => ({ type: "line" as const, name, x: xs, y: xs }))));
    const dashes = [...lines.matchAll(/class="series line"[^>]*><path [^>]*?(?:stroke-dasharray="([^"]*)")?\/>/g)].map((m) => m[1] ?? "solid");
    expect(dashes.length).toBe(4);
    expect(new Set(dashes).size).toBe(4);

    const bars = renderPlot(spec(["a", "b"].map((name) => ({ type: "bars" as const, name, x0: [0, 1], x1: [1, 2], y: [3, 4] }))));
    expect(bars).toMatch(/class="series bars" data-series="a"[^>]*fill="currentColor"/);
    expect(bars).toMatch(/class="series bars" data-series="b"[^>]*fill="url\(#[^)]*-hatch-1\)"/);
    expect(bars).toMatch(/<pattern id="[^"]*-hatch-1"/);
  });

  test("the text alternative names both axes with units and ranges and every series", () => {
    const svg = renderPlot(spec([{ type: "points", name: "measured", x: xs, y: xs, yErr: [1, 1, 1, 1, 1] }, { type: "rule", name: "zero", axis: "y", value: 0 }]));
    const desc = /<desc id="[^"]+">([^<]*)<\/desc>/.exec(svg)?.[1] ?? "";
    expect(desc).toBe(
      "What the figure shows. Horizontal axis: Bias V in mV, linear scale from 0 to 4. Vertical axis: Heat current J_Q in fW, linear scale from \u22121 to 5. Shown: measured: 5 points with vertical error bars; zero: a reference line at y = 0.",
    );
    expect(svg).toMatch(/role="img" aria-labelledby="(\S+)-title \1-desc"/);
  });

  test("text from a spec is escaped", () => {
    const svg = renderPlot(spec([{ type: "line", name: "<script>alert(1)</script>", x: xs, y: xs }], { title: "a & b" }));
    expect(svg).not.toContain("<script>");
    expect(svg).toContain("&lt;script&gt;");
    expect(svg).toContain(">a &amp; b</title>");
  });
});

describe("renderPlot in Chromium", () => {
  let chromium: LaunchedBrowser;
  beforeAll(async () => {
    chromium = await launchChromium();
  });
  afterAll(async () => {
    await chromium?.close();
  });

  test("every kind of series draws marks inside the frame, on linear and logarithmic axes", async () => {
    const all: PlotSpec["series"] = [
      { type: "span", name: "window", from: 1, to: 2 },
      { type: "band", name: "band", x: xs, lower: [0.5, 1.5, 2.5, 3.5, 4.5], upper: [1.5, 2.5, 3.5, 4.5, 5.5] },
      { type: "bars", name: "histogram", x0: [0, 1, 2], x1: [1, 2, 3], y: [1, 2, 3] },
      { type: "rule", name: "rule", axis: "y", value: 2 },
      { type: "line", name: "line", x: xs, y: [1, 2, 3, 4, 5] },
      { type: "points", name: "points", x: xs, y: [1, 2, 3, 4, 5], yErr: [0.2, 0.2, 0.2, 0.2, 0.2], xErr: [0.1, 0.1, 0.1, 0.1, 0.1] },
      { type: "heatmap", name: "counts", xEdges: [0, 2, 4], yEdges: [1, 3, 5], counts: [[1, 5], [0, 9]] },
    ];
    const linear = renderPlot(spec(all));
    const log = renderPlot(spec(all, { y: { label: "Rate", unit: "1/s", scale: "log" } }));
    const page = await chromium.browser.newPage();
    try {
      await page.setContent(`<!doctype html><body style="margin:0;width:640px">${linear}${log}</body>`);
      const report = (await page.evaluate(`[...document.querySelectorAll("svg.plot")].map((svg) => {
        const frame = svg.querySelector(".frame").getBoundingClientRect();
        return [...svg.querySelectorAll(".series")].map((s) => {
          const shapes = [...s.querySelectorAll("path, rect, circle")].filter((m) => !m.closest("pattern"));
          const boxes = (shapes.length ? shapes : [s]).map((m) => m.getBoundingClientRect()).filter((b) => b.width > 0 || b.height > 0);
          const outside = boxes.filter((b) => b.left < frame.left - 0.5 || b.right > frame.right + 0.5 || b.top < frame.top - 0.5 || b.bottom > frame.bottom + 0.5).length;
          return { name: s.dataset.series, marks: boxes.length, outside };
        });
      })`)) as { name: string; marks: number; outside: number }[][];
      expect(report.length).toBe(2);
      for (const plot of report) {
        expect(plot.map((s) => s.name)).toEqual(["window", "counts", "band", "histogram", "rule", "line", "points"]);
        for (const s of plot) {
          expect(s.marks, s.name).toBeGreaterThan(0);
          expect(s.outside, s.name).toBe(0);
        }
      }
    } finally {
      await page.close();
    }
  });
});
