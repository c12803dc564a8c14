/**
 * Contrast of the stylesheet's colour pairs on light screens, dark screens
 * and paper, by WCAG 2.1 §1.4.3 (text: at least 4.5:1) and §1.4.11 (plot
 * marks and other graphical objects: at least 3:1).
 */
import fs from "node:fs";
import path from "node:path";
import { describe, expect, test } from "vitest";
import { expectClose } from "../helpers/expectClose.ts";
import { contrastRatio, customProperties, relativeLuminance } from "./contrast.ts";
import { PALETTE } from "../../src/report/plots/palette.ts";
import { PROJECT_ROOT } from "./demoSite.ts";

const css = fs.readFileSync(path.join(PROJECT_ROOT, "templates", "assets", "style.css"), "utf8");
const light = customProperties(css, ":root {");
const dark = { ...light, ...customProperties(css, "@media screen and (prefers-color-scheme: dark)") };
const print: Record<string, string> = { ...light, ...customProperties(css, "@media print"), bg: "#ffffff" };

/** Text colour on background colour, as the stylesheet pairs them. */
const TEXT_PAIRS: [string, string][] = [
  ["fg", "bg"],
  ["muted", "bg"],
  ["accent", "bg"],
  ["fg", "panel"],
  ["fg", "neutral-bg"], // the reason box
  ["pass", "pass-bg"],
  ["fail", "fail-bg"],
  ["inconclusive", "inconclusive-bg"],
  ["neutral", "neutral-bg"],
];

describe("WCAG contrast arithmetic", () => {
  test("black on white is 21:1 and white has luminance 1", () => {
    // Exact from the WCAG 2.1 definitions: (1 + 0.05) / (0 + 0.05) = 21.
    expectClose(contrastRatio("#000000", "#ffffff"), 21, { rtol: 1e-12, source: "WCAG 2.1, definition of contrast ratio (exact)" });
    expectClose(relativeLuminance("#ffffff"), 1, { rtol: 1e-12, source: "WCAG 2.1, definition of relative luminance (exact)" });
  });

  test("#767676 on white is the lightest grey that passes 4.5:1", () => {
    // 4.54:1, a value widely quoted in accessibility guides (from memory); 0.005 covers its rounding.
    expectClose(contrastRatio("#767676", "#ffffff"), 4.54, { atol: 0.005, source: "common practice: #767676 on white, 4.54:1" });
    expect(contrastRatio("#777777", "#ffffff")).toBeLessThan(4.5);
  });
});

describe("the report stylesheet", () => {
  for (const [name, scheme] of [["light screen", light], ["dark screen", dark]] as const) {
    test(`every text colour pair reaches 4.5:1 on a ${name}`, () => {
      for (const [fg, bg] of TEXT_PAIRS) {
        expect(scheme[fg], `--${fg}`).toBeDefined();
        expect(scheme[bg], `--${bg}`).toBeDefined();
        expect(contrastRatio(scheme[fg], scheme[bg]), `--${fg} on --${bg} (${scheme[fg]} on ${scheme[bg]}), ${name}`).toBeGreaterThanOrEqual(4.5);
      }
    });

    test(`the first five plot colours reach 3:1 against the page on a ${name}`, () => {
      for (let i = 0; i < 5; i++) {
        const colour = scheme[`plot-${i}`];
        expect(colour, `--plot-${i}`).toBeDefined();
        expect(contrastRatio(colour, scheme.bg), `--plot-${i} ${colour} on ${scheme.bg}, ${name}`).toBeGreaterThanOrEqual(3);
      }
    });
  }

  test("on paper, text and verdict colours reach 4.5:1 on white", () => {
    for (const key of ["fg", "muted", "pass", "fail", "inconclusive", "neutral"]) {
      expect(contrastRatio(print[key], print.bg), `--${key} ${print[key]} printed`).toBeGreaterThanOrEqual(4.5);
    }
  });

  test("the plot palette in the renderer and the stylesheet's light screen agree", () => {
    PALETTE.forEach((hex, i) => {
      const expected = i === 4 ? light.fg : hex; // the fifth series is drawn in the text colour on screen
      expect(light[`plot-${i}`]?.toLowerCase(), `--plot-${i}`).toBe(expected.toLowerCase());
    });
  });
});
