import { splitName } from "./personName.ts";
import type { CitationSubject } from "./citationSubject.ts";

const MONTHS = ["jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec"];

/** LaTeX text-mode commands for the characters LaTeX would take as markup or print as other glyphs (OT1 `<` `>` `|`). */
const LATEX_COMMAND: Record<string, string> = {
  "\\": "\\textbackslash{}",
  "{": "\\textbraceleft{}",
  "}": "\\textbraceright{}",
  "^": "\\textasciicircum{}",
  "~": "\\textasciitilde{}",
  "<": "\\textless{}",
  ">": "\\textgreater{}",
  "|": "\\textbar{}",
};

/**
 * Escape text for a braced BibTeX field: LaTeX's special characters get their
 * commands, so that nothing is taken as markup. Braces become
 * \textbraceleft{} and \textbraceright{} rather than \{ and \}: BibTeX counts
 * every brace, escaped or not, to find the end of a field (Patashnik,
 * BibTeXing, 1988, §4), so only commands keep the braces balanced.
 * Non-ASCII letters stay as UTF-8 (biber and bibtex with inputenc read them).
 */
export function bibtexText(text: string): string {
  return (
    text
      .replace(/[\\{}$&#%_^~<>|]/g, (c) => LATEX_COMMAND[c] ?? `\\${c}`)
      // TeX's font ligatures would print `--` as an en dash (so `--version` could not be copied),
      // `''` and ``` `` ``` as curly quotes, `!`` and `?`` as inverted marks: an empty group breaks them.
      .replace(/([-'`])(?=\1)|([!?])(?=`)/g, "$1$2{}")
  );
}

/**
 * One part of a name: escaped, with the characters that structure a BibTeX
 * name list hidden in braces, so that a comma or the word "and" inside a
 * name does not split it (Patashnik, BibTeXing, 1988, §4).
 */
function namePart(text: string): string {
  return bibtexText(text)
    .replace(/,/g, "{,}")
    .replace(/(^|\s)(and)(?=\s|$)/gi, "$1{$2}");
}

/** "van der Berg, Jan": the "von Last, First" form, which BibTeX parses without ambiguity. */
export function bibtexName(name: string): string {
  const n = splitName(name);
  const family = namePart([n.particle, n.family].filter(Boolean).join(" "));
  return n.given ? `${family}, ${namePart(n.given)}` : family;
}

/**
 * A DOI or URL goes into its field as written (biblatex reads doi and url
 * verbatim). Configuration validation refuses braces, backslashes, quotes and
 * white space in both; finding one here is our bug, not the user's.
 */
function verbatim(field: string, value: string): string {
  if (/[{}\\"\s]/.test(value)) throw new Error(`BibTeX ${field} ${JSON.stringify(value)} holds a character validation should have refused`);
  return `{${value}}`;
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
    ["month", MONTHS[Number(s.date.slice(5, 7)) - 1] ?? `{${bibtexText(s.date.slice(5, 7))}}`],
    ["version", `{${s.version}}`],
    ...(s.doi ? ([["doi", verbatim("doi", s.doi)]] as [string, string][]) : []),
    ...(s.url ? ([["url", verbatim("url", s.url)]] as [string, string][]) : []),
    [
      "note",
      `{Published ${bibtexText(s.date)}; overall verdict ${s.stamp}; fingerprint ${bibtexText(s.fingerprint)}; licence ${bibtexText(s.license)}; verify with ${bibtexText(`transport-audit verify audits/${s.auditId} --version ${s.version}`)}}`,
    ],
  ];
  const width = Math.max(...fields.map(([k]) => k.length));
  return `@misc{${bibtexKey(s)},\n${fields.map(([k, v]) => `  ${k.padEnd(width)} = ${v}`).join(",\n")}\n}\n`;
}
