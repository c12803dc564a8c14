import { describe, expect, test } from "vitest";
import { summaryTable } from "../../src/cli/summaryTable.ts";
import type { ResultDocument } from "../../src/report/resultDocument.ts";

const doc = (summary: string): ResultDocument => ({
  audit: "a",
  title: "An audit",
  authors: [{ name: "A. N. Example" }],
  tool: { name: "transport-audit", version: "0" },
  fingerprint: "sha256:0",
  stamp: "pass",
  settings: { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: "auto", resamples: 2000 },
  datasets: [{ id: "d", file: "data/d.csv", sha256: "0", rows: 1, energy_unit: "meV" }],
  checks: [{ check: "figures-of-merit", dataset: "d", status: "info", summary, values: {}, criteria: {}, assumptions: [], references: [], equations: [], tables: [], plots: [] }],
});

describe("summaryTable", () => {
  test("the terminal's summary has no e-notation, display units, and Unicode sub/superscripts where they exist", () => {
    const out = summaryTable(doc("ZT ranges from 6.69e-4 to 0.316, where η_max/η_C = 0.0699 at T_A = 0.12 K."), false, 200);
    const line = out.split("\n").find((l) => l.startsWith("figures-of-merit"))!;
    // 0.12 K is 120 mK (prefix from the SI Brochure's table); η_C keeps its underscore (no subscript capital C in Unicode).
    expect(line.replaceAll("\u202f", " ")).toContain("ZT ranges from 6.69 × 10⁻⁴ to 0.316, where ηₘₐₓ/η_C = 0.0699 at T_A = 120 mK.");
  });

  test("a line is never broken inside a number or between a number and its unit", () => {
    const out = summaryTable(doc("word ".repeat(9) + "value 0.00945 and 0.12 K."), false, 80);
    expect(out).toContain("0.009\u202f45");
    expect(out).toContain("120\u202fmK");
  });
});
