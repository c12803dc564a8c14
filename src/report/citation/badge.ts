import { escapeHtml } from "../escape.ts";

export type BadgeState = "pass" | "fail" | "inconclusive" | "draft";

/** Fill colours with white text at a contrast ratio of at least 4.5:1 (WCAG 2.1, 1.4.3). */
const FILL: Record<BadgeState, string> = { pass: "#1b6e34", fail: "#a8241c", inconclusive: "#7a5200", draft: "#545b66" };
const SYMBOL: Record<BadgeState, string> = { pass: "✓", fail: "✗", inconclusive: "?", draft: "✎" };

/** Rough advance width of 11 px sans-serif text, enough to size the badge (no font metrics at build time). */
function textWidth(text: string): number {
  return Math.ceil([...text].length * 6.6);
}

/**
 * A small SVG status badge: "transport audit" on the left, the verdict and the
 * version on the right, with a text title for screen readers. `detail` is
 * appended to the title (e.g. the DOI).
 */
export function statusBadgeSvg(state: BadgeState, version: number | null, detail?: string): string {
  const left = "transport audit";
  const right = `${SYMBOL[state]} ${state === "draft" ? "draft" : state}${version !== null ? ` · v${version}` : ""}`;
  const lw = textWidth(left) + 12;
  const rw = textWidth(right) + 12;
  const label = `transport audit: ${state}${version !== null ? `, version ${version}` : ", unpublished"}${detail ? `, ${detail}` : ""}`;
  const esc = escapeHtml;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${lw + rw}" height="20" viewBox="0 0 ${lw + rw} 20" role="img" aria-label="${esc(label)}">`,
    `<title>${esc(label)}</title>`,
    `<rect width="${lw}" height="20" rx="3" fill="#2f3540"/>`,
    `<rect x="${lw}" width="${rw}" height="20" rx="3" fill="${FILL[state]}"/>`,
    `<rect x="${lw}" width="4" height="20" fill="${FILL[state]}"/>`,
    `<g fill="#ffffff" font-family="DejaVu Sans,Verdana,Geneva,sans-serif" font-size="11" text-anchor="middle">`,
    `<text x="${lw / 2}" y="14">${esc(left)}</text>`,
    `<text x="${lw + rw / 2}" y="14">${esc(right)}</text>`,
    `</g>`,
    `</svg>`,
    "",
  ].join("\n");
}
