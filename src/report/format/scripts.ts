/**
 * Unicode superscript and subscript forms, for text that cannot carry markup
 * (the terminal, SVG tick labels, plain captions). Only characters that have
 * such a form in Unicode are listed; `toSuperscript` returns undefined when
 * any character lacks one, so that a caller keeps the written notation
 * instead of raising half of an exponent.
 */
const SUPER: Record<string, string> = {
  "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹",
  "−": "⁻", "-": "⁻", "+": "⁺", "(": "⁽", ")": "⁾", n: "ⁿ", i: "ⁱ", T: "ᵀ",
};
const SUB: Record<string, string> = {
  "0": "₀", "1": "₁", "2": "₂", "3": "₃", "4": "₄", "5": "₅", "6": "₆", "7": "₇", "8": "₈", "9": "₉",
  "−": "₋", "-": "₋", "+": "₊", a: "ₐ", e: "ₑ", h: "ₕ", i: "ᵢ", j: "ⱼ", k: "ₖ", l: "ₗ", m: "ₘ", n: "ₙ", o: "ₒ",
  p: "ₚ", r: "ᵣ", s: "ₛ", t: "ₜ", u: "ᵤ", v: "ᵥ", x: "ₓ",
};

function mapAll(text: string, table: Record<string, string>): string | undefined {
  let out = "";
  for (const c of text) {
    const m = table[c];
    if (m === undefined) return undefined;
    out += m;
  }
  return out;
}

/** `"−12"` → `"⁻¹²"`; undefined when a character has no superscript form. */
export function toSuperscript(text: string): string | undefined {
  return mapAll(text, SUPER);
}

/** `"max"` → `"ₘₐₓ"`; undefined when a character has no subscript form (`"B"`). */
export function toSubscript(text: string): string | undefined {
  return mapAll(text, SUB);
}
