import { displayUnitFor, type DisplayContext, type DisplayUnit } from "./displayUnit.ts";
import { numberText, partsText, powerOfTenText } from "./numberText.ts";
import type { Quantity } from "./quantities.ts";
import { roundToUncertainty } from "./roundToUncertainty.ts";
import { groupDigits, MINUS, THIN } from "./typography.ts";

/** Significant digits of a value printed without an uncertainty (common practice: four, enough for a referee to compare). */
export const DEFAULT_DIGITS = 4;

/**
 * `value ± u` as text, rounded as the GUM recommends (two significant digits
 * of u, the value to match): `0.3565 ± 0.0011`, `(3.56 ± 0.11) × 10⁻⁶`.
 * Without a usable u the value alone, at `DEFAULT_DIGITS`.
 */
export function valueWithUncertaintyText(value: number, u?: number): string {
  if (u === undefined || !(u > 0) || !Number.isFinite(u) || !Number.isFinite(value)) return numberText(value, DEFAULT_DIGITS);
  const r = roundToUncertainty(value, u);
  const pair = `${r.negative ? MINUS : ""}${groupDigits(r.value)}${THIN}±${THIN}${groupDigits(r.uncertainty)}`;
  return r.exponent === 0 ? pair : `(${pair})${THIN}${powerOfTenText(r.exponent).replace("×", `×${THIN}`)}`;
}

/** A value in a display unit, without the unit: SI value converted, then printed (with u rounded per GUM when given). */
export function numberIn(unit: DisplayUnit, valueSI: number, u?: number, digits = DEFAULT_DIGITS): string {
  const v = valueSI * unit.perSI;
  if (u !== undefined) return valueWithUncertaintyText(v, u * unit.perSI);
  return numberText(v, digits);
}

/** Number and unit joined as in print: a thin space between, brackets round a `±` pair, nothing for unit one. */
export function withUnit(number: string, unit: DisplayUnit): string {
  if (unit.symbol === "1") return number;
  const bracket = number.includes("±") && !number.startsWith("(");
  return `${bracket ? `(${number})` : number}${THIN}${unit.symbol}`;
}

/** One quantity as a person reads it: `120 mK`, `(0.3565 ± 0.0011) k_B`, `7.74 1/eV`. */
export function quantityText(valueSI: number, quantity: Quantity, ctx: DisplayContext = {}, u?: number, digits = DEFAULT_DIGITS): string {
  const unit = displayUnitFor(quantity, Math.abs(valueSI), ctx);
  return withUnit(numberIn(unit, valueSI, u, digits), unit);
}

/** The largest finite magnitude among values: what picks one prefix for a column, an axis or a matrix. */
export function representativeMagnitude(values: readonly number[]): number {
  let m = 0;
  for (const v of values) if (Number.isFinite(v) && Math.abs(v) > m) m = Math.abs(v);
  return m;
}

/**
 * An Onsager matrix (or any matrix of one quantity) in one unit with one SI
 * prefix for every entry, picked from the largest entry, so entries can be
 * compared by eye.
 */
export function matrixText(matrix: readonly (readonly number[])[], quantity: Quantity, ctx: DisplayContext = {}): { unit: DisplayUnit; rows: string[][] } {
  const unit = displayUnitFor(quantity, representativeMagnitude(matrix.flat()), ctx);
  return { unit, rows: matrix.map((r) => r.map((v) => numberIn(unit, v))) };
}

export { partsText };
