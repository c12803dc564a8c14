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
import { ROW_UNIT } from "../../../src/checks/types.ts";
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
    // current (1 eV/s = 1.602 176 634 × 10⁻¹⁹ J/s, exact), a particle rate in 1/ms, an energy squared per second
    // in meV²/s. The p column would otherwise have picked the prefix (EeV/s for a 10⁻¹⁸ J/s estimate).
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
      ["26", "62", "380.1", "1"],
      ["−1.7", "1.1", "8.721", "0.9604"],
      ["0.1", "1.9", "20.07", "1"],
    ]);
    // The rate row takes its prefix on the second from its largest number, 20 070 1/s = 20.07 1/ms.
    // J²/s in meV²/s: e² = 2.566 969 932 × 10⁻³⁸ J² per eV² (exact), so 9.756 × 10⁻⁴² J²/s = 3.8006 × 10⁻⁴ eV²/s
    // = 380.1 meV²/s; the milli is squared with its unit (SI Brochure 9th ed. §3.1).
    expect(t.rows.map((r) => r[1])).toEqual(["meV²/s", "eV/s", "1/ms"]);
  });

  test("reciprocity's diagonal entries: a TOST p-value beside a row's unit stays a probability (marked and older tables)", () => {
    // Rows of the ab2-thermoelectric-field-sweep demo. Before the fix the unmarked table multiplied the TOST
    // p = 0.1998 by 10⁶ like G, and the row's prefix came from it: 0.001 821 mS, p = 199.8. L22 in W K
    // now takes a prefix too: 3.652 × 10⁻¹³ W K = 365.2 fW K (SI Brochure 9th ed., Table 7: f = 10⁻¹⁵).
    const rows = [
      { relation: "G(B) = G(−B)", x: 1.8214e-6, y: 1.7638e-6, unit: "S", u: 3.843e-8, z: 1.49, tost_p: 0.1998 },
      { relation: "L22(B) = L22(−B)", x: 3.652e-13, y: 3.587e-13, unit: "W K", u: 2.036e-14, z: 0.3222, tost_p: 0.2855 },
    ];
    const marked = tableDisplay(
      {
        id: "diagonal",
        title: "d",
        columns: [
          { key: "relation", label: "Relation" },
          { key: "x", label: "At +B", unit: ROW_UNIT },
          { key: "y", label: "At −B", unit: ROW_UNIT },
          { key: "unit", label: "Unit" },
          { key: "u", label: "u(difference)", unit: ROW_UNIT },
          { key: "z", label: "z" },
          { key: "tost_p", label: "TOST p" },
        ],
        rows,
      },
      {},
    );
    const expected = [
      ["1.821", "1.764", "µS", "0.038 43", "1.49", "0.1998"],
      ["365.2", "358.7", "fW K", "20.36", "0.3222", "0.2855"],
    ];
    expect(marked.rows.map((r) => r.slice(1).map(plain))).toEqual(expected);
    expect(marked.headers.map((h) => h.unit).slice(1)).toEqual(["unit as in each row", "unit as in each row", "", "unit as in each row", "dimensionless", "dimensionless"]);
    // A result document published before columns were marked (no ROW_UNIT anywhere) reads the same.
    const older = tableDisplay(
      {
        id: "diagonal",
        title: "d",
        columns: [
          { key: "relation", label: "Relation" },
          { key: "x", label: "At +B", unit: "SI" },
          { key: "y", label: "At −B", unit: "SI" },
          { key: "unit", label: "Unit" },
          { key: "u", label: "u(difference)", unit: "SI" },
          { key: "z", label: "z" },
          { key: "tost_p", label: "TOST p" },
        ],
        rows,
      },
      {},
    );
    expect(older.rows.map((r) => r.slice(1).map(plain))).toEqual(expected);
  });

  test("only the columns marked as in the row's unit take it: a count of points beside a flux stays a count", () => {
    // linear-growth's table: a heat flux of 2.5 × 10⁻¹⁵ W (2.5 fW) fitted over 40 points.
    const t = tableDisplay(
      {
        id: "fluxes",
        title: "f",
        columns: [
          { key: "points", label: "Points" },
          { key: "flux", label: "Flux", unit: ROW_UNIT },
          { key: "se", label: "Standard error", unit: ROW_UNIT },
          { key: "unit", label: "Unit" },
        ],
        rows: [{ points: 40, flux: 2.5e-15, se: 1.2e-16, unit: "W" }],
      },
      {},
    );
    expect(t.rows[0].map(plain)).toEqual(["40", "2.50", "0.12", "fW"]);
    expect(t.headers[0].unit).toBe("dimensionless");
  });

  test("an Onsager matrix a row in entropy units takes one prefix per matrix, from its largest entry", () => {
    // Two rows of N = D L D (W/K): 15.95, −9.35, −9.43, 281 fW/K and a second matrix ten times larger, which
    // reads in pW/K; every entry of a row shares its row's prefix (SI Brochure 9th ed. §3).
    const t = tableDisplay(
      {
        id: "entropy-units",
        title: "N",
        columns: [
          { key: "N11", label: "N11", unit: ROW_UNIT },
          { key: "N12", label: "N12", unit: ROW_UNIT },
          { key: "N21", label: "N21", unit: ROW_UNIT },
          { key: "N22", label: "N22", unit: ROW_UNIT },
          { key: "unit", label: "Unit" },
        ],
        rows: [
          { N11: 1.595e-14, N12: -9.35e-15, N21: -9.43e-15, N22: 2.81e-13, unit: "W/K" },
          { N11: 1.595e-13, N12: -9.35e-14, N21: -9.43e-14, N22: 2.81e-12, unit: "W/K" },
        ],
      },
      {},
    );
    expect(t.rows.map((r) => r.map(plain))).toEqual([
      ["15.95", "−9.35", "−9.43", "281", "fW/K"],
      ["0.1595", "−0.0935", "−0.0943", "2.81", "pW/K"],
    ]);
  });

  test("sentences: 1/J, J/s and J²/s are read as units and shown in the dataset's energy unit", () => {
    // From the dd8 and vq5 demos (energies in meV). 1/J → 1/meV multiplies by e/10³ = 1.602 176 634 × 10⁻²²:
    // −5.73 × 10²³ 1/J = −91.80 1/meV. 1.257 × 10⁻¹⁷ J/s / e = 78.46 eV/s. J²/s → meV²/s divides by
    // (e × 10⁻³)² = 2.566 969 932 × 10⁻⁴⁴: 9.756 × 10⁻⁴² J²/s = 380.1 meV²/s (SI 2019 exact e).
    const ctx = { energyUnit: "meV" };
    expect(plain(rewriteNumbers("β̄·ε₂ + a_Q = -5.73e+23 ± 6.2e+21 1/J (declared -5.794e+23 1/J).", ctx))).toBe("β̄·ε₂ + a_Q = (−91.80 ± 0.99) 1/meV (declared −92.83 1/meV).");
    expect(plain(rewriteNumbers("(slope 1.257e-17 J/s)", ctx))).toBe("(slope 78.46 eV/s)");
    expect(plain(rewriteNumbers("L = 9.756e-42 J²/s", ctx))).toBe("L = 380.1 meV²/s");
    // In joules the squared unit keeps joules and squares its prefix: 9.756 × 10⁻⁴² J²/s = 9.756 zJ²/s (zepto² = 10⁻⁴²).
    expect(plain(rewriteNumbers("L = 9.756e-42 J²/s", { energyUnit: "J" }))).toBe("L = 9.756 zJ²/s");
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
