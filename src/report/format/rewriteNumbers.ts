import type { DisplayContext } from "./displayUnit.ts";
import { displayUnitFor } from "./displayUnit.ts";
import { numberText } from "./numberText.ts";
import { valueWithUncertaintyText } from "./formatQuantity.ts";
import { groupDigits, MINUS, THIN } from "./typography.ts";
import { parseWrittenUnit } from "./writtenUnits.ts";

/*
 * Numbers inside sentences the checks write ("⟨Σ⟩ = 0.3565 ± 0.0011 k_B",
 * "τ = 1e-6 s", "p = 5e-4"), rewritten for a reader: e-notation as ×10ⁿ, a
 * true minus, and a number followed by a unit we understand converted to the
 * display unit of its quantity, keeping the significant digits it was written
 * with. Anything else is left exactly as written. A number glued to a letter
 * (`count-2ns`, `lc60`, `L12`) is part of a name and is never touched.
 */
const UNIT =
  "1/[yzafpnµumk]?eV|[yzafpnµumk]?eV/s|[yzafpnµumk]?eV|[yzafpnµum]?W Ω K⁻²|[yzafpnµum]?W/K²|[yzafpnµum]?W/K|[pnµum]?V/K|[yzafpnµum]?W|[yzafpnµum]?J|[pnµum]?S|[pnµum]?V|[nµum]?K|[yzafpnµum]?s|[µum]?T|1/s|k_B";
const NUM = "(?<![\\p{L}\\p{N}_.^/])(?<![\\p{L}\\p{N}][-−])(?<sign>[−+-]?)(?<digits>\\d+(?:\\.\\d+)?)(?:e(?<exp>[+−-]?\\d+))?";
const UNIT_AFTER = `(?:(?<space> ?)(?<unit>${UNIT})(?![\\p{L}\\p{N}_/²⁻]))?(?![\\p{L}\\p{N}_])`;
const NUMBER = new RegExp(`${NUM}${UNIT_AFTER}`, "gu");
/** `a ± b unit`: a value and its uncertainty, rounded together as the GUM recommends. */
const PAIR = new RegExp(`${NUM} ± ${NUM.replaceAll("<sign>", "<usign>").replaceAll("<digits>", "<udigits>").replaceAll("<exp>", "<uexp>")}${UNIT_AFTER}`, "gu");

/** Significant digits as written: `0.003997` has 4, `1e-6` has 1, `120` is taken as 3. */
function writtenDigits(digits: string): number {
  const d = digits.replace(".", "").replace(/^0+/, "");
  return Math.max(1, d.length);
}

function rewriteOne(sign: string, digits: string, exp: string | undefined, unit: string | undefined, ctx: DisplayContext): string {
  const negative = sign === "-" || sign === MINUS;
  const plus = sign === "+" ? "+" : "";
  const value = Number(`${negative ? "-" : ""}${digits}e${(exp ?? "0").replace(MINUS, "-")}`);
  const written = unit ? parseWrittenUnit(unit) : undefined;
  if (written && written.quantity !== "entropy" && written.quantity !== "dimensionless" && Number.isFinite(value)) {
    const display = displayUnitFor(written.quantity, Math.abs(value * written.si), ctx);
    const shown = numberText(value * written.si * display.perSI, writtenDigits(digits));
    return `${plus}${shown}${THIN}${display.symbol}`;
  }
  const text = exp !== undefined ? numberText(value, writtenDigits(digits)) : `${negative ? MINUS : ""}${groupDigits(digits)}`;
  return `${plus}${text}${unit ? `${THIN}${unit}` : ""}`;
}

function rewritePair(g: Record<string, string | undefined>, ctx: DisplayContext): string {
  const num = (sign: string | undefined, digits: string | undefined, exp: string | undefined) =>
    Number(`${sign === "-" || sign === MINUS ? "-" : ""}${digits}e${(exp ?? "0").replace(MINUS, "-")}`);
  const v = num(g.sign, g.digits, g.exp);
  const u = num(g.usign, g.udigits, g.uexp);
  const written = g.unit ? parseWrittenUnit(g.unit) : undefined;
  if (!written) return withUnit(valueWithUncertaintyText(v, u), g.unit);
  const display = displayUnitFor(written.quantity, Math.abs(v * written.si), ctx);
  const factor = written.si * display.perSI;
  return withUnit(valueWithUncertaintyText(v * factor, u * factor), display.symbol);
}

function withUnit(pair: string, unit: string | undefined): string {
  return unit ? `(${pair})${THIN}${unit}` : pair;
}

/** A sentence with its numbers rewritten for print (see above). */
export function rewriteNumbers(text: string, ctx: DisplayContext = {}): string {
  const paired = text.replace(PAIR, (...args) => rewritePair(args[args.length - 1] as Record<string, string | undefined>, ctx));
  return paired.replace(NUMBER, (...args) => {
    const g = args[args.length - 1] as Record<string, string | undefined>;
    return rewriteOne(g.sign ?? "", g.digits ?? "", g.exp, g.unit, ctx);
  });
}
