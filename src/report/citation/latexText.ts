import type { DisplayContext } from "../format/displayUnit.ts";
import { tokenizeNotation } from "../format/notation.ts";
import { numberParts } from "../format/numberText.ts";
import { displayUnitFor } from "../format/displayUnit.ts";
import { roundToUncertainty } from "../format/roundToUncertainty.ts";
import { sentenceTokens, type NumberToken } from "../format/rewriteNumbers.ts";

/*
 * Text → LaTeX that compiles under pdfLaTeX and LuaLaTeX alike: every special
 * character escaped, the output pure ASCII (symbols as math or text commands),
 * notation in math mode, numbers through siunitx (`\num`, `\SI`), so that the
 * manuscript's own siunitx settings typeset them like its other numbers.
 */

/** Unicode symbols our sentences use, in their math-mode spelling. */
const UNICODE_MATH: Record<string, string> = {
  "±": "\\pm", "×": "\\times", "·": "\\cdot", "−": "-", "≤": "\\le", "≥": "\\ge", "≈": "\\approx", "≠": "\\neq",
  "→": "\\to", "∞": "\\infty", "⟨": "\\langle", "⟩": "\\rangle", "°": "^\\circ", "²": "^2", "³": "^3", "√": "\\surd",
  α: "\\alpha", β: "\\beta", γ: "\\gamma", Δ: "\\Delta", δ: "\\delta", ε: "\\varepsilon", η: "\\eta", θ: "\\theta",
  κ: "\\kappa", λ: "\\lambda", μ: "\\mu", "µ": "\\mu", Π: "\\Pi", π: "\\pi", ρ: "\\rho", Σ: "\\Sigma", σ: "\\sigma", τ: "\\tau",
  Φ: "\\Phi", φ: "\\phi", χ: "\\chi", ω: "\\omega", Ω: "\\Omega", "ᵀ": "^\\mathsf{T}", "⁻": "^-", "¹": "^1", "∝": "\\propto",
  "₀": "_0", "₁": "_1", "₂": "_2", "₃": "_3", "₄": "_4", "₅": "_5", "₆": "_6", "₇": "_7", "₈": "_8", "₉": "_9", "\u0304": "",
};
// `<` and `>` print as ¡ and ¿ in the OT1 font encoding, so they get their text commands.
const UNICODE_TEXT: Record<string, string> = {
  "…": "\\ldots{}", "–": "--", "—": "---", "✓": "", "✗": "", "<": "\\textless{}", ">": "\\textgreater{}",
  "\u202f": "\\,", "\u2009": "\\,", "\u00a0": "~", "‘": "`", "’": "'", "“": "``", "”": "''", "é": "\\'e", "ö": '\\"o', "ü": '\\"u', "ä": '\\"a',
};
const SPECIAL_TEXT: Record<string, string> = {
  "\\": "\\textbackslash{}", "{": "\\{", "}": "\\}", $: "\\$", "&": "\\&", "#": "\\#", "%": "\\%", _: "\\_",
  "^": "\\textasciicircum{}", "~": "\\textasciitilde{}",
};

type Piece = { math: boolean; tex: string };

/** Plain characters: escaped, symbols as math; a character with no ASCII spelling becomes `?` (never raw UTF-8, which pdfLaTeX may refuse). */
function characters(text: string, push: (p: Piece) => void): void {
  const chars = [...text];
  for (let i = 0; i < chars.length; i++) {
    const c = chars[i];
    // A letter with a combining macron is a different quantity (β̄, the mean inverse temperature, is not β): \bar it.
    if (chars[i + 1] === "\u0304" && (c in UNICODE_MATH || /^[A-Za-z]$/.test(c))) {
      push({ math: true, tex: `\\bar{${UNICODE_MATH[c] ?? c}}` });
      i++;
      continue;
    }
    if (c in UNICODE_MATH) push({ math: true, tex: UNICODE_MATH[c] });
    else if (c in SPECIAL_TEXT) push({ math: false, tex: SPECIAL_TEXT[c] });
    else if (c in UNICODE_TEXT) push({ math: false, tex: UNICODE_TEXT[c] });
    else push({ math: false, tex: c.charCodeAt(0) < 128 ? c : "?" });
  }
}

/** A number for siunitx's `\num`: its digits and, for very small or large values, `e` and the power. */
export function siunitxNumber(value: number, digits: number): string {
  const p = numberParts(value, digits);
  return `${p.negative ? "-" : ""}${p.digits}${p.exponent !== 0 ? `e${p.exponent}` : ""}`;
}

/** The unit after a number: `\si{…}` for SI units, math for k_B and e²/h, which siunitx does not define. */
function unitTex(t: NumberToken): string {
  const symbol = t.unit?.symbol ?? t.unitText;
  if (!symbol || symbol === "1") return "";
  if (symbol === "k_B") return "\\,$k_\\mathrm{B}$";
  if (symbol === "k_B K") return "\\,$k_\\mathrm{B}$\\,\\si{\\kelvin}";
  if (symbol === "e²/h") return "\\,$e^2/h$";
  if (symbol === "g₀") return "\\,$g_0$";
  if (symbol === "1/k_B") return "\\,$k_\\mathrm{B}^{-1}$";
  return t.unit?.siunitx ? `\\,\\si{${t.unit.siunitx}}` : "";
}

function numberTex(t: NumberToken): string {
  const sign = t.plus ? "+" : "";
  if (t.u !== undefined && t.u > 0 && Number.isFinite(t.u)) {
    const r = roundToUncertainty(t.value, t.u);
    const e = r.exponent !== 0 ? `e${r.exponent}` : "";
    const pair = `\\num{${r.negative ? "-" : ""}${r.value}${e}}~$\\pm$~\\num{${r.uncertainty}${e}}`;
    const unit = unitTex(t);
    return unit ? `${sign}(${pair})${unit}` : `${sign}${pair}`;
  }
  const asWritten = t.unit === undefined && !t.written.includes("e");
  const n = asWritten ? `${t.value < 0 ? "-" : ""}${t.written}` : siunitxNumber(t.value, t.digits);
  return `${sign}\\num{${n}}${unitTex(t)}`;
}

/** Names and identifiers (check ids, dataset names, DOIs) as LaTeX: escaped character by character, numbers and notation left as written. */
export function latexName(text: string): string {
  const pieces: Piece[] = [];
  characters(text, (p) => pieces.push(p));
  return pieces.map((p) => (p.math ? `$${p.tex}$` : p.tex)).join("");
}

/**
 * A sentence as LaTeX: numbers through siunitx in display units, notation
 * (`T_A`, `⟨e^−Σ⟩`) in math mode, symbols as math, everything else escaped.
 * Neighbouring math pieces share one `$…$`: `$a$$b$` would open display math.
 */
export function latexText(text: string, ctx: DisplayContext = {}): string {
  const pieces: Piece[] = [];
  const push = (p: Piece) => {
    const last = pieces[pieces.length - 1];
    if (last && last.math && p.math) last.tex += ` ${p.tex}`;
    else pieces.push({ ...p });
  };
  for (const s of sentenceTokens(text, ctx)) {
    if (s.kind === "number") {
      push({ math: false, tex: numberTex(s) });
      continue;
    }
    for (const t of tokenizeNotation(s.text)) {
      if (t.kind === "math") push({ math: true, tex: t.tex });
      else characters(t.text, push);
    }
  }
  return pieces.map((p) => (p.math ? `$${p.tex}$` : p.tex)).join("");
}

/** One quantity for LaTeX in its display unit: `\SI{299.7}{\milli\kelvin}` (4 significant digits unless told). */
export function quantityTex(valueSI: number, quantity: import("../format/quantities.ts").Quantity, ctx: DisplayContext = {}, digits = 4): string {
  const unit = displayUnitFor(quantity, Math.abs(valueSI), ctx);
  const n = siunitxNumber(valueSI * unit.perSI, digits);
  return unit.siunitx ? `\\SI{${n}}{${unit.siunitx}}` : `\\num{${n}}${unitTex({ kind: "number", value: 0, digits, plus: false, written: "", unit })}`;
}
