import { escapeHtml } from "../escape.ts";

/**
 * SVG text content for a label written in the plain notation of plot specs:
 * `k_B` or `a_{Q}` becomes k with a subscript B, as a physicist writes it.
 * Everything else is escaped as it stands.
 */
export function richTextSvg(text: string): string {
  const parts: string[] = [];
  const pattern = /([\p{L}\p{N})⟩])_(\{([^}]*)\}|[\p{L}\p{N}]+)/gu;
  let last = 0;
  for (const m of text.matchAll(pattern)) {
    const at = m.index ?? 0;
    parts.push(escapeHtml(text.slice(last, at + m[1].length)));
    parts.push(`<tspan baseline-shift="sub" font-size="75%">${escapeHtml(m[3] ?? m[2])}</tspan>`);
    last = at + m[0].length;
  }
  parts.push(escapeHtml(text.slice(last)));
  return parts.join("");
}
