import type { DisplayContext, DisplayUnit } from "./displayUnit.ts";
import { displayUnitFor } from "./displayUnit.ts";
import { numberText } from "./numberText.ts";
import { valueWithUncertaintyText } from "./formatQuantity.ts";
import { groupDigits, MINUS, THIN } from "./typography.ts";
import { parseWrittenUnit } from "./writtenUnits.ts";

/*
 * Numbers inside sentences the checks write ("⟨Σ⟩ = 0.3565 ± 0.0011 k_B",
 * "τ = 1e-6 s", "p = 5e-4"), read for a reader: e-notation as ×10ⁿ, a true
 * minus, and a number followed by a unit we understand converted to the
 * display unit of its quantity, keeping the significant digits it was written
 * with. Anything else is left exactly as written. A number glued to a letter
 * (`count-2ns`, `lc60`, `L12`) is part of a name and is never touched.
 */
const UNIT =
  "1/[yzafpnµumk]?eV|[yzafpnµumk]?eV/s|[yzafpnµumk]?eV|[yzafpnµum]?W Ω K⁻²|[yzafpnµum]?W/K²|[yzafpnµum]?W/K|[pnµum]?V/K|[yzafpnµum]?W|[yzafpnµum]?J|[pnµum]?S|[pnµum]?V|[nµum]?K|[yzafpnµum]?s|[µum]?T|1/s|k_B";
const NUM = "(?<![\\p{L}\\p{N}_.^/])(?<![\\p{L}\\p{N}][-−])(?<sign>[−+-]?)(?<digits>\\d+(?:\\.\\d+)?)(?:e(?<exp>[+−-]?\\d+))?";
const UNIT_AFTER = `(?:(?<space> ?)(?<unit>${UNIT})(?![\\p{L}\\p{N}_/²⁻]))?(?![\\p{L}\\p{N}_])`;
/**
 * `= a ± b unit` (a value and its uncertainty, rounded together) or a single
 * number, each with an optional unit. Only a pair that follows `= ` is read as
 * value and uncertainty: "within 1 ± 0.05" states a margin, which is not
 * rounded like an uncertainty.
 */
const PATTERN = new RegExp(
  `(?:(?<== )${NUM} ± ${NUM.replaceAll("<sign>", "<usign>").replaceAll("<digits>", "<udigits>").replaceAll("<exp>", "<uexp>")}|${NUM.replaceAll("<sign>", "<ssign>").replaceAll("<digits>", "<sdigits>").replaceAll("<exp>", "<sexp>")})${UNIT_AFTER}`,
  "gu",
);

/** A number read from a sentence, already in its display unit. */
export interface NumberToken {
  kind: "number";
  /** The value in `unit` (or as written, when there is no unit we understand). */
  value: number;
  /** Its uncertainty in the same unit, for `a ± b`. */
  u?: number;
  /** Significant digits it was written with. */
  digits: number;
  /** Written with an explicit plus sign (`B = +1 T`). */
  plus: boolean;
  /** The number as written (digits and any exponent, no sign); "" once converted to a display unit. */
  written: string;
  unit?: DisplayUnit;
  /** A unit written after it that we do not convert (`k_B`), kept as written. */
  unitText?: string;
}
export type SentenceToken = { kind: "text"; text: string } | NumberToken;

/** Significant digits as written: `0.003997` has 4, `1e-6` has 1, `120` is taken as 3. */
function writtenDigits(digits: string): number {
  const d = digits.replace(".", "").replace(/^0+/, "");
  return Math.max(1, d.length);
}

const numberOf = (sign: string | undefined, digits: string | undefined, exp: string | undefined) =>
  Number(`${sign === "-" || sign === MINUS ? "-" : ""}${digits}e${(exp ?? "0").replace(MINUS, "-")}`);

function tokenOf(g: Record<string, string | undefined>, ctx: DisplayContext): NumberToken {
  const pair = g.digits !== undefined;
  const sign = pair ? g.sign : g.ssign;
  const digits = (pair ? g.digits : g.sdigits) ?? "0";
  const exp = pair ? g.exp : g.sexp;
  let value = numberOf(sign, digits, exp);
  let u = pair ? numberOf(g.usign, g.udigits, g.uexp) : undefined;
  const written = g.unit ? parseWrittenUnit(g.unit) : undefined;
  const base = { kind: "number" as const, digits: writtenDigits(digits), plus: sign === "+", written: `${digits}${exp !== undefined ? `e${exp}` : ""}` };
  if (!written || written.quantity === "entropy" || written.quantity === "dimensionless" || !Number.isFinite(value)) {
    return { ...base, value, ...(u !== undefined ? { u } : {}), ...(g.unit ? { unitText: g.unit } : {}) };
  }
  const unit = displayUnitFor(written.quantity, Math.abs(value * written.si), ctx);
  const factor = written.si * unit.perSI;
  value *= factor;
  if (u !== undefined) u *= factor;
  return { ...base, written: "", value, ...(u !== undefined ? { u } : {}), unit };
}

/** A sentence cut into text and the numbers in it, each number in its display unit. */
export function sentenceTokens(text: string, ctx: DisplayContext = {}): SentenceToken[] {
  const out: SentenceToken[] = [];
  let last = 0;
  for (const m of text.matchAll(PATTERN)) {
    const at = m.index ?? 0;
    if (at > last) out.push({ kind: "text", text: text.slice(last, at) });
    out.push(tokenOf(m.groups ?? {}, ctx));
    last = at + m[0].length;
  }
  if (last < text.length) out.push({ kind: "text", text: text.slice(last) });
  return out;
}

/** A number token as text: converted numbers at the digits they were written with, others as written (minus and digit groups aside). */
export function numberTokenText(t: NumberToken): string {
  const plus = t.plus ? "+" : "";
  if (t.u !== undefined) {
    const unit = t.unit?.symbol ?? t.unitText;
    const pair = valueWithUncertaintyText(t.value, t.u);
    return unit ? `${plus}(${pair})${THIN}${unit}` : `${plus}${pair}`;
  }
  const keepAsWritten = t.unit === undefined && !t.written.includes("e");
  const number = keepAsWritten ? `${t.value < 0 ? MINUS : ""}${groupDigits(t.written)}` : numberText(t.value, t.digits);
  const unit = t.unit ? (t.unit.symbol === "1" ? "" : t.unit.symbol) : t.unitText;
  return `${plus}${number}${unit ? `${THIN}${unit}` : ""}`;
}

/** A sentence with its numbers rewritten for print (see above). */
export function rewriteNumbers(text: string, ctx: DisplayContext = {}): string {
  return sentenceTokens(text, ctx)
    .map((t) => (t.kind === "text" ? t.text : numberTokenText(t)))
    .join("");
}
