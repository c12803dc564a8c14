/**
 * Sentences and tables the checks write, as the report shows them. Expected
 * conversions are exact arithmetic with the SI 2019 defining constants
 * (e = 1.602 176 634 × 10⁻¹⁹ C exact; SI Brochure 9th ed., Table 1); the
 * rounding follows the GUM (JCGM 100:2008 §7.2.6): two significant digits of
 * the uncertainty, the value to match.
 */
import { describe, expect, test } from "vitest";
import { plainNotation, rewriteNumbers, tokenizeNotation } from "../../../src/report/format/index.ts";
import { notationHtml } from "../../../src/report/format/notationHtml.ts";
import { tableDisplay } from "../../../src/report/format/tableDisplay.ts";
import { displayPlotSpec } from "../../../src/report/plots/displayPlot.ts";

const plain = (s: string) => s.replaceAll("\u202f", " ");

describe("rewriteNumbers", () => {
  test("e-notation becomes ×10ⁿ and a hyphen before a number a true minus", () => {
    expect(plain(rewriteNumbers("ZT ranges from 6.69e-4 to 0.316; r_Q = -0.2793 [-0.2978, -0.2722]"))).toBe(
      "ZT ranges from 6.69 × 10⁻⁴ to 0.316; r_Q = −0.2793 [−0.2978, −0.2722]",
    );
    expect(plain(rewriteNumbers("significantly above 1 (p = 5e-4 ≤ α = 0.01)"))).toBe("significantly above 1 (p = 5 × 10⁻⁴ ≤ α = 0.01)");
  });

  test("a number with a unit takes the display unit of its quantity, with the digits it was written with", () => {
    // 0.003997 meV = 3.997 µeV; 0.12 K = 120 mK; 2.443e-8 W Ω K⁻² = 24.43 nW Ω K⁻²; 1e-6 s = 1 µs.
    expect(plain(rewriteNumbers("effective μ_A − μ_B = 0.003997 meV (declared 0.004 meV); T_A = 0.12 K", { energyUnit: "meV" }))).toBe(
      "effective μ_A − μ_B = 3.997 µeV (declared 4 µeV); T_A = 120 mK",
    );
    expect(plain(rewriteNumbers("(L0 = 2.443e-8 W Ω K⁻²)"))).toBe("(L0 = 24.43 nW Ω K⁻²)");
    expect(plain(rewriteNumbers("τ = 1e-6 s, heat and particles"))).toBe("τ = 1 µs, heat and particles");
  });

  test("a value ± uncertainty pair is rounded together as the GUM recommends", () => {
    expect(plain(rewriteNumbers("⟨Σ⟩ = 0.03446 ± 4.1e-4 k_B; the bound"))).toBe("⟨Σ⟩ = (0.034 46 ± 0.000 41) k_B; the bound");
  });

  test("numbers that are part of a name are left alone", () => {
    expect(rewriteNumbers("datasets count-2ns and lc60, columns L12 and Vg_mV")).toBe("datasets count-2ns and lc60, columns L12 and Vg_mV");
  });
});

describe("notation", () => {
  test("known notation is read as maths: subscripts upright, e^−Σ, averages", () => {
    const math = tokenizeNotation("⟨e^−Σ⟩ = 1.002 and η_max/η_C at T_A, in k_B").filter((t) => t.kind === "math");
    expect(math.map((t) => (t.kind === "math" ? t.tex : ""))).toEqual([
      "\\langle \\mathrm{e}^{-\\Sigma}\\rangle",
      "\\eta_{\\mathrm{max}}",
      "\\eta_{\\mathrm{C}}",
      "T_{\\mathrm{A}}",
      "k_{\\mathrm{B}}",
    ]);
  });

  test("a column name is not notation: Vg_mV stays as written", () => {
    expect(tokenizeNotation("at Vg_mV = 6")).toEqual([{ kind: "text", text: "at Vg_mV = 6" }]);
  });

  test("the terminal's form uses Unicode sub- and superscripts only where every character has one", () => {
    expect(plainNotation("η_max/η_C and e^−2 and T_A")).toBe("ηₘₐₓ/η_C and e⁻² and T_A");
  });

  test("HTML: text escaped, notation typeset by KaTeX", () => {
    const html = notationHtml("<b> T_A = 0.12 K");
    expect(html.startsWith("&lt;b&gt; ")).toBe(true);
    expect(html).toContain('class="katex"');
    expect(html).toContain("120\u202fmK");
  });
});

describe("tables and plots in display units", () => {
  test("a column with a unit takes one prefix; u(X) is rounded with X; dimensionless numbers say so", () => {
    const t = tableDisplay(
      {
        id: "t",
        title: "t",
        columns: [
          { key: "p", label: "Operating point" },
          { key: "x", label: "Left side", unit: "µV" },
          { key: "u", label: "u(Left side)", unit: "µV" },
          { key: "z", label: "z" },
        ],
        rows: [
          { p: "Vg_mV = -20", x: -60.573094, u: 0.848475, z: 0.6373 },
          { p: "Vg_mV = 6", x: -1234.5, u: 27.3, z: -1.2 },
        ],
      },
      {},
    );
    expect(t.headers.map((h) => [h.label.replace(/<[^>]+>/g, ""), h.unit])).toEqual([
      ["Operating point", ""],
      ["Left side", "mV"],
      ["u(Left side)", "mV"],
      ["z", "dimensionless"],
    ]);
    // Column unit from the largest |value|, 1234.5 µV → mV. Row 1: u = 0.000 848 mV → 0.000 85, value to match.
    expect(t.rows.map((r) => r.slice(1).map(plain))).toEqual([
      ["−0.060 57", "0.000 85", "0.6373"],
      ["−1.234", "0.027", "−1.2"],
    ]);
    expect(t.rows[0][0]).toBe("Vg_mV = −20");
  });

  test("a row that names its unit is converted row by row", () => {
    const t = tableDisplay(
      {
        id: "r",
        title: "r",
        columns: [
          { key: "q", label: "Quantity" },
          { key: "d", label: "Declared" },
          { key: "e", label: "From the fit" },
          { key: "unit", label: "Unit" },
        ],
        rows: [
          { q: "T_A", d: 0.12, e: 0.1192, unit: "K" },
          { q: "μ_A − μ_B", d: 6.408706536e-25, e: 6.4e-25, unit: "J" },
        ],
      },
      { energyUnit: "meV" },
    );
    // 6.408706536e-25 J / 1.602176634e-19 J/eV = 4.000 µeV exactly.
    expect(t.rows.map((r) => r.slice(1, 3).map(plain))).toEqual([
      ["120", "119.2"],
      ["4", "3.995"],
    ]);
    expect(t.rows[0][3]).toBe("mK");
    expect(t.rows[1][3]).toBe("µeV");
  });

  test("a row's unit applies to its quantities, never to its z-score, p-values or a column with its own unit", () => {
    // The exchange relation's coefficient table: a_Q per joule shown per meV, with z and p beside it. Before
    // this, z = −0.3847 and p = 0.7005 were multiplied by e/10³ like a_Q and printed as −6.163 × 10⁻²³ and
    // 1.122 × 10⁻²² (values from the vq3-heat-exchange demo; 1/J → 1/meV is × 1.602 176 634 × 10⁻²², exact).
    const t = tableDisplay(
      {
        id: "coefficients",
        title: "c",
        columns: [
          { key: "coefficient", label: "Coefficient" },
          { key: "unit", label: "Unit" },
          { key: "declared", label: "Declared" },
          { key: "fitted", label: "Fitted" },
          { key: "se", label: "Standard error" },
          { key: "z", label: "z" },
          { key: "p", label: "p" },
          { key: "p_holm", label: "p (Holm)" },
          { key: "ratio", label: "Ratio", unit: "1" },
        ],
        rows: [{ coefficient: "a_Q", unit: "1/J", declared: 4.828e22, fitted: 4.8053e22, se: 6.031e20, z: -0.3847, p: 0.7005, p_holm: 1, ratio: 0.9953 }],
      },
      { energyUnit: "meV" },
    );
    // Fitted and its standard error rounded together (GUM §7.2.6): 7.699 ± 0.097 per meV.
    expect(t.rows[0].slice(2).map(plain)).toEqual(["7.735", "7.699", "0.097", "−0.3847", "0.7005", "1", "0.9953"]);
    expect(t.headers.map((h) => h.unit).slice(2)).toEqual(["unit as in each row", "unit as in each row", "unit as in each row", "dimensionless", "dimensionless", "dimensionless", "dimensionless"]);
  });

  test("fluctuation-dissipation's comparisons: every row in its own unit, its prefix from its own numbers", () => {
    // Rows of the vq5-response-sweep demo (energies in meV): an energy per second is shown in eV/s like a heat
    // current (1 eV/s = 1.602 176 634 × 10⁻¹⁹ J/s, exact), a particle rate in 1/s; J²/s has no display unit and
    // stays in SI. The p column would otherwise have picked the prefix (EeV/s for a 10⁻¹⁸ J/s estimate).
    const t = tableDisplay(
      {
        id: "comparisons",
        title: "Comparisons behind the verdict (each should be zero)",
        columns: [
          { key: "label", label: "Difference" },
          { key: "unit", label: "Unit" },
          { key: "estimate", label: "Estimate" },
          { key: "se", label: "Standard error" },
          { key: "bound", label: "Margin ±" },
          { key: "p", label: "Holm-adjusted p" },
        ],
        rows: [
          { label: "L[Q,Q] − L_fluct[Q,Q]", unit: "J²/s", estimate: 6.72e-43, se: 1.6e-42, bound: 9.756e-42, p: 1 },
          { label: "L[Q,dN] − L_fluct[Q,dN]", unit: "J/s", estimate: -2.676e-19, se: 1.802e-19, bound: 1.3973e-18, p: 0.9604 },
          { label: "s[N]", unit: "1/s", estimate: 107.7, se: 1863, bound: 20070, p: 1 },
        ],
      },
      { energyUnit: "meV" },
    );
    expect(t.rows.map((r) => r.slice(2).map(plain))).toEqual([
      ["0.7 × 10⁻⁴²", "1.6 × 10⁻⁴²", "9.756 × 10⁻⁴²", "1"],
      ["−1.7", "1.1", "8.721", "0.9604"],
      ["100", "1900", "20 070", "1"],
    ]);
    expect(t.rows.map((r) => r[1])).toEqual(["J²/s", "eV/s", "1/s"]);
  });

  test("a plot axis in W of an eV dataset is redrawn in eV/s with a prefix, like the tables beside it", () => {
    const spec = displayPlotSpec(
      { id: "p", title: "t", alt: "slope 3.17e-12 W", x: { label: "Time", unit: "s" }, y: { label: "Heat flux J_Q", unit: "W" }, series: [{ type: "line", name: "l", x: [0, 2e-6], y: [0, 1.602176634e-20] }] },
      { energyUnit: "meV" },
    );
    expect(spec.x.unit).toBe("µs");
    expect(spec.y.unit).toBe("meV/s");
    const line = spec.series[0];
    expect(line.type === "line" ? line.y[1] : 0).toBeCloseTo(100, 10); // 1.602e-20 W = 0.1 eV/s = 100 meV/s
    // 3.17e-12 W / 1.602176634e-19 J/eV = 1.9786e7 eV/s: 19.8 MeV/s at the three digits written.
    expect(plain(spec.alt)).toBe("slope 19.8 MeV/s");
  });
});
