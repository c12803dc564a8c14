import { toSuperscript } from "./scripts.ts";
import { groupDigits, MINUS, THIN, TIMES } from "./typography.ts";

/** A number in two parts: a decimal mantissa as written, and a power of ten (0 when none is shown). */
export interface NumberParts {
  negative: boolean;
  /** Unsigned decimal digits with an optional point: `"1.250"`. */
  digits: string;
  exponent: number;
}

/** Decimal notation is used for 10^−3 ≤ |x| < 10^5; outside it a power of ten (common practice in print). */
const PLAIN_LOW = -3;
const PLAIN_HIGH = 5;

/** The decimal exponent of |x| after rounding to `sig` significant digits (so 9.9996 at 4 digits counts as 10). */
function decimalExponent(x: number, sig: number): number {
  return Number(Math.abs(x).toExponential(sig - 1).split("e")[1]);
}

/**
 * `x` rounded to `sig` significant digits and split into mantissa and power
 * of ten: plain decimals in the middle range, `m × 10^n` outside it.
 * Trailing zeros are dropped unless `keepZeros` (a value rounded to match an
 * uncertainty keeps them: 1.20 says something 1.2 does not).
 */
export function numberParts(x: number, sig = 4, keepZeros = false): NumberParts {
  if (x === 0 || !Number.isFinite(x)) return { negative: x < 0, digits: Number.isFinite(x) ? "0" : String(Math.abs(x)), exponent: 0 };
  const e = decimalExponent(x, sig);
  const plain = e >= PLAIN_LOW && e < PLAIN_HIGH;
  const exponent = plain ? 0 : e;
  // Rounded to `sig` digits first, so that 32 625 at four digits prints as 32 630.
  const scaled = Math.abs(Number(x.toPrecision(sig))) / 10 ** exponent;
  const decimals = Math.max(0, sig - 1 - (e - exponent));
  let digits = scaled.toFixed(decimals);
  if (!keepZeros && digits.includes(".")) digits = digits.replace(/\.?0+$/, "");
  return { negative: x < 0, digits, exponent };
}

/** `×10ⁿ` written with Unicode superscripts: `×10⁻⁴`. */
export function powerOfTenText(exponent: number): string {
  const sup = toSuperscript(String(exponent).replace("-", MINUS)) ?? `^${exponent}`;
  return `${TIMES}10${sup}`;
}

/** Number parts as text: true minus, digits grouped by threes, `× 10ⁿ` (a mantissa of exactly 1 is left out: `10⁻⁴`). */
export function partsText(p: NumberParts): string {
  const sign = p.negative ? MINUS : "";
  if (p.exponent === 0) return sign + groupDigits(p.digits);
  if (p.digits === "1") return `${sign}${powerOfTenText(p.exponent).slice(1)}`;
  return `${sign}${groupDigits(p.digits)}${THIN}${powerOfTenText(p.exponent).replace(TIMES, `${TIMES}${THIN}`)}`;
}

/** A number as a person reads it, never in computer e-notation: `6.69 × 10⁻⁴`, `−0.2793`, `12 345`. */
export function numberText(x: number, sig = 4): string {
  if (Number.isNaN(x)) return "—";
  if (!Number.isFinite(x)) return x > 0 ? "∞" : `${MINUS}∞`;
  return partsText(numberParts(x, sig));
}
