import type { ResultDocument } from "../resultDocument.ts";
import type { CitationSubject } from "./citationSubject.ts";

/**
 * Characters our summaries use that pdfLaTeX does not take as text: math
 * symbols with their math-mode spelling, the rest with a text spelling.
 * Anything not listed passes through as UTF-8 (fine for LuaLaTeX and XeLaTeX).
 */
const UNICODE_MATH: Record<string, string> = {
  "±": "\\pm", "×": "\\times", "·": "\\cdot", "−": "-", "≤": "\\le", "≥": "\\ge", "≈": "\\approx", "≠": "\\neq",
  "→": "\\to", "∞": "\\infty", "⟨": "\\langle", "⟩": "\\rangle", "°": "^\\circ", "²": "^2", "³": "^3", "√": "\\surd",
  α: "\\alpha", β: "\\beta", γ: "\\gamma", Δ: "\\Delta", δ: "\\delta", ε: "\\varepsilon", η: "\\eta", θ: "\\theta",
  κ: "\\kappa", λ: "\\lambda", μ: "\\mu", Π: "\\Pi", π: "\\pi", ρ: "\\rho", Σ: "\\Sigma", σ: "\\sigma", τ: "\\tau",
  Φ: "\\Phi", φ: "\\phi", χ: "\\chi", ω: "\\omega", "ᵀ": "^\\mathsf{T}", "⁻": "^-", "¹": "^1",
  "₀": "_0", "₁": "_1", "₂": "_2", "₃": "_3", "₄": "_4", "₅": "_5", "₆": "_6", "₇": "_7", "₈": "_8", "₉": "_9",
};
// `<` and `>` print as ¡ and ¿ in the default OT1 font encoding, so they get their text commands.
const UNICODE_TEXT: Record<string, string> = { "…": "\\ldots{}", "–": "--", "—": "---", "✓": "", "✗": "", "<": "\\textless{}", ">": "\\textgreater{}" };
const SPECIAL_TEXT: Record<string, string> = {
  "\\": "\\textbackslash{}", "{": "\\{", "}": "\\}", $: "\\$", "&": "\\&", "#": "\\#", "%": "\\%", _: "\\_",
  "^": "\\textasciicircum{}", "~": "\\textasciitilde{}",
};

/**
 * Text → LaTeX: special characters escaped, `k_B` as a subscript, common
 * symbols as math. Neighbouring math symbols share one `$…$`, because two
 * inline formulas written back to back (`$a$$b$`) would open display math.
 */
export function latexText(text: string): string {
  const tokens: { math: boolean; tex: string }[] = [];
  const push = (math: boolean, tex: string) => {
    const last = tokens[tokens.length - 1];
    if (last && last.math && math) last.tex += ` ${tex}`;
    else tokens.push({ math, tex });
  };
  for (const part of text.split(/(k_B)/)) {
    if (part === "k_B") {
      push(true, "k_\\mathrm{B}");
      continue;
    }
    for (const c of part) {
      if (c in UNICODE_MATH) push(true, UNICODE_MATH[c]);
      else push(false, SPECIAL_TEXT[c] ?? UNICODE_TEXT[c] ?? c);
    }
  }
  return tokens.map((t) => (t.math ? `$${t.tex}$` : t.tex)).join("");
}

/** A long hex digest in \texttt with break points every 16 characters, so it can wrap in a caption. */
function breakableDigest(digest: string): string {
  return `\\texttt{${digest.replace(/(.{16})(?=.)/g, "$1\\allowbreak ")}}`;
}

/**
 * A LaTeX table of every check and its verdict, for a supplement: a `table`
 * float with booktabs rules (needs \usepackage{booktabs}), captioned with the
 * audit, the version, its date, DOI if any, and the fingerprint.
 */
export function checksTableTex(result: ResultDocument, s: CitationSubject): string {
  const rows = result.checks.map(
    (c) => `\\texttt{${latexText(c.check)}} & ${latexText(c.dataset)} & ${latexText(c.status)} & ${latexText(c.summary)} \\\\`,
  );
  const caption =
    `Checks of transport audit \\texttt{${latexText(s.auditId)}}, version ${s.version} (${s.date}), ` +
    `overall verdict ${latexText(s.stamp)}.${s.doi ? ` DOI ${latexText(s.doi)}.` : ""} ` +
    `Fingerprint ${breakableDigest(s.fingerprint)}.`;
  return [
    `% Checks and verdicts of ${s.auditId}, version ${s.version}, written by ${s.tool.name} ${s.tool.version}.`,
    "% Needs \\usepackage{booktabs}. Text is UTF-8: with pdfLaTeX also load \\usepackage[utf8]{inputenc}.",
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
