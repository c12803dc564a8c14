/**
 * The SI prefixes (SI Brochure, 9th ed., 2019, Table 7), yocto to yotta in
 * steps of a thousand; centi, deci, deca and hecto are left out because they
 * are not used for the quantities of this report. `µ` is MICRO SIGN's
 * recommended spelling, U+00B5.
 */
export const SI_PREFIXES: readonly { symbol: string; exponent: number; name: string }[] = [
  { symbol: "y", exponent: -24, name: "yocto" },
  { symbol: "z", exponent: -21, name: "zepto" },
  { symbol: "a", exponent: -18, name: "atto" },
  { symbol: "f", exponent: -15, name: "femto" },
  { symbol: "p", exponent: -12, name: "pico" },
  { symbol: "n", exponent: -9, name: "nano" },
  { symbol: "µ", exponent: -6, name: "micro" },
  { symbol: "m", exponent: -3, name: "milli" },
  { symbol: "", exponent: 0, name: "" },
  { symbol: "k", exponent: 3, name: "kilo" },
  { symbol: "M", exponent: 6, name: "mega" },
  { symbol: "G", exponent: 9, name: "giga" },
  { symbol: "T", exponent: 12, name: "tera" },
  { symbol: "P", exponent: 15, name: "peta" },
  { symbol: "E", exponent: 18, name: "exa" },
  { symbol: "Z", exponent: 21, name: "zetta" },
  { symbol: "Y", exponent: 24, name: "yotta" },
];

/** The prefix with this exponent (a multiple of 3 within ±24). */
export function prefixByExponent(exponent: number): { symbol: string; exponent: number; name: string } {
  const p = SI_PREFIXES.find((x) => x.exponent === exponent);
  if (!p) throw new RangeError(`no SI prefix for 10^${exponent}`);
  return p;
}

/** The prefix named by its symbol (`u` accepted for µ, as ASCII files write it). */
export function prefixBySymbol(symbol: string): { symbol: string; exponent: number; name: string } | undefined {
  const s = symbol === "u" || symbol === "μ" ? "µ" : symbol;
  return SI_PREFIXES.find((x) => x.symbol === s);
}

/**
 * The exponent of the prefix that puts |value| in [1, 1000): the engineering
 * choice, within `[lowest, highest]` (both multiples of 3). Zero and
 * non-finite values take the unprefixed unit.
 */
export function prefixExponentFor(value: number, lowest = -24, highest = 24): number {
  const a = Math.abs(value);
  if (!(a > 0) || !Number.isFinite(a)) return 0;
  // Decimal exponent from the printed form, not from Math.log10, which can land just below an integer (log10(1e-15) ≈ −14.9999…).
  const decimal = Number(a.toExponential(12).split("e")[1]);
  const e = 3 * Math.floor(decimal / 3);
  return Math.min(highest, Math.max(lowest, e));
}
