import type { DisplayContext, DisplayUnit } from "./displayUnit.ts";
import { displayUnitFor } from "./displayUnit.ts";
import { numberText } from "./numberText.ts";
import { valueWithUncertaintyText } from "./formatQuantity.ts";
import { groupDigits, MINUS, THIN } from "./typography.ts";
import { roundToUncertainty } from "./roundToUncertainty.ts";
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
  // Longer units first: the entries of Callen's matrix (S K, A K, W K) would otherwise be read as S, A or W and a K,
  // and J²/s, J/s or 1/J would not be read at all.
  "[yzafpnµum]?S K|[yzafpnµum]?A K|[yzafpnµum]?W K|[yzafpnµumk]?eV²/s|[yzafpnµum]?J²/s|[yzafpnµum]?J/s|1/[yzafpnµum]?J|1/[yzafpnµumk]?eV|[yzafpnµumk]?eV/s|[yzafpnµumk]?eV|[yzafpnµum]?W Ω K⁻²|[yzafpnµum]?W/K²|[yzafpnµum]?W/K|[pnµum]?V/K|[yzafpnµum]?W|[yzafpnµum]?J|[pnµum]?S|[pnµum]?V|[nµum]?K|[yzafpnµum]?s|[µum]?T|1/[pnµum]?s|k_B";
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
  /** SI value of one unit as written (1 meV = 1.6 × 10⁻²² J), when the unit was converted. */
  writtenSI?: number;
  /** A bound of an interval `[lo, hi]` that takes the unit of its value: printed bare, the unit follows the bracket. */
  bound?: "lower" | "upper";
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
  return { ...base, written: "", value, ...(u !== undefined ? { u } : {}), unit, writtenSI: written.si };
}

/** A sentence cut into text and the numbers in it, each number in its display unit, intervals in their value's unit. */
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
  return withIntervalUnits(out, ctx);
}

/*
 * Intervals in sentences: "T_A = 0.8809 [0.842, 0.924] K" (the unit after the
 * bracket), "0.824 K [0.7432, 0.9244]" and "J = 6.4e+10 ± 5e+7 1/s (95 %
 * interval [6.36e+10, 6.38e+10])" (the unit with the value). The bounds are
 * shown in the value's display unit and prefix, rounded no finer than the
 * value (GUM §7.2.6: an interval is not stated to more digits than its
 * estimate), and never finer than they were written. Bounds of a value
 * without a unit are left as written.
 */
const UNIT_AFTER_BRACKET = new RegExp(`^\\] ?(${UNIT})(?![\\p{L}\\p{N}_/²⁻])`, "u");
/** Text a value and its interval may be separated by: no other bracket, clause or sentence break. */
const SAME_CLAUSE = /^[^[\];]*$/;

/** Decimal place of the last digit written: `0.7432` → 4, `120` → 0, `6.356e+10` → −7. */
function decimalPlace(written: string): number {
  const [mantissa, exp] = written.split("e");
  const decimals = mantissa.includes(".") ? mantissa.length - mantissa.indexOf(".") - 1 : 0;
  return decimals - Number((exp ?? "0").replace(MINUS, "-"));
}

/** Decimal place of a number as its token shows it (digits as written, in its display unit). */
function shownDecimalPlace(t: NumberToken, factor: number): number {
  if (t.u !== undefined && t.u > 0 && Number.isFinite(t.u) && Number.isFinite(t.value)) {
    // A value with its uncertainty is shown rounded to the uncertainty's second digit (GUM §7.2.6).
    const r = roundToUncertainty(t.value, t.u);
    return (r.value.includes(".") ? r.value.length - r.value.indexOf(".") - 1 : 0) - r.exponent;
  }
  if (t.written === "") return t.digits - 1 - Math.floor(Math.log10(Math.abs(t.value) || 1));
  return decimalPlace(t.written) - Math.round(Math.log10(factor));
}

/** A bound converted by `factor` into the value's unit, with significant digits for the decimal place `place`. */
function asBound(b: NumberToken, factor: number, place: number, side: "lower" | "upper", unit: Pick<NumberToken, "unit" | "unitText">): NumberToken {
  const value = b.value * factor;
  const own = decimalPlace(b.written) - Math.round(Math.log10(factor));
  const last = Math.min(place, own);
  const digits = Math.max(1, Math.floor(Math.log10(Math.abs(value) || 1)) + 1 + last);
  // A bound left in its written unit keeps its written form for writers that print numbers as written (LaTeX).
  return { ...b, value, digits, written: unit.unit ? "" : b.written, bound: side, ...unit };
}

function withIntervalUnits(tokens: SentenceToken[], ctx: DisplayContext): SentenceToken[] {
  const out = [...tokens];
  for (let i = 2; i + 3 < out.length + 1; i++) {
    const open = out[i - 1];
    const lo = out[i];
    const comma = out[i + 1];
    const hi = out[i + 2];
    const close = out[i + 3];
    if (open?.kind !== "text" || !open.text.endsWith("[") || lo?.kind !== "number" || comma?.kind !== "text" || comma.text !== ", " || hi?.kind !== "number" || close?.kind !== "text" || !close.text.startsWith("]")) continue;
    if (lo.unit || lo.unitText || lo.u !== undefined || hi.unit || hi.unitText || hi.u !== undefined) continue;
    const after = UNIT_AFTER_BRACKET.exec(close.text);
    const previous = out[i - 2];
    if (after && open.text === " [" && previous?.kind === "number" && !previous.unit && !previous.unitText && previous.u === undefined) {
      // "v [lo, hi] U": all three in U, the display unit chosen for the value.
      const w = parseWrittenUnit(after[1]);
      if (!w || w.quantity === "entropy" || w.quantity === "dimensionless") continue;
      const unit = displayUnitFor(w.quantity, Math.abs(previous.value * w.si), ctx);
      const factor = w.si * unit.perSI;
      const place = decimalPlace(previous.written) - Math.round(Math.log10(factor));
      out[i - 2] = { ...previous, value: previous.value * factor, written: "", unit, writtenSI: w.si };
      out[i] = asBound(lo, factor, place, "lower", { unit });
      out[i + 2] = asBound(hi, factor, place, "upper", { unit });
      out[i + 3] = { kind: "text", text: `]${close.text.slice(after[0].length)}` };
      continue;
    }
    // "v U … [lo, hi]": the bounds take the unit of the nearest number before them (a confidence level such as 95 % aside).
    let j = i - 2;
    let between = open.text;
    while (j >= 0) {
      const t = out[j];
      if (t.kind === "text") between = t.text + between;
      else {
        const next = out[j + 1];
        const percent = next?.kind === "text" && /^ ?%/.test(next.text);
        if (!percent) break;
        between = `${t.written}${between}`;
      }
      j--;
    }
    const v = out[j];
    if (j < 0 || v.kind !== "number" || !SAME_CLAUSE.test(between.slice(0, -1))) continue;
    if (v.unit && v.unit.symbol !== "1" && v.writtenSI !== undefined) {
      const factor = v.writtenSI * v.unit.perSI;
      const place = shownDecimalPlace(v, 1);
      out[i] = asBound(lo, factor, place, "lower", { unit: v.unit });
      out[i + 2] = asBound(hi, factor, place, "upper", { unit: v.unit });
    } else if (v.unitText && !v.unit) {
      const place = decimalPlace(v.written);
      out[i] = asBound(lo, 1, place, "lower", { unitText: v.unitText });
      out[i + 2] = asBound(hi, 1, place, "upper", { unitText: v.unitText });
    }
  }
  return out;
}

/** A number token as text: converted numbers at the digits they were written with, others as written (minus and digit groups aside). */
export function numberTokenText(t: NumberToken): string {
  // A bound is printed bare; its unit follows the closing bracket (see rewriteNumbers).
  if (t.bound) return numberText(t.value, t.digits);
  const plus = t.plus ? "+" : "";
  if (t.u !== undefined) {
    const unit = t.unit?.symbol ?? t.unitText;
    const pair = valueWithUncertaintyText(t.value, t.u);
    // A pair with a power of ten is already bracketed: (a ± b) × 10ⁿ unit.
    return unit ? `${plus}${pair.startsWith("(") ? pair : `(${pair})`}${THIN}${unit}` : `${plus}${pair}`;
  }
  const keepAsWritten = t.unit === undefined && !t.written.includes("e");
  const number = keepAsWritten ? `${t.value < 0 ? MINUS : ""}${groupDigits(t.written)}` : numberText(t.value, t.digits);
  const unit = t.unit ? (t.unit.symbol === "1" ? "" : t.unit.symbol) : t.unitText;
  return `${plus}${number}${unit ? `${THIN}${unit}` : ""}`;
}

/** The unit an interval's upper bound carries, written after the closing bracket: `[743, 924] mK`. */
function boundUnitText(t: NumberToken): string {
  const unit = t.unit ? (t.unit.symbol === "1" ? "" : t.unit.symbol) : (t.unitText ?? "");
  return unit ? `${THIN}${unit}` : "";
}

/** A sentence with its numbers rewritten for print (see above). */
export function rewriteNumbers(text: string, ctx: DisplayContext = {}): string {
  const tokens = sentenceTokens(text, ctx);
  return tokens
    .map((t, i) => {
      if (t.kind === "number") return numberTokenText(t);
      const before = tokens[i - 1];
      if (before?.kind === "number" && before.bound === "upper" && t.text.startsWith("]")) return `]${boundUnitText(before)}${t.text.slice(1)}`;
      return t.text;
    })
    .join("");
}
