/**
 * Per-column units of coefficient tables: a base unit with an optional SI
 * prefix (SI Brochure, 9th ed. (2019), §3). Conversion to SI is exact to the
 * last bit: a prefix is a power of ten 10^k with |k| ≤ 15, and 10^|k| is an
 * exactly representable double, so one multiplication (k > 0) or one
 * division (k < 0) gives the correctly rounded SI value — 2.5 µV/K becomes
 * the same double as the literal 2.5e-6.
 */
import { UnitError } from "../errors.ts";
import { integerPower } from "../math/index.ts";

/** Accepted prefixes and their powers of ten. Micro may be written u, µ (U+00B5) or μ (U+03BC). */
export const PREFIXES: Readonly<Record<string, number>> = { f: -15, p: -12, n: -9, u: -6, "µ": -6, "μ": -6, m: -3, "": 0, k: 3 };

/** A quantity a column may hold, with its SI unit and the spellings accepted for it. */
export interface UnitQuantity {
  name: string; // what the column holds, for messages
  si: string; // the SI unit as written in reports
  spellings: string[]; // accepted base spellings (a prefix may precede each)
}

export const QUANTITIES = {
  G: { name: "electrical conductance G", si: "S", spellings: ["S", "A/V"] },
  S: { name: "Seebeck coefficient S", si: "V/K", spellings: ["V/K"] },
  Pi: { name: "Peltier coefficient Π", si: "V", spellings: ["V", "W/A"] },
  K: { name: "thermal conductance K", si: "W/K", spellings: ["W/K"] },
  // Callen's charge–heat Onsager entries: I = L11 ΔV/T + L12 ΔT/T², J_Q = L21 ΔV/T + L22 ΔT/T².
  L11: { name: "Onsager entry L11 (= G T)", si: "S K", spellings: ["S K", "S*K", "S·K", "A K/V", "A*K/V"] },
  L12: { name: "Onsager entry L12 (= G S T²)", si: "A K", spellings: ["A K", "A*K", "A·K"] },
  L21: { name: "Onsager entry L21 (= G Π T)", si: "A K", spellings: ["A K", "A*K", "A·K", "W K/V", "W*K/V"] },
  L22: { name: "Onsager entry L22 (= T²(K + G S Π))", si: "W K", spellings: ["W K", "W*K", "W·K"] },
} as const satisfies Record<string, UnitQuantity>;

export type QuantityKey = keyof typeof QUANTITIES;

/** A parsed unit: the text as written and the power of ten to SI. */
export interface ParsedUnit {
  text: string;
  exponent: number;
  quantity: QuantityKey;
}

function describeAccepted(q: UnitQuantity): string {
  return `${q.spellings.join(" or ")} with an optional prefix f, p, n, u (or µ), m or k, e.g. ${q.spellings[0] === "S" ? "uS" : `u${q.spellings[0]}`}`;
}

/**
 * Parse `text` as a unit of `quantity`. Spaces around the text are ignored;
 * `keyPath` (e.g. `audit.yaml datasets[0].units.S`) names where it came from.
 */
export function parseUnit(text: string, quantity: QuantityKey, keyPath: string): ParsedUnit {
  const q: UnitQuantity = QUANTITIES[quantity];
  const t = text.trim();
  for (const spelling of q.spellings) {
    if (!t.endsWith(spelling)) continue;
    const prefix = t.slice(0, t.length - spelling.length);
    if (prefix in PREFIXES) return { text: t, exponent: PREFIXES[prefix], quantity };
  }
  throw new UnitError(`${keyPath}: unknown unit ${JSON.stringify(text)} for the ${q.name}; accepted: ${describeAccepted(q)}`);
}

/** value in the parsed unit → SI, correctly rounded (see the module comment). */
export function toSI(value: number, unit: ParsedUnit | null): number {
  if (unit === null || unit.exponent === 0) return value;
  return unit.exponent > 0 ? value * integerPower(10, unit.exponent) : value / integerPower(10, -unit.exponent);
}

/** The SI unit text of a quantity, for reports. */
export function siUnitOf(quantity: QuantityKey): string {
  return QUANTITIES[quantity].si;
}
