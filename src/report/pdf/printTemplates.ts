import { escapeHtml } from "../escape.ts";

/*
 * Running header and footer of the printed report. Chromium fills the spans
 * with classes pageNumber and totalPages itself; these templates get no page
 * styles, so everything is inline, and the font size must be set explicitly.
 */
const BOX = "width:100%;margin:0 16mm;font-family:'DejaVu Sans',sans-serif;font-size:7.5pt;color:#333;display:flex;justify-content:space-between;gap:6mm";

/** Audit id and title on the left, the fingerprint on the right of every page. */
export function headerTemplate(auditId: string, fingerprint: string): string {
  return `<div style="${BOX}"><span>Transport audit ${escapeHtml(auditId)}</span><span style="font-family:'DejaVu Sans Mono',monospace;font-size:6.5pt">${escapeHtml(fingerprint)}</span></div>`;
}

/** The tool that printed it on the left, "page N of M" on the right. */
export function footerTemplate(tool: { name: string; version: string }): string {
  return `<div style="${BOX}"><span>${escapeHtml(tool.name)} ${escapeHtml(tool.version)}</span><span>page <span class="pageNumber"></span> of <span class="totalPages"></span></span></div>`;
}
