import { ROW_UNIT, type TableSpec } from "../../checks/types.ts";
import { displayUnitFor, type DisplayContext, type DisplayUnit } from "./displayUnit.ts";
import { numberIn, representativeMagnitude, valueWithUncertaintyText, DEFAULT_DIGITS } from "./formatQuantity.ts";
import { labelHtml, notationHtml } from "./notationHtml.ts";
import { numberText } from "./numberText.ts";
import { roundToUncertainty } from "./roundToUncertainty.ts";
import { parseWrittenUnit } from "./writtenUnits.ts";
import { escapeHtml } from "../escape.ts";

/** A table ready for the page: header label and unit as HTML, cells as HTML, numeric columns marked for right alignment. */
export interface TableDisplay {
  headers: { label: string; unit: string; numeric: boolean }[];
  rows: string[][];
}

type Column = TableSpec["columns"][number];

/** What a dimensionless numeric column states as its unit (SI Brochure 9th ed. §2.3.3: the unit one, written out). */
export const DIMENSIONLESS = "dimensionless";
/** What a numeric column states when each row names its own unit (a `unit` column). */
export const PER_ROW = "unit as in each row";

/** The column an uncertainty column belongs to: `u(X)` to the column labelled X, "Standard error" to the one before it. */
function partnerOf(columns: readonly Column[], i: number): number | undefined {
  const label = columns[i].label;
  const m = /^u\((.+)\)$/.exec(label);
  if (m) {
    const j = columns.findIndex((c) => c.label === m[1]);
    return j >= 0 ? j : undefined;
  }
  if (/^standard error$/i.test(label) && i > 0) return i - 1;
  return undefined;
}

/**
 * A column of test statistics (z, p-values, χ², degrees of freedom) holds pure
 * numbers in every row: a row's own unit (a `unit` column) never applies to it.
 */
function isStatisticColumn(c: Column): boolean {
  return /^(z|p|p_holm|p_value|tost_p|chi_square|dof|points)$/.test(c.key) || /^(z|p)$|^p \(Holm\)$|Holm|TOST|χ²|degrees of freedom|^points$/i.test(c.label);
}

function isNumberColumn(t: TableSpec, key: string): boolean {
  let any = false;
  for (const r of t.rows) {
    const v = r[key];
    if (typeof v === "number") any = true;
    else if (v !== null && v !== undefined) return false;
  }
  return any;
}

/**
 * A check's table in display units: each column with a unit we understand
 * takes one display unit (SI prefix from its largest value), a value column
 * with an uncertainty column is rounded to it as the GUM recommends, and a
 * row that names its own unit (a `unit` column) is converted row by row.
 */
export function tableDisplay(t: TableSpec, ctx: DisplayContext): TableDisplay {
  const cols = t.columns;
  const numeric = cols.map((c) => isNumberColumn(t, c.key));
  const perRowUnit = cols.some((c) => c.key === "unit");
  // Tables written since ROW_UNIT existed mark the columns in the row's unit; older result documents did not, and
  // for them every numeric column without a unit we understand, except statistics and counts, is taken to be.
  const marked = cols.some((c) => c.unit === ROW_UNIT);
  const units: (DisplayUnit | undefined)[] = cols.map((c, i) => {
    const w = c.unit && c.unit !== ROW_UNIT ? parseWrittenUnit(c.unit) : undefined;
    if (!w || !numeric[i]) return undefined;
    const values = t.rows.map((r) => (typeof r[c.key] === "number" ? (r[c.key] as number) * w.si : Number.NaN));
    return displayUnitFor(w.quantity, representativeMagnitude(values), ctx);
  });
  // Uncertainty columns share their partner's unit, so that both read in the same numbers.
  const partner = cols.map((_, i) => partnerOf(cols, i));
  partner.forEach((p, i) => {
    if (p !== undefined && units[p] && cols[i].unit === cols[p].unit) units[i] = units[p];
  });
  /** Whether a row's own unit (a `unit` column) applies to column i: not to a column with a unit of its own, nor to statistics. */
  const inRowUnit = (i: number) =>
    perRowUnit && numeric[i] && (marked ? cols[i].unit === ROW_UNIT : !units[i] && !isStatisticColumn(cols[i]));
  const siOf = (c: Column) => (c.unit && c.unit !== ROW_UNIT ? parseWrittenUnit(c.unit)?.si ?? 1 : 1);
  const headers = cols.map((c, i) => {
    const unitText = inRowUnit(i) || (c.unit === ROW_UNIT && perRowUnit) ? PER_ROW : units[i]?.symbol ?? c.unit ?? (numeric[i] ? DIMENSIONLESS : "");
    const unit = unitText === "1" ? DIMENSIONLESS : unitText === PER_ROW ? PER_ROW : unitText ? labelHtml(unitText) : "";
    return { label: labelHtml(c.label), unit, numeric: numeric[i] };
  });
  const rows = t.rows.map((r) => {
    const rowUnit = perRowUnit && typeof r.unit === "string" ? parseWrittenUnit(r.unit) : undefined;
    // The prefix follows the row's own quantities only: its p-values and z-scores are no guide to it.
    const rowDisplay = rowUnit
      ? displayUnitFor(rowUnit.quantity, representativeMagnitude(cols.map((c, i) => (typeof r[c.key] === "number" && inRowUnit(i) ? (r[c.key] as number) * rowUnit.si : Number.NaN))), ctx)
      : undefined;
    return cols.map((c, i) => {
      const v = r[c.key];
      if (c.key === "unit" && rowDisplay) return labelHtml(rowDisplay.symbol);
      if (v === null || v === undefined) return "—";
      if (typeof v === "boolean") return v ? "yes" : "no";
      if (typeof v === "string") return notationHtml(v, ctx);
      // In the row's own unit where it applies (its quantities, not its statistics), else in the column's.
      const rowScaled = rowUnit && rowDisplay && inRowUnit(i) ? { display: rowDisplay, si: rowUnit.si } : undefined;
      const unit = rowScaled?.display ?? units[i];
      const si = rowScaled?.si ?? siOf(c);
      // A value with an uncertainty beside it: both rounded together (GUM §7.2.6), each in its own cell.
      const uCol = partner.indexOf(i);
      const u = uCol >= 0 ? r[cols[uCol].key] : undefined;
      const p = partner[i];
      const own = p !== undefined ? r[cols[p].key] : undefined;
      const scale = unit ? si * unit.perSI : 1;
      if (typeof u === "number" && u > 0 && Number.isFinite(u) && Number.isFinite(v)) return escapeHtml(roundedPart(v * scale, u * scale, "value"));
      if (typeof own === "number" && v > 0 && Number.isFinite(v) && Number.isFinite(own)) return escapeHtml(roundedPart(own * scale, v * scale, "uncertainty"));
      return escapeHtml(unit ? numberIn(unit, v * si) : numberText(v, DEFAULT_DIGITS));
    });
  });
  return { headers, rows };
}

/** One side of a GUM-rounded pair, written as the pair would write it (sharing its power of ten). */
function roundedPart(value: number, u: number, side: "value" | "uncertainty"): string {
  const r = roundToUncertainty(value, u);
  if (r.exponent !== 0) {
    const text = valueWithUncertaintyText(value, u);
    // (a ± b) × 10ⁿ: keep the side asked for with the shared power.
    const m = /^\((.*) ± (.*)\)(.*)$/u.exec(text.replaceAll("\u202f", " "));
    if (m) return `${side === "value" ? m[1] : m[2]}${m[3]}`.replaceAll(" ", "\u202f");
  }
  const pair = valueWithUncertaintyText(value, u).split(/\u202f±\u202f/);
  return side === "value" ? pair[0] : pair[1];
}
