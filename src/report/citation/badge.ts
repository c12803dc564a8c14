import { escapeHtml } from "../escape.ts";

export type BadgeState = "pass" | "fail" | "inconclusive" | "draft";

/**
 * Ink colours on paper, each at a contrast ratio of at least 4.5:1 against
 * white (WCAG 2.1, 1.4.3), so the stamp reads in grey-scale print too; the
 * symbol and the word carry the verdict, never the colour alone.
 */
const INK: Record<BadgeState, string> = { pass: "#1b6e34", fail: "#a8241c", inconclusive: "#7a5200", draft: "#545b66" };
const SYMBOL: Record<BadgeState, string> = { pass: "✓", fail: "✗", inconclusive: "?", draft: "✎" };

/** Rough advance widths (no font metrics at build time): 12 px serif capitals and 9 px small capitals. */
const width = (text: string, perChar: number) => Math.ceil([...text].length * perChar);

/**
 * The project's status badge: an inspection stamp. A round seal on the left
 * holds the verdict's symbol inside a double ring; beside it, on a paper tag
 * with a perforated edge, the words "transport audit" in spaced small
 * capitals over the verdict and version in a serif face. One ink colour per
 * verdict on a light ground, as a rubber stamp prints. A text title states
 * the same for screen readers; `detail` is appended to it (e.g. the DOI).
 */
export function statusBadgeSvg(state: BadgeState, version: number | null, detail?: string): string {
  const verdict = `${SYMBOL[state]} ${state === "draft" ? "draft" : state}${version !== null ? ` · v${version}` : ""}`;
  const label = `transport audit: ${state}${version !== null ? `, version ${version}` : ", unpublished"}${detail ? `, ${detail}` : ""}`;
  const ink = INK[state];
  const h = 36;
  const seal = 17; // seal radius
  const tagX = 2 * seal + 6;
  const tagW = Math.max(width("TRANSPORT AUDIT", 7.2), width(verdict, 7.4)) + 18;
  const w = tagX + tagW + 2;
  // Perforation: small dots down the tag's left edge, where it would tear from a sheet.
  const holes = Array.from({ length: 5 }, (_, i) => `<circle cx="${tagX + 4}" cy="${7 + i * 5.5}" r="1"/>`).join("");
  const esc = escapeHtml;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}" viewBox="0 0 ${w} ${h}" role="img" aria-label="${esc(label)}">`,
    `<title>${esc(label)}</title>`,
    `<g fill="#fffdf7" stroke="${ink}">`,
    `<path d="M${tagX},2.5H${w - 9}l7.5,7v17l-7.5,7H${tagX}z" stroke-width="1.5"/>`,
    `<circle cx="${seal + 1}" cy="${h / 2}" r="${seal - 0.5}" stroke-width="1.5"/>`,
    `<circle cx="${seal + 1}" cy="${h / 2}" r="${seal - 4}" stroke-width="0.8" stroke-dasharray="2 1.6"/>`,
    `</g>`,
    `<g fill="${ink}" stroke="none">${holes}</g>`,
    `<text x="${seal + 1}" y="${h / 2 + 6}" text-anchor="middle" fill="${ink}" font-family="DejaVu Serif,Georgia,serif" font-size="17" font-weight="700">${esc(SYMBOL[state])}</text>`,
    `<text x="${tagX + 11}" y="15" fill="${ink}" font-family="DejaVu Serif,Georgia,serif" font-size="8.5" letter-spacing="1.2">TRANSPORT AUDIT</text>`,
    `<text x="${tagX + 11}" y="29" fill="${ink}" font-family="DejaVu Serif,Georgia,serif" font-size="12.5" font-style="italic">${esc(verdict)}</text>`,
    `</svg>`,
    "",
  ].join("\n");
}
