import { parse as parseCsv } from "csv-parse/sync";
import bibtexParse from "bibtex-parse";
import { describe, expect, it } from "vitest";
import { parse as parseYaml } from "yaml";
import { ROW_UNIT, type CheckResult } from "../../src/checks/types.ts";
import type { ArchiveDefinition } from "../../src/config/archiveSchema.ts";
import {
  bibtexEntry,
  bibtexName,
  checksTableTex,
  citationCff,
  citationSubject,
  initials,
  latexText,
  plainCitation,
  pointsCsv,
  splitName,
  statusBadgeSvg,
  versionUrl,
} from "../../src/report/citation/index.ts";
import type { ResultDocument } from "../../src/report/resultDocument.ts";

const archive: ArchiveDefinition = {
  name: "Varga Laboratory transport audits",
  publisher: "Varga Cryogenic Transport Laboratory, Institute for Mesoscopic Physics, Lindqvist",
  base_url: "https://audits.example.org/",
  license: "CC-BY-4.0",
};

function check(over: Partial<CheckResult>): CheckResult {
  return {
    check: "second-law",
    dataset: "pulse_40ns",
    status: "pass",
    summary: "⟨Σ⟩ = 0.2277 ± 0.0048 k_B; the 95% lower bound excludes a violation larger than 0.05 k_B.",
    values: {},
    criteria: {},
    assumptions: [],
    references: [],
    equations: [],
    tables: [],
    plots: [],
    ...over,
  };
}

/** A result document with awkward text on purpose: LaTeX specials, quotes, commas, non-ASCII names. */
function result(over: Partial<ResultDocument> = {}): ResultDocument {
  return {
    audit: "vq3-heat-exchange",
    title: 'Heat & charge at 100% gate: "VQ-3" {test} with a_b',
    authors: [
      { name: "Ilse Varga", orcid: "0000-0002-1825-0097", affiliation: "Varga Cryogenic Transport Laboratory, Lindqvist" },
      { name: "Ana Beltrão" },
      { name: "Jan van der Berg" },
    ],
    license: "CC-BY-4.0",
    device: "VQ-3",
    tool: { name: "transport-audit", version: "0.1.0" },
    fingerprint: "sha256:52bdf9e1f426634124f71c7c18cec0e12fcee4f5236377e08fd34d71bf7a1256",
    stamp: "fail",
    settings: { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: "auto", resamples: 2000 },
    datasets: [{ id: "pulse_40ns", file: "data/exchange.csv", sha256: "ab".repeat(32), rows: 20000 }],
    checks: [
      check({
        tables: [
          {
            id: "contributions",
            title: "Contributions",
            columns: [
              { key: "channel", label: "Channel" },
              { key: "mean", label: "Mean, ⟨Σ⟩", unit: "k_B" },
            ],
            rows: [
              { channel: 'heat "Q", left', mean: 0.1 + 0.2 },
              { channel: "particles", mean: -1.5e-21 },
              { channel: "none", mean: null },
            ],
          },
        ],
      }),
      check({ check: "work", status: "fail", summary: "Work 50% & more: W ≥ 0 fails #1 {x} ~ ^" }),
    ],
    ...over,
  };
}

const DOI = "10.5281/zenodo.1234567";

describe("CITATION.cff", () => {
  // Required keys of the Citation File Format 1.2.0 (Druskat, S., Spaaks, J. H., Chue Hong, N., Haines, R.,
  // Baker, J., Bliven, S., Willighagen, E., Pérez-Suárez, D. and Konovalov, O., Citation File Format, 2021,
  // version 1.2.0, https://doi.org/10.5281/zenodo.5171937): cff-version, message, title, authors; a person
  // author carries family-names (and optionally given-names, name-particle, affiliation, orcid as a URL);
  // date-released is a YYYY-MM-DD date; identifiers have type doi | url | swh | other. (Key list from the
  // specification's schema, recalled from memory.)
  it("parses as YAML and carries every key that CFF 1.2.0 requires", () => {
    const text = citationCff(citationSubject(result(), { number: 3, date: "2026-12-01" }, archive));
    const doc = parseYaml(text) as Record<string, unknown>;
    expect(doc["cff-version"]).toBe("1.2.0");
    expect(typeof doc.message).toBe("string");
    expect((doc.message as string).length).toBeGreaterThan(0);
    expect(doc.title).toBe('Heat & charge at 100% gate: "VQ-3" {test} with a_b (transport audit vq3-heat-exchange, version 3)');
    expect(doc.authors).toEqual([
      { "given-names": "Ilse", "family-names": "Varga", affiliation: "Varga Cryogenic Transport Laboratory, Lindqvist", orcid: "https://orcid.org/0000-0002-1825-0097" },
      { "given-names": "Ana", "family-names": "Beltrão" },
      { "given-names": "Jan", "name-particle": "van der", "family-names": "Berg" },
    ]);
    expect(String(doc["date-released"])).toBe("2026-12-01");
    expect(doc.version).toBe("3");
    expect(doc.type).toBe("dataset");
    expect(doc.url).toBe("https://audits.example.org/vq3-heat-exchange/v3/");
    expect(doc.license).toBe("CC-BY-4.0");
    for (const id of doc.identifiers as { type: string }[]) expect(["doi", "url", "swh", "other"]).toContain(id.type);
    expect(doc.doi).toBeUndefined();
  });

  it("carries the DOI once the audit has one, and the archive's repository when declared", () => {
    const withRepository = { ...archive, repository: "https://audits.example.org/varga-lab/transport-audits.git" };
    const doc = parseYaml(citationCff(citationSubject(result({ doi: DOI }), { number: 3, date: "2026-12-01" }, withRepository))) as Record<string, unknown>;
    expect(doc.doi).toBe(DOI);
    expect(doc.repository).toBe("https://audits.example.org/varga-lab/transport-audits.git");
    expect((doc.identifiers as { type: string; value: string }[])[0]).toMatchObject({ type: "doi", value: DOI });
  });
});

describe("BibTeX entry", () => {
  it("parses with an independent BibTeX parser (bibtex-parse) and keeps every field, special characters included", () => {
    const text = bibtexEntry(citationSubject(result({ doi: DOI }), { number: 3, date: "2026-12-01" }, archive));
    const entries = bibtexParse.entries(text);
    expect(entries).toHaveLength(1);
    const e = entries[0];
    expect(e.key).toBe("vq3-heat-exchange-v3");
    expect(e.type).toBe("misc");
    expect(e.AUTHOR).toBe("Varga, Ilse and Beltrão, Ana and van der Berg, Jan");
    // bibtex-parse strips the protecting braces and undoes some escapes (\% \_) but keeps others (\&) and the
    // brace commands' names; every field is decoded and compared in citationHostile.test.ts.
    expect(String(e.TITLE)).toBe('Heat \\& charge at 100% gate: "VQ-3" \\textbracelefttest\\textbraceright with a_b');
    expect(String(e.YEAR)).toBe("2026");
    expect(e.MONTH).toBe("December");
    expect(e.DOI).toBe(DOI);
    expect(e.URL).toBe("https://audits.example.org/vq3-heat-exchange/v3/");
    expect(String(e.VERSION)).toBe("3");
    expect(e.NOTE).toContain("fingerprint sha256:52bdf9e1f426634124f71c7c18cec0e12fcee4f5236377e08fd34d71bf7a1256");
  });

  it("writes names in the unambiguous 'von Last, First' form", () => {
    expect(bibtexName("Jan van der Berg")).toBe("van der Berg, Jan");
    expect(bibtexName("A. N. Example")).toBe("Example, A. N.");
    expect(bibtexName("Curie, Marie")).toBe("Curie, Marie");
    expect(bibtexName("Plato")).toBe("Plato");
  });
});

describe("names", () => {
  it("splits given names, particle and family name", () => {
    expect(splitName("Ilse Varga")).toEqual({ given: "Ilse", family: "Varga" });
    expect(splitName("Jan van der Berg")).toEqual({ given: "Jan", particle: "van der", family: "Berg" });
    expect(splitName("van der Berg, Jan")).toEqual({ given: "Jan", particle: "van der", family: "Berg" });
    expect(splitName("  A.  N.   Example ")).toEqual({ given: "A. N.", family: "Example" });
  });

  it("abbreviates given names to initials, hyphenated names included", () => {
    expect(initials("Jean-Luc Anne")).toBe("J.-L. A.");
    expect(initials("A. N.")).toBe("A. N.");
    expect(initials("Łucja")).toBe("Ł.");
  });
});

describe("plain-text citation", () => {
  it("names authors, year, title, audit, version, date, publisher, DOI link and fingerprint", () => {
    const text = plainCitation(citationSubject(result({ doi: DOI }), { number: 3, date: "2026-12-01" }, archive));
    expect(text).toBe(
      'Varga, I., Beltrão, A. and van der Berg, J. (2026). Heat & charge at 100% gate: "VQ-3" {test} with a_b. ' +
        "Transport audit vq3-heat-exchange, version 3, published 2026-12-01. " +
        "Varga Cryogenic Transport Laboratory, Institute for Mesoscopic Physics, Lindqvist. https://doi.org/10.5281/zenodo.1234567. " +
        "Fingerprint sha256:52bdf9e1f426634124f71c7c18cec0e12fcee4f5236377e08fd34d71bf7a1256.\n",
    );
  });

  it("gives the version's address when there is no DOI, and nothing when the archive has no base URL", () => {
    expect(plainCitation(citationSubject(result(), { number: 1, date: "2026-12-01" }, archive))).toContain(" https://audits.example.org/vq3-heat-exchange/v1/. ");
    const { base_url: _, ...noBase } = archive;
    expect(plainCitation(citationSubject(result(), { number: 1, date: "2026-12-01" }, noBase))).not.toContain("http");
    expect(versionUrl("https://example.org/audits", "a", 2)).toBe("https://example.org/audits/a/v2/");
  });
});

describe("LaTeX table", () => {
  it("escapes every LaTeX special character and spells symbols in math mode", () => {
    expect(latexText("a & b % c $ d # e _ f { g } h ~ i ^ j \\ k")).toBe(
      "a \\& b \\% c \\$ d \\# e \\_ f \\{ g \\} h \\textasciitilde{} i \\textasciicircum{} j \\textbackslash{} k",
    );
    // Notation in math mode; a value ± uncertainty pair through siunitx, rounded as in the GUM (JCGM 100:2008 §7.2.6).
    expect(latexText("⟨Σ⟩ = 0.2 ± 0.1 k_B")).toBe("$\\langle \\Sigma\\rangle$ = (\\num{0.20}~$\\pm$~\\num{0.10})\\,$k_\\mathrm{B}$");
    // Neighbouring symbols share one formula: `$a$$b$` would open display math in TeX.
    expect(latexText("<x xᵀ>₀ < 1")).toBe("\\textless{}x x$^\\mathsf{T}$\\textgreater{}$_0$ \\textless{} \\num{1}");
    // Numbers in display units through siunitx: 0.12 K is 120 mK; 6.69e-4 as \num{6.69e-4}, which siunitx sets as 6.69 × 10⁻⁴.
    expect(latexText("T_A = 0.12 K, ZT = 6.69e-4")).toBe("$T_{\\mathrm{A}}$ = \\num{120}\\,\\si{\\milli\\kelvin}, ZT = \\num{6.69e-4}");
    // β̄ (β with a combining macron, the mean inverse temperature) keeps its bar; it was once printed as plain β.
    expect(latexText("β̄·ε₂ + a_Q")).toBe("$\\bar{\\beta} \\cdot \\varepsilon _2$ + $a_{\\mathrm{Q}}$");
    // The table's old double-superscript: the Lorenz number's unit in siunitx, W Ω K⁻² with its prefix.
    expect(latexText("L0 = 2.443e-8 W Ω K⁻²")).toBe("L0 = \\num{24.43}\\,\\si{\\nano\\watt\\ohm\\per\\kelvin\\squared}");
  });

  it("lists every check with its verdict, with balanced braces, and names the DOI and fingerprint", () => {
    const tex = checksTableTex(result({ doi: DOI }), citationSubject(result({ doi: DOI }), { number: 3, date: "2026-12-01" }, archive));
    const body = tex
      .split("\n")
      .filter((l) => !l.startsWith("%"))
      .join("\n");
    let depth = 0;
    for (const [i, c] of [...body].entries()) {
      if (c === "{" && body[i - 1] !== "\\") depth++;
      if (c === "}" && body[i - 1] !== "\\") depth--;
      expect(depth).toBeGreaterThanOrEqual(0);
    }
    expect(depth).toBe(0);
    expect(body).not.toContain("$$");
    expect(body).toContain("\\texttt{second-law} & pulse\\_40ns & pass & ");
    expect(body).toContain("\\texttt{work} & pulse\\_40ns & fail & Work \\num{50}\\% \\& more: W $\\ge$ \\num{0} fails \\#\\num{1} \\{x\\} \\textasciitilde{} \\textasciicircum{} \\\\");
    expect(body).toContain("DOI 10.5281/zenodo.1234567.");
    expect(body).toContain("\\label{tab:vq3-heat-exchange-v3}");
    expect(body.replace(/\\allowbreak /g, "")).toContain("\\texttt{sha256:52bdf9e1f426634124f71c7c18cec0e12fcee4f5236377e08fd34d71bf7a1256}");
  });
});

describe("per-point numbers CSV", () => {
  it("parses with csv-parse into one row per table cell, numbers round-tripping exactly", () => {
    const text = pointsCsv(result({ doi: DOI }), citationSubject(result({ doi: DOI }), { number: 3, date: "2026-12-01" }, archive));
    expect(text.split("\r\n")[1]).toContain("DOI 10.5281/zenodo.1234567");
    const rows = parseCsv(text, { comment: "#", columns: true, record_delimiter: "\r\n" }) as Record<string, string>[];
    expect(rows).toHaveLength(3 * 2);
    expect(rows[0]).toEqual({ check: "second-law", dataset: "pulse_40ns", table: "contributions", row: "1", column: "channel", label: "Channel", unit: "", value: 'heat "Q", left' });
    expect(rows[1]).toEqual({ check: "second-law", dataset: "pulse_40ns", table: "contributions", row: "1", column: "mean", label: "Mean, ⟨Σ⟩", unit: "k_B", value: "0.30000000000000004" });
    expect(Number(rows[1].value)).toBe(0.1 + 0.2);
    expect(Number(rows[3].value)).toBe(-1.5e-21);
    expect(rows[5].value).toBe("");
  });
});

describe("per-point numbers CSV, a column in each row's unit", () => {
  it("writes the row's own unit on every line of such a column, so no number is left without its unit", () => {
    const doc = result({
      checks: [
        check({
          check: "reciprocity",
          tables: [
            {
              id: "diagonal",
              title: "Diagonal entries",
              columns: [
                { key: "x", label: "At +B", unit: ROW_UNIT },
                { key: "unit", label: "Unit" },
                { key: "tost_p", label: "TOST p" },
              ],
              rows: [
                { x: 1.8214e-6, unit: "S", tost_p: 0.1998 },
                { x: 3.652e-13, unit: "W K", tost_p: 0.2855 },
              ],
            },
          ],
        }),
      ],
    });
    const text = pointsCsv(doc, citationSubject(doc, { number: 1, date: "2026-12-03" }, archive));
    const rows = parseCsv(text, { comment: "#", columns: true, record_delimiter: "\r\n" }) as Record<string, string>[];
    expect(rows.filter((r) => r.column === "x").map((r) => [r.unit, r.value])).toEqual([
      ["S", "0.0000018214"],
      ["W K", "3.652e-13"],
    ]);
    expect(rows.filter((r) => r.column === "tost_p").map((r) => r.unit)).toEqual(["", ""]);
  });
});

describe("status badge", () => {
  it("states verdict and version in text for screen readers, and the DOI when given", () => {
    const svg = statusBadgeSvg("fail", 3, `doi ${DOI}`);
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg).toContain(`<title>transport audit: fail, version 3, doi ${DOI}</title>`);
    expect(svg).toContain(`aria-label="transport audit: fail, version 3, doi ${DOI}"`);
    expect(svg).toContain("✗ fail · v3");
    expect(statusBadgeSvg("draft", null)).toContain("<title>transport audit: draft, unpublished</title>");
  });
});
