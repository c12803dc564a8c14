import { escapeHtml } from "../escape.ts";

/**
 * SVG text content for a label written in the plain notation of plot specs:
 * `k_B` or `a_{Q}` gets a subscript and `e^Σ` or `10^{−3}` a superscript, as a
 * physicist writes them. A name such as the column `Vg_mV` is shown as written.
 * Everything else is escaped as it stands.
 */
export function richTextSvg(text: string): string {
  const parts: string[] = [];
  // The base is a lone letter (`k_B`, not the `g` of a column named `Vg_mV`), a number, or a closing bracket.
  const pattern = /((?<![\p{L}\p{N}_])\p{L}|(?<![\p{L}_])\p{N}+|[)⟩\]])([_^])(\{([^}]*)\}|[−-]?[\p{L}\p{N}]+)/gu;
  let last = 0;
  for (const m of text.matchAll(pattern)) {
    const at = m.index ?? 0;
    parts.push(escapeHtml(text.slice(last, at + m[1].length)));
    const shift = m[2] === "_" ? "sub" : "super";
    parts.push(`<tspan baseline-shift="${shift}" font-size="75%">${escapeHtml(m[4] ?? m[3])}</tspan>`);
    last = at + m[0].length;
  }
  parts.push(escapeHtml(text.slice(last)));
  return parts.join("");
}
