import { escapeHtml } from "../escape.ts";
import { renderUserTex } from "../equations.ts";
import type { DisplayContext } from "./displayUnit.ts";
import { tokenizeNotation } from "./notation.ts";
import { rewriteNumbers } from "./rewriteNumbers.ts";

/** Typeset tokens by TeX: summaries repeat the same few symbols on every page. Bounded like the equation cache. */
const typeset = new Map<string, string>();
const LIMIT = 2000;

function inlineMath(tex: string): string {
  const known = typeset.get(tex);
  if (known !== undefined) return known;
  // Summaries carry dataset names and other user text: typeset with errors off and nothing trusted.
  const html = renderUserTex(tex, false);
  if (typeset.size >= LIMIT) typeset.clear();
  typeset.set(tex, html);
  return html;
}

/**
 * A sentence of plain notation as HTML for the report: its numbers rewritten
 * for print (units, ×10ⁿ, minus), its notation typeset inline with KaTeX,
 * everything else escaped. Safe to mark `| safe` in templates: the only
 * markup is KaTeX's, built from escaped text.
 */
export function notationHtml(text: string, ctx: DisplayContext = {}): string {
  return tokenizeNotation(rewriteNumbers(text, ctx))
    .map((t) => (t.kind === "text" ? escapeHtml(t.text) : inlineMath(t.tex)))
    .join("");
}

/** Notation typeset, numbers left exactly as written (for names and labels, which carry no measured numbers). */
export function labelHtml(text: string): string {
  return tokenizeNotation(text)
    .map((t) => (t.kind === "text" ? escapeHtml(t.text) : inlineMath(t.tex)))
    .join("");
}
