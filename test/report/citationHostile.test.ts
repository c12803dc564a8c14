/**
 * Issue 22 item 7: every field of the BibTeX entry, CITATION.cff and the
 * plain-text citation survives hostile text. Each export is read back with a
 * parser that is not ours (bibtex-parse for BibTeX; the yaml package, in its
 * YAML 1.2 and its YAML 1.1 mode, for CFF) and every field compared with the
 * value in the result document.
 */
import { spawnSync } from "node:child_process";
import bibtexParse from "bibtex-parse";
import { describe, expect, it } from "vitest";
import { parse as parseYaml } from "yaml";
import type { ArchiveDefinition } from "../../src/config/archiveSchema.ts";
import { bibtexEntry, citationCff, citationSubject, plainCitation } from "../../src/report/citation/index.ts";
import type { ResultDocument } from "../../src/report/resultDocument.ts";

/** Text that every format has a reason to fear: braces (unbalanced too), quotes, backslashes, %, #, line breaks, unicode. */
const HOSTILE_TITLE = 'Close } then open { and {FORGED}, "quoted" \\textbf{x} 100% #1 $x$ a_b ^~ <|> &\nsecond line\tÜmlaut 中文 ⟨Σ⟩';
const FINGERPRINT = `sha256:${"5a".repeat(32)}`;

const archive: ArchiveDefinition = {
  name: "Archive #2 of 100% {hostile} \\ names",
  publisher: 'Lab "Q", Dept. of Physics & Chemistry\nLindqvist',
  base_url: "https://audits.example.org/a%7Bb%7D/",
  repository: "https://audits.example.org/lab/audits.git",
  license: "CC-BY-4.0",
};

function hostileResult(): ResultDocument {
  return {
    audit: "dot-lab-exchange",
    title: HOSTILE_TITLE,
    authors: [
      { name: "Tom and Jerry Smith" },
      { name: "Smith, John, Jr", affiliation: 'Institute {A}, "B" & C\n#2' },
      { name: "Ünal O'Brien-Łukasz", orcid: "0000-0002-1825-0097" },
      { name: "Ana 100% Beltrão\\x" },
    ],
    license: "CC-BY-4.0},note={forged",
    device: "yes",
    doi: "10.1002/(SICI)1097-4571(199806)49:8<693::AID-ASI4>3.0.CO;2-0%#x",
    tool: { name: "transport-audit", version: "0.1.0" },
    fingerprint: FINGERPRINT,
    stamp: "pass",
    settings: { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: "auto", resamples: 2000 },
    datasets: [],
    checks: [],
  };
}

const subject = () => citationSubject(hostileResult(), { number: 3, date: "2026-12-01" }, archive);
const oneLine = (text: string) => text.replace(/\s+/g, " ").trim();

/** Undo our LaTeX escapes (the inverse of what a LaTeX run would print), written out here rather than imported. */
function latexDecode(text: string): string {
  return text
    .replace(/\\textbackslash\{\}/g, "\u0000")
    .replace(/\\textbraceleft\{\}/g, "{")
    .replace(/\\textbraceright\{\}/g, "}")
    .replace(/\\textasciicircum\{\}/g, "^")
    .replace(/\\textasciitilde\{\}/g, "~")
    .replace(/\\textless\{\}/g, "<")
    .replace(/\\textgreater\{\}/g, ">")
    .replace(/\\textbar\{\}/g, "|")
    .replace(/\\([$&#%_])/g, "$1")
    .replace(/\{(,|and)\}/gi, "$1")
    .replace(/([-'`!?])\{\}/g, "$1")
    .replace(/\u0000/g, "\\");
}

/**
 * BibTeX counts every brace, escaped or not, to find where a field ends
 * (Patashnik, BibTeXing, 1988, §4): the depth must never drop below zero
 * inside a field and must come back to zero at its end.
 */
function bracesBalanced(value: string): boolean {
  let depth = 0;
  for (const c of value) {
    if (c === "{") depth++;
    if (c === "}" && --depth < 0) return false;
  }
  return depth === 0;
}

/** Split a BibTeX name list at " and " outside braces. */
function splitAuthors(value: string): string[] {
  const out: string[] = [];
  let depth = 0;
  let start = 0;
  for (let i = 0; i < value.length; i++) {
    if (value[i] === "{") depth++;
    if (value[i] === "}") depth--;
    if (depth === 0 && value.startsWith(" and ", i)) {
      out.push(value.slice(start, i));
      start = i + 5;
    }
  }
  out.push(value.slice(start));
  return out;
}

describe("BibTeX entry with hostile text", () => {
  it("parses back (bibtex-parse) to exactly one entry whose every field reads as written, with braces balanced by BibTeX's count", () => {
    const text = bibtexEntry(subject());
    const items = bibtexParse.parse(text).filter((i: { itemtype: string }) => i.itemtype === "entry");
    expect(items).toHaveLength(1);
    const entry = items[0] as { key: string; type: string; fields: { name: string; value: string; raw: string; datatype: string }[] };
    expect(entry.key).toBe("dot-lab-exchange-v3");
    expect(entry.type).toBe("misc");
    for (const f of entry.fields) expect(bracesBalanced(f.raw), `${f.name}: ${f.raw}`).toBe(true);
    const field = Object.fromEntries(entry.fields.map((f) => [f.name, f.value]));
    expect(Object.keys(field)).toEqual(["author", "title", "howpublished", "publisher", "year", "month", "version", "doi", "url", "note"]);
    expect(splitAuthors(field.author).map(latexDecode)).toEqual(["Smith, Tom and Jerry", "Smith, John, Jr", "O'Brien-Łukasz, Ünal", "Beltrão\\x, Ana 100%"]);
    // The title keeps its protecting inner braces; inside them it reads as written, on one line.
    expect(field.title.startsWith("{") && field.title.endsWith("}")).toBe(true);
    expect(latexDecode(field.title.slice(1, -1))).toBe(oneLine(HOSTILE_TITLE));
    expect(latexDecode(field.howpublished)).toBe(`Transport audit report dot-lab-exchange, version 3, ${archive.name}`);
    expect(latexDecode(field.publisher)).toBe(oneLine(archive.publisher));
    expect(field.year).toBe("2026");
    expect(field.month).toBe("dec");
    expect(field.version).toBe("3");
    expect(field.doi).toBe("10.1002/(SICI)1097-4571(199806)49:8<693::AID-ASI4>3.0.CO;2-0%#x");
    expect(field.url).toBe("https://audits.example.org/a%7Bb%7D/dot-lab-exchange/v3/");
    expect(latexDecode(field.note)).toBe(
      `Published 2026-12-01; overall verdict pass; fingerprint ${FINGERPRINT}; licence CC-BY-4.0},note={forged; verify with transport-audit verify audits/dot-lab-exchange --version 3`,
    );
  });
});

describe("CITATION.cff with hostile text", () => {
  const expected = {
    "cff-version": "1.2.0",
    message: `If you use this audit report, please cite version 3 as below. It was published by ${oneLine(archive.publisher)} in ${archive.name}.`,
    type: "dataset",
    title: `${oneLine(HOSTILE_TITLE)} (transport audit dot-lab-exchange, version 3)`,
    authors: [
      { "given-names": "Tom and Jerry", "family-names": "Smith" },
      { "given-names": "John, Jr", "family-names": "Smith", affiliation: 'Institute {A}, "B" & C #2' },
      { "given-names": "Ünal", "family-names": "O'Brien-Łukasz", orcid: "https://orcid.org/0000-0002-1825-0097" },
      { "given-names": "Ana 100%", "family-names": "Beltrão\\x" },
    ],
    version: "3",
    "date-released": "2026-12-01",
    doi: "10.1002/(SICI)1097-4571(199806)49:8<693::AID-ASI4>3.0.CO;2-0%#x",
    url: "https://audits.example.org/a%7Bb%7D/dot-lab-exchange/v3/",
    repository: "https://audits.example.org/lab/audits.git",
    license: "CC-BY-4.0},note={forged",
    identifiers: [
      { type: "doi", value: "10.1002/(SICI)1097-4571(199806)49:8<693::AID-ASI4>3.0.CO;2-0%#x", description: "DOI of version 3" },
      { type: "url", value: "https://audits.example.org/a%7Bb%7D/dot-lab-exchange/v3/", description: "Report page of version 3" },
      {
        type: "other",
        value: FINGERPRINT,
        description: "Fingerprint of the audit definition, input digests and tool version; check it with: transport-audit verify audits/dot-lab-exchange --version 3",
      },
    ],
    keywords: ["transport audit", "Onsager reciprocity", "fluctuation relations", "yes"],
  };

  it("parses back (yaml, YAML 1.2) to exactly the values written, every field compared", () => {
    expect(parseYaml(citationCff(subject()))).toEqual(expected);
  });

  it("parses back the same under YAML 1.1 rules, where a plain yes or on would be a boolean", () => {
    expect(parseYaml(citationCff(subject()), { version: "1.1" })).toEqual(expected);
  });

  // PyYAML (the YAML 1.1 reader of Python's citation tools), where the machine has it; .ci/run: python3-yaml.
  const pyyaml = spawnSync("python3", ["-c", "import yaml"]).status === 0;
  it.skipIf(!pyyaml)("parses back the same with PyYAML, a parser written apart from ours", () => {
    const r = spawnSync("python3", ["-c", "import sys, json, yaml; print(json.dumps(yaml.safe_load(sys.stdin.read())))"], {
      input: citationCff(subject()),
      encoding: "utf8",
    });
    expect(r.status, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout)).toEqual(expected);
  });
});

describe("plain-text citation with hostile text", () => {
  it("is one line whose every part reads as written, the DOI link percent-encoded as the DOI Handbook asks", () => {
    const text = plainCitation(subject());
    expect(text.endsWith("\n")).toBe(true);
    expect(text.slice(0, -1)).not.toMatch(/[\n\r\t]/);
    const parts =
      /^(?<authors>.*) \((?<year>\d{4})\)\. (?<title>.*) Transport audit (?<id>\S+), version (?<version>\d+), published (?<date>\S+)\. (?<publisher>.*)\. (?<link>\S+)\. Fingerprint (?<fingerprint>\S+)\.\n$/s.exec(
        text,
      )?.groups;
    expect(parts).toEqual({
      // Given names shortened to initials by the convention of personName.ts, whatever they hold.
      authors: "Smith, T. a. J., Smith, J. J., O'Brien-Łukasz, Ü. and Beltrão\\x, A. 1.",
      year: "2026",
      title: `${oneLine(HOSTILE_TITLE)}.`,
      id: "dot-lab-exchange",
      version: "3",
      date: "2026-12-01",
      publisher: oneLine(archive.publisher),
      // encodeURI-style escapes of < > % and # (RFC 3986 §2.1); parentheses, colon and semicolon may stay.
      link: "https://doi.org/10.1002/(SICI)1097-4571(199806)49:8%3C693::AID-ASI4%3E3.0.CO;2-0%25%23x",
      fingerprint: FINGERPRINT,
    });
  });
});
