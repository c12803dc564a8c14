import { InputError } from "../errors.ts";

/**
 * The parameters of a simulator, declared once: the command line lists them
 * (name, unit, default) and parses them, the model reads the typed values.
 */
export interface SynthParameter {
  name: string;
  /** Unit shown in --help ("meV", "K", "ps", "1/ns", "sites", …), or "" for pure numbers and words. */
  unit: string;
  description: string;
  default: string;
  type: "number" | "integer" | "text" | "choice";
  choices?: string[];
  /** For numbers: the smallest value allowed and whether it is allowed itself. */
  min?: number;
  minExclusive?: boolean;
  /** For numbers: the largest value allowed (inclusive). */
  max?: number;
}

export type ParameterValues = Record<string, number | string>;

function fail(name: string, message: string): never {
  throw new InputError(`--${name}: ${message}`);
}

/** Parse raw option strings (absent → default) into typed values, naming the option in every error. */
export function parseParameters(table: SynthParameter[], raw: Record<string, string | undefined>): ParameterValues {
  const out: ParameterValues = {};
  for (const p of table) {
    const text = raw[p.name] ?? p.default;
    // An optional number (default "") that was not given stays absent.
    if (p.type === "number" && p.default === "" && raw[p.name] === undefined) continue;
    if (p.type === "text") {
      if (text.trim() === "") fail(p.name, "must not be empty");
      out[p.name] = text;
      continue;
    }
    if (p.type === "choice") {
      if (!p.choices!.includes(text)) fail(p.name, `must be one of ${p.choices!.join(", ")}, found "${text}"`);
      out[p.name] = text;
      continue;
    }
    const value = Number(text.trim());
    const what = p.type === "integer" ? "a whole number" : "a number";
    if (text.trim() === "" || !Number.isFinite(value)) {
      const hint = /^\d+,\d+$/.test(text.trim()) ? ` (use a decimal point: ${text.trim().replace(",", ".")})` : "";
      fail(p.name, `expected ${what}${p.unit ? ` of ${p.unit}` : ""}, found "${text}"${hint}`);
    }
    if (p.type === "integer" && !Number.isInteger(value)) fail(p.name, `expected a whole number, found "${text}"`);
    if (p.min !== undefined && (p.minExclusive ? value <= p.min : value < p.min)) {
      fail(p.name, `must be ${p.minExclusive ? "greater than" : "at least"} ${p.min}${p.unit ? ` ${p.unit}` : ""}, found ${text}`);
    }
    if (p.max !== undefined && value > p.max) fail(p.name, `must be at most ${p.max}${p.unit ? ` ${p.unit}` : ""}, found ${text}`);
    out[p.name] = value;
  }
  return out;
}
