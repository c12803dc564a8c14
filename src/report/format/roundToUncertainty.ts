/**
 * A value and its standard uncertainty rounded for print as the GUM
 * recommends (JCGM 100:2008, §7.2.6 with the examples of §7.2.2): the
 * uncertainty to two significant digits, the value to the same decimal place.
 * Rounding is to nearest (GUM §7.2.6 allows rounding an uncertainty up
 * instead; we keep to nearest, the common practice in tables).
 */
export interface RoundedPair {
  /** Value and uncertainty as unsigned decimal strings sharing the last decimal place. */
  value: string;
  uncertainty: string;
  negative: boolean;
  /** Power of ten both are shown in (0 for plain decimals). */
  exponent: number;
}

function fixed(x: number, decimals: number): string {
  // toFixed accepts 0…100 decimals; beyond that the numbers are scaled first by the caller.
  return x.toFixed(Math.max(0, Math.min(100, decimals)));
}

/** Power of ten used when the value would otherwise need more than 5 integer digits or start with more than 3 zeros. */
function sharedExponent(value: number, u: number): number {
  const big = Math.max(Math.abs(value), u);
  const e = Number(big.toExponential(1).split("e")[1]);
  return e >= 5 || e < -3 ? e : 0;
}

/**
 * `value ± u` rounded: u to two significant digits, value to match. For
 * example 100.02147 with u = 0.00035 gives 100.02147 and 0.00035 (GUM §7.2.2).
 * A zero or non-finite uncertainty leaves nothing to round to: the caller
 * prints the value alone.
 */
export function roundToUncertainty(value: number, u: number): RoundedPair {
  if (!(u > 0) || !Number.isFinite(u) || !Number.isFinite(value)) throw new RangeError("roundToUncertainty needs a finite value and a positive, finite uncertainty");
  const exponent = sharedExponent(value, u);
  const scale = 10 ** exponent;
  const us = u / scale;
  const vs = Math.abs(value) / scale;
  // Decimal place of the second significant digit of u, after rounding (0.0995 → 0.10 moves it).
  let uExp = Number(us.toExponential(1).split("e")[1]);
  const decimals = Math.max(0, 1 - uExp);
  let uText = fixed(us, decimals);
  // When u ≥ 10 in the shown scale, two significant digits land left of the point: round the integer.
  if (uExp >= 1) {
    const step = 10 ** (uExp - 1);
    uText = String(Math.round(us / step) * step);
    uExp = Number(Number(uText).toExponential(1).split("e")[1]);
    return { value: String(Math.round(vs / step) * step), uncertainty: uText, negative: value < 0 && Math.round(vs / step) !== 0, exponent };
  }
  const vText = fixed(vs, decimals);
  return { value: vText, uncertainty: uText, negative: value < 0 && Number(vText) !== 0, exponent };
}
