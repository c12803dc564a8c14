/*
 * The plain notation of summaries and labels (`T_A`, `k_B`, `e^−Σ`, `⟨Σ⟩`,
 * `η_max/η_C`) read as mathematics, so that the report can typeset it, the
 * terminal can show it with Unicode sub- and superscripts, and LaTeX can put
 * it in math mode. Only known shapes are read as maths:
 *   - a single letter with a subscript (`T_A`, `r_dN`, `a_{Q}`); the letter must
 *     not follow another letter, so a column name such as `Vg_mV` stays text;
 *   - `e^…` with a signed letter or number as exponent;
 *   - an average in angle brackets without spaces (`⟨e^−Σ⟩`, `⟨Σ⟩`, `β̄⟨W⟩`).
 * Subscripts are labels, not variables, so they are set upright.
 */
import { toSubscript, toSuperscript } from "./scripts.ts";

export type NotationToken = { kind: "text"; text: string } | { kind: "math"; source: string; tex: string; plain: string };

const SYMBOL = "[\\p{L}]";
const SUBSCRIPT = `${SYMBOL}_(?:\\{[^{}\\s]+\\}|[A-Za-z0-9]+)`;
const EXPONENTIAL = "e\\^[−+-]?[\\p{L}\\p{N}]+";
const AVERAGE = "(?:β̄)?⟨[^⟩\\s]{1,12}⟩[²³]?";
const MATH = new RegExp(`(?<![\\p{L}\\p{N}_])(?:${AVERAGE}|${EXPONENTIAL}|${SUBSCRIPT})(?![\\p{L}\\p{N}_])`, "gu");

const TEX: Record<string, string> = {
  "−": "-", "Σ": "\\Sigma ", "σ": "\\sigma ", "η": "\\eta ", "μ": "\\mu ", "µ": "\\mu ", "β": "\\beta ", "τ": "\\tau ", "α": "\\alpha ",
  "Δ": "\\Delta ", "λ": "\\lambda ", "θ": "\\theta ", "χ": "\\chi ", "Π": "\\Pi ", "π": "\\pi ", "ω": "\\omega ", "γ": "\\gamma ",
  "κ": "\\kappa ", "ε": "\\varepsilon ", "⟨": "\\langle ", "⟩": "\\rangle ", "²": "^2", "³": "^3", "ᵀ": "^{\\mathsf T}", "·": "\\cdot ",
};

/** One symbol or short expression from plain notation to TeX (letters as they are, Greek and brackets as commands). */
function symbolsToTex(text: string): string {
  // Each command ends in a space, so that `\eta` before `_` or a letter stays one command; TeX ignores spaces in math.
  return [...text].map((c) => TEX[c] ?? (/[A-Za-z0-9]/.test(c) ? c : "")).join("").trimEnd();
}

function subscriptTex(source: string): { tex: string; plain: string } {
  const at = source.indexOf("_");
  const base = source.slice(0, at);
  const sub = source.slice(at + 1).replace(/^\{|\}$/g, "");
  const plainSub = toSubscript(sub);
  return { tex: `${symbolsToTex(base)}_{\\mathrm{${symbolsToTex(sub)}}}`, plain: plainSub ? `${base}${plainSub}` : source };
}

function exponentialTex(source: string): { tex: string; plain: string } {
  const power = source.slice(2);
  const sup = toSuperscript(power);
  return { tex: `\\mathrm{e}^{${symbolsToTex(power)}}`, plain: sup ? `e${sup}` : source };
}

function averageTex(source: string): { tex: string; plain: string } {
  const bar = source.startsWith("β̄");
  const inner = source.slice(bar ? 2 : 0);
  const open = inner.indexOf("⟨");
  const close = inner.lastIndexOf("⟩");
  const body = inner.slice(open + 1, close);
  const after = inner.slice(close + 1);
  const bodyTex = /^e\^/.test(body) ? exponentialTex(body).tex : body.includes("_") ? subscriptTex(body).tex : symbolsToTex(body);
  return { tex: `${bar ? "\\bar\\beta" : ""}\\langle ${bodyTex}\\rangle${symbolsToTex(after)}`, plain: source };
}

/** Text cut into plain runs and the notation in it, each notation token with its TeX and its plain Unicode form. */
export function tokenizeNotation(text: string): NotationToken[] {
  const out: NotationToken[] = [];
  let last = 0;
  for (const m of text.matchAll(MATH)) {
    const at = m.index ?? 0;
    if (at > last) out.push({ kind: "text", text: text.slice(last, at) });
    const source = m[0];
    const parts = source.includes("⟨") ? averageTex(source) : source.startsWith("e^") ? exponentialTex(source) : subscriptTex(source);
    out.push({ kind: "math", source, ...parts });
    last = at + source.length;
  }
  if (last < text.length) out.push({ kind: "text", text: text.slice(last) });
  return out;
}

/** The terminal's form: sub- and superscripts in Unicode where every character has one, the written form otherwise. */
export function plainNotation(text: string): string {
  return tokenizeNotation(text)
    .map((t) => (t.kind === "text" ? t.text : t.plain))
    .join("");
}
