import { ROW_UNIT } from "../../checks/types.ts";
import type { ResultDocument } from "../resultDocument.ts";
import type { CitationSubject } from "./citationSubject.ts";

/** One CSV field (RFC 4180, §2: quote fields holding a comma, a quote or a line break; double the quotes). */
export function csvField(v: string): string {
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

function cell(v: unknown): string {
  if (v === null || v === undefined) return "";
  if (typeof v === "number") return Number.isFinite(v) ? String(v) : ""; // shortest round-trip form
  if (typeof v === "boolean") return v ? "true" : "false";
  return String(v);
}

export const POINTS_CSV_HEADER = ["check", "dataset", "table", "row", "column", "label", "unit", "value"];

/**
 * Every number of every check table, one cell a line (long form, so tables
 * with different columns share one file): which check, dataset and table,
 * the row as a person counts, the column key, its label and unit (the row's
 * own for a column in each row's unit), the value
 * in shortest round-trip form. Leading `#` lines say what the file is.
 */
export function pointsCsv(result: ResultDocument, s: CitationSubject): string {
  const lines: string[] = [
    `# Per-point numbers of transport audit ${s.auditId}, version ${s.version} (${s.date}); fingerprint ${s.fingerprint}`,
    `# ${s.doi ? `DOI ${s.doi}; ` : ""}${s.url ? `${s.url}; ` : ""}licence ${s.license}; written by ${s.tool.name} ${s.tool.version}`,
    POINTS_CSV_HEADER.join(","),
  ];
  for (const c of result.checks) {
    for (const t of c.tables ?? []) {
      t.rows.forEach((r, i) => {
        for (const col of t.columns) {
          // A column in each row's own unit names that row's unit, so every line of the file carries its unit.
          const unit = col.unit === ROW_UNIT ? cell(r.unit) : col.unit ?? "";
          lines.push([c.check, c.dataset, t.id, String(i + 1), col.key, col.label, unit, cell(r[col.key])].map(csvField).join(","));
        }
      });
    }
  }
  return `${lines.join("\r\n")}\r\n`;
}
