import { splitName } from "./personName.ts";
import type { CitationSubject } from "./citationSubject.ts";

const MONTHS = ["jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec"];

/**
 * Escape text for a braced BibTeX field: LaTeX's special characters get their
 * commands, so that braces stay balanced and nothing is taken as markup.
 * Non-ASCII letters stay as UTF-8 (biber and bibtex with inputenc read them).
 */
export function bibtexText(text: string): string {
  return text.replace(/[\\{}$&#%_^~]/g, (c) => {
    switch (c) {
      case "\\":
        return "\\textbackslash{}";
      case "^":
        return "\\textasciicircum{}";
      case "~":
        return "\\textasciitilde{}";
      default:
        return `\\${c}`;
    }
  });
}

/** "van der Berg, Jan": the "von Last, First" form, which BibTeX parses without ambiguity. */
export function bibtexName(name: string): string {
  const n = splitName(name);
  const family = [n.particle, n.family].filter(Boolean).join(" ");
  return bibtexText(n.given ? `${family}, ${n.given}` : family);
}

/** Citation key: the audit id and the version, e.g. `vq3-heat-exchange-v2`. */
export function bibtexKey(s: CitationSubject): string {
  return `${s.auditId}-v${s.version}`;
}

/**
 * A BibTeX `@misc` entry for one version (the type every BibTeX style knows;
 * Patashnik, BibTeXing, 1988). The title is double-braced so that styles keep
 * its capitals (device names, chemical formulae).
 */
export function bibtexEntry(s: CitationSubject): string {
  const fields: [string, string][] = [
    ["author", `{${s.authors.map((a) => bibtexName(a.name)).join(" and ")}}`],
    ["title", `{{${bibtexText(s.title)}}}`],
    ["howpublished", `{Transport audit report ${bibtexText(s.auditId)}, version ${s.version}, ${bibtexText(s.archiveName)}}`],
    ["publisher", `{${bibtexText(s.publisher)}}`],
    ["year", `{${s.date.slice(0, 4)}}`],
    ["month", MONTHS[Number(s.date.slice(5, 7)) - 1] ?? `{${s.date.slice(5, 7)}}`],
    ["version", `{${s.version}}`],
    ...(s.doi ? ([["doi", `{${s.doi}}`]] as [string, string][]) : []),
    ...(s.url ? ([["url", `{${s.url}}`]] as [string, string][]) : []),
    [
      "note",
      `{Published ${s.date}; overall verdict ${s.stamp}; fingerprint ${bibtexText(s.fingerprint)}; licence ${bibtexText(s.license)}; verify with ${bibtexText(`transport-audit verify audits/${s.auditId} --version ${s.version}`)}}`,
    ],
  ];
  const width = Math.max(...fields.map(([k]) => k.length));
  return `@misc{${bibtexKey(s)},\n${fields.map(([k, v]) => `  ${k.padEnd(width)} = ${v}`).join(",\n")}\n}\n`;
}
