import { BASES, QUANTITY_BASES, type Quantity, type UnitBase } from "./quantities.ts";
import { prefixByExponent, prefixBySymbol, prefixExponentFor } from "./siPrefix.ts";

/** A unit to show numbers in: its symbol as text, its siunitx spelling, and the factor that takes an SI value to it. */
export interface DisplayUnit {
  quantity: Quantity;
  symbol: string;
  /** siunitx unit argument (`\milli\electronvolt`), "" for a pure number. */
  siunitx: string;
  /** Shown value = SI value × perSI. */
  perSI: number;
}

/** What decides display units besides the numbers: the dataset's energy unit and the audit's `display:` choices. */
export interface DisplayContext {
  /** The energy unit the data were written in (`energy_unit`), when known. */
  energyUnit?: string;
  /** Per-quantity choices from audit.yaml's `display:` block, as written there (`µeV`, `e2/h`, `auto`). */
  overrides?: Partial<Record<Quantity, string>>;
  /** The one temperature (K) of the numbers shown, when they share one: what g₀ = π² k_B² T/(3h) is taken at. */
  temperature?: number;
}

/** The base an energy-like quantity defaults to, following the dataset's energy unit: J stays J, the eV family gives eV. */
function defaultBase(quantity: Quantity, ctx: DisplayContext): string {
  const joules = ctx.energyUnit === "J";
  if (quantity === "energy" || quantity === "chemical_potential") return joules ? "J" : "eV";
  if (quantity === "affinity") return joules ? "1/J" : "1/eV";
  if (quantity === "energy_squared_rate") return joules ? "J2/s" : "eV2/s";
  // Heat currents follow a declared electronvolt unit (meV/s beside energies in meV); without a declared
  // energy unit (coefficient tables are in SI) they stay in watts: a megaelectronvolt per second
  // misleads more than it helps.
  if (quantity === "heat_current") return ctx.energyUnit === undefined || joules ? "W" : "eV/s";
  return QUANTITY_BASES[quantity][0];
}

function build(quantity: Quantity, baseName: string, exponent: number, temperature = 1): DisplayUnit {
  const base: UnitBase = BASES[baseName];
  const p = prefixByExponent(exponent);
  const symbol =
    base.prefix === "denominator" ? base.symbol.replace("1/", `1/${p.symbol}`) : base.prefix === "numerator" ? `${p.symbol}${base.symbol}` : base.symbol;
  const siunitx = base.siunitx.replace("<p>", p.name ? `${p.name}\\` : "").replace("\\\\", "\\");
  // A prefix in the denominator: 1/meV = 10³/eV, so shown = SI / base.si / 10^(−exponent). A squared unit squares
  // its prefix: 1 meV²/s = 10⁻⁶ eV²/s.
  const scale = base.prefix === "denominator" ? 10 ** -exponent : 10 ** (exponent * (base.power ?? 1));
  const si = base.timesTemperature ? base.si * temperature : base.si;
  return { quantity, symbol, siunitx, perSI: 1 / (si * scale) };
}

/**
 * A choice written in `display:` understood as a base and a fixed prefix
 * (`µeV` → eV with micro, `1/meV` → 1/eV with milli, `e2/h` → e²/h), or
 * undefined when the quantity cannot be shown in it.
 */
export function parseDisplayChoice(quantity: Quantity, text: string): { base: string; exponent: number } | undefined {
  const t = text.trim();
  for (const name of QUANTITY_BASES[quantity]) {
    const base = BASES[name];
    if (t === name || t === base.symbol) return { base: name, exponent: 0 };
    if (base.prefix === "none") continue;
    const stem = base.prefix === "denominator" ? base.symbol.slice(2) : base.symbol;
    const head = base.prefix === "denominator" ? "1/" : "";
    if (!t.startsWith(head) || !t.endsWith(stem)) continue;
    const p = prefixBySymbol(t.slice(head.length, t.length - stem.length));
    const [lo, hi] = base.range ?? [-24, 24];
    if (p && p.symbol !== "" && p.exponent >= lo && p.exponent <= hi) return { base: name, exponent: p.exponent };
  }
  return undefined;
}

/** Every spelling `display:` accepts for a quantity, for messages ("one of …"). */
export function displayChoices(quantity: Quantity): string[] {
  const out = ["auto"];
  for (const name of QUANTITY_BASES[quantity]) {
    const base = BASES[name];
    out.push(name);
    if (base.prefix === "none") continue;
    for (const sym of ["p", "n", "µ", "m"]) out.push(base.prefix === "denominator" ? `1/${sym}${base.symbol.slice(2)}` : `${sym}${base.symbol}`);
  }
  return [...new Set(out)];
}

/**
 * The unit to show a quantity in, for numbers of about `magnitude` (SI): the
 * audit's choice if it made one, else the default base with the SI prefix
 * that puts the magnitude in [1, 1000) (SI Brochure 9th ed. §3: prefixes are
 * chosen so that numbers stay readable).
 */
export function displayUnitFor(quantity: Quantity, magnitude: number, ctx: DisplayContext = {}): DisplayUnit {
  const chosen = ctx.overrides?.[quantity];
  const parsed = chosen && chosen !== "auto" ? parseDisplayChoice(quantity, chosen) : undefined;
  // A unit that scales with the temperature (g₀) needs the one temperature of the numbers; without it the default base.
  const usable = parsed && (!BASES[parsed.base].timesTemperature || (ctx.temperature !== undefined && ctx.temperature > 0 && Number.isFinite(ctx.temperature)));
  const baseName = usable ? parsed.base : defaultBase(quantity, ctx);
  const base = BASES[baseName];
  if (base.timesTemperature) return build(quantity, baseName, 0, ctx.temperature);
  if (usable && parsed.exponent !== 0) return build(quantity, baseName, parsed.exponent);
  if (base.prefix === "none" || (usable && chosen === baseName)) return build(quantity, baseName, 0);
  const [lo, hi] = base.range ?? [-24, 24];
  const inBase = magnitude / base.si;
  // In the denominator the prefix works the other way: 1/meV is 10³ per eV, so 7.7 per eV would be 0.0077 per meV.
  // A squared unit takes the prefix that puts the square root of the number in [1, 1000): the number itself then
  // lies in [1, 10⁶), as close to the SI Brochure's range as a prefix squared allows.
  const power = base.power ?? 1;
  const exponent =
    base.prefix === "denominator" ? -prefixExponentFor(inBase, -hi, -lo) : prefixExponentFor(power === 1 ? inBase : Math.abs(inBase) ** (1 / power), lo, hi);
  return build(quantity, baseName, exponent === 0 ? 0 : exponent);
}
