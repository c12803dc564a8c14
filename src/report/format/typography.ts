/**
 * Typographic characters of printed numbers (SI Brochure, 9th ed., 2019, §5.4):
 * a true minus sign, a space between number and unit, digits grouped by
 * threes with a thin space. Narrow no-break spaces are used so that a line
 * never breaks inside a number or between a number and its unit.
 */
export const MINUS = "\u2212";
/** NARROW NO-BREAK SPACE: the thin space of print that also keeps a line together. */
export const THIN = "\u202f";
export const TIMES = "×";

/**
 * Digits grouped by threes on both sides of the decimal marker (SI Brochure
 * §5.4.4). As the Brochure notes, a lone fourth digit is not split off:
 * `1234` and `0.1234` stay as they are, `12345` becomes `12 345`.
 */
export function groupDigits(unsigned: string): string {
  const [int, frac] = unsigned.split(".");
  const intOut = int.length > 4 ? int.replace(/\B(?=(\d{3})+$)/g, THIN) : int;
  if (frac === undefined) return intOut;
  const fracOut = frac.length > 4 ? frac.replace(/(\d{3})(?=\d)/g, `$1${THIN}`) : frac;
  return `${intOut}.${fracOut}`;
}

/** A leading ASCII hyphen-minus as the minus sign. */
export function withMinus(text: string): string {
  return text.startsWith("-") ? MINUS + text.slice(1) : text;
}
