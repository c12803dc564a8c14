/*
 * The SI unit of every number a check puts into `values`, declared beside the
 * check (src/checks/<id>/units.ts) and written into the result document as
 * `units`, so that a reader of the JSON never has to guess whether 7.2e22 is
 * per joule or per electronvolt.
 *
 * A unit is written as SI symbols (SI Brochure, 9th ed., Tables 2 and 4) with
 * integer powers, separated by single spaces: "W", "K", "J^-1", "J^2 s^-1",
 * "W Ω K^-2"; "1" is the unit one (dimensionless numbers, counts, p-values,
 * entropy in units of k_B); AS_WRITTEN marks numbers copied from a data file's
 * column whose unit audit.yaml does not declare (operating-point columns such
 * as Vg_mV, Onsager entries of more than two fluxes).
 *
 * A unit specification mirrors the value it describes:
 *   - a unit string: every number inside the value (a number, a list, a matrix,
 *     the members of an object) has this unit; text and flags inside need none;
 *   - null: the value holds no number (text, flags, lists of names);
 *   - an object: the units of the value's members, or, for a list of
 *     records, of each record's members;
 *   - a list: element by element (a matrix whose entries differ in unit, a
 *     list of records whose rows differ in unit).
 */

export type UnitSpec = string | null | readonly UnitSpec[] | { readonly [member: string]: UnitSpec };
/** A fixed specification, or one computed from the check's values (units that follow the channels present). */
export type UnitRule = UnitSpec | ((values: Readonly<Record<string, unknown>>) => UnitSpec);
/** A check's registry: value key → unit rule. */
export type ValueUnits = Readonly<Record<string, UnitRule>>;

/** Numbers copied from a data file whose unit the audit does not declare. */
export const AS_WRITTEN = "as written";
export const ONE = "1";

/** SI symbols a unit may use: base units and the derived units with special names the checks need (SI Brochure, 9th ed., Tables 2 and 4). */
export const SI_SYMBOLS = ["s", "m", "kg", "A", "K", "mol", "cd", "J", "W", "V", "S", "Ω", "C", "T", "Hz"] as const;

/** The written form: `1`, `as written`, or symbols with optional integer powers separated by single spaces. */
export function isUnitText(unit: string): boolean {
  if (unit === ONE || unit === AS_WRITTEN) return true;
  return unit.split(" ").every((factor) => {
    const m = /^([A-Za-zΩ]+)(?:\^(-?[1-9][0-9]*))?$/u.exec(factor);
    return m !== null && (SI_SYMBOLS as readonly string[]).includes(m[1]);
  });
}

/** Value keys every check may carry: the not-applicable results written by `notApplicableResult` for skipped datasets. */
export const SHARED_UNITS: ValueUnits = {
  skipped: null,
  selected: null,
  // The not-applicable results for a trace whose lead is unresolved (src/checks/helpers.ts).
  lead_resolved: null,
  unresolved_jumps: null,
};

/** Units of a result's values, key by key; a key the registry lacks is left out (the registry test names it). */
export function valueUnitsOf(values: Readonly<Record<string, unknown>>, registry: ValueUnits): Record<string, UnitSpec> {
  const out: Record<string, UnitSpec> = {};
  for (const key of Object.keys(values)) {
    const rule = Object.hasOwn(registry, key) ? registry[key] : Object.hasOwn(SHARED_UNITS, key) ? SHARED_UNITS[key] : undefined;
    if (rule === undefined) continue;
    out[key] = typeof rule === "function" ? rule(values) : rule;
  }
  return out;
}

function isRecord(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === "object" && !Array.isArray(v);
}

/** Key paths of the numbers inside `value`, as `a.b[2]` from `path`. */
function numbersInside(value: unknown, path: string, out: string[]): void {
  if (typeof value === "number") out.push(path);
  else if (Array.isArray(value)) value.forEach((v, i) => numbersInside(v, `${path}[${i}]`, out));
  else if (isRecord(value)) for (const [k, v] of Object.entries(value)) numbersInside(v, `${path}.${k}`, out);
}

/**
 * Key paths of the numbers in `value` to which `spec` gives no unit (see the
 * rules at the top); empty when every number has one.
 */
export function numbersWithoutUnit(value: unknown, spec: UnitSpec | undefined, path = ""): string[] {
  const out: string[] = [];
  if (typeof spec === "string") return out;
  if (spec === null || spec === undefined) {
    numbersInside(value, path, out);
    return out;
  }
  if (Array.isArray(spec)) {
    if (!Array.isArray(value)) {
      numbersInside(value, path, out);
      return out;
    }
    value.forEach((v, i) => out.push(...numbersWithoutUnit(v, (spec as readonly UnitSpec[])[i], `${path}[${i}]`)));
    return out;
  }
  const members = spec as { readonly [member: string]: UnitSpec };
  if (Array.isArray(value)) value.forEach((v, i) => out.push(...numbersWithoutUnit(v, members, `${path}[${i}]`)));
  else if (isRecord(value)) for (const [k, v] of Object.entries(value)) out.push(...numbersWithoutUnit(v, Object.hasOwn(members, k) ? members[k] : undefined, `${path}.${k}`));
  else numbersInside(value, path, out);
  return out;
}

/** Every unit string in a specification, for checking their spelling. */
export function unitTexts(spec: UnitSpec): string[] {
  if (spec === null) return [];
  if (typeof spec === "string") return [spec];
  if (Array.isArray(spec)) return (spec as readonly UnitSpec[]).flatMap(unitTexts);
  return Object.values(spec as Record<string, UnitSpec>).flatMap(unitTexts);
}

/** Per-channel units of the exchange statistics: what is carried (energy or particles) and its rate. */
export const TRANSFER_UNIT: Readonly<Record<string, string>> = { Q: "J", W: "J", dN: ONE };
export const FLUX_UNIT: Readonly<Record<string, string>> = { Q: "W", W: "W", dN: "s^-1" };
/** Affinities conjugate to each channel: a_Q per joule, a_N per particle (dimensionless), β̄ per joule. */
export const AFFINITY_UNIT: Readonly<Record<string, string>> = { a_Q: "J^-1", a_N: ONE, beta_bar: "J^-1" };
