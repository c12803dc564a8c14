import { displayContextFor } from "../format/displayContext.ts";
import type { ResultDocument } from "../resultDocument.ts";
import type { CitationSubject } from "./citationSubject.ts";
import { latexName, latexText } from "./latexText.ts";

export { latexName, latexText };

/** A long hex digest in \texttt with break points every 16 characters, so it can wrap in a caption. */
export function breakableDigest(digest: string): string {
  return `\\texttt{${digest.replace(/(.{16})(?=.)/g, "$1\\allowbreak ")}}`;
}

/** The packages both supplement files need, for their header comments and for the compile tests. */
export const LATEX_PACKAGES = ["booktabs", "siunitx"] as const;

/**
 * A LaTeX table of every check and its verdict, for a supplement: a `table`
 * float with booktabs rules, numbers through siunitx in the report's display
 * units, notation in math mode; pure ASCII, so it compiles under pdfLaTeX and
 * LuaLaTeX alike. Captioned with the audit, the version, its date, DOI if
 * any, and the fingerprint.
 */
export function checksTableTex(result: ResultDocument, s: CitationSubject): string {
  const rows = result.checks.map((c) => {
    const ctx = displayContextFor(result, c.dataset);
    return `\\texttt{${latexName(c.check)}} & ${latexName(c.dataset)} & ${latexName(c.status)} & ${latexText(c.summary, ctx)} \\\\`;
  });
  const caption =
    `Checks of transport audit \\texttt{${latexName(s.auditId)}}, version ${s.version} (${s.date}), ` +
    `overall verdict ${latexName(s.stamp)}.${s.doi ? ` DOI ${latexName(s.doi)}.` : ""} ` +
    `Fingerprint ${breakableDigest(s.fingerprint)}.`;
  return [
    `% Checks and verdicts of ${s.auditId}, version ${s.version}, written by ${s.tool.name} ${s.tool.version}.`,
    `% Needs \\usepackage{${LATEX_PACKAGES.join(",")}}. Plain ASCII: compiles with pdfLaTeX, LuaLaTeX and XeLaTeX.`,
    "\\begin{table}[htbp]",
    "\\centering",
    `\\caption{${caption}}`,
    `\\label{tab:${s.auditId}-v${s.version}}`,
    "\\small",
    "\\begin{tabular}{@{}lllp{0.5\\linewidth}@{}}",
    "\\toprule",
    "Check & Dataset & Verdict & Summary \\\\",
    "\\midrule",
    ...rows,
    "\\bottomrule",
    "\\end{tabular}",
    "\\end{table}",
    "",
  ].join("\n");
}
