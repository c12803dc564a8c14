import { BOLTZMANN, ELEMENTARY_CHARGE, PLANCK } from "../../physics/constants.ts";

/**
 * The kinds of quantity the report shows, each with its SI unit (the unit of
 * the result document) and how it may be displayed. A display unit is a base
 * symbol, optionally with an SI prefix, and the factor from SI to it.
 */
export const QUANTITIES = [
  "energy",
  "affinity",
  "heat_current",
  "particle_current",
  "temperature",
  "chemical_potential",
  "conductance",
  "thermal_conductance",
  "voltage",
  "thermopower",
  "power_factor",
  "lorenz_number",
  "time",
  "field",
  "entropy",
  "entropy_density",
  "energy_squared_rate",
  "onsager_charge",
  "onsager_mixed",
  "onsager_heat",
  "dimensionless",
] as const;
export type Quantity = (typeof QUANTITIES)[number];

/** A display base: its symbol, how many SI units one of it is, whether an SI prefix may be put in front, and its siunitx spelling. */
export interface UnitBase {
  symbol: string;
  /** SI value of one base unit: 1 eV = e J. */
  si: number;
  /** Where the prefix goes: before the numerator (meV/s), before the denominator (1/meV), or nowhere. */
  prefix: "numerator" | "denominator" | "none";
  /** siunitx unit macro text with `<p>` where the prefix macro goes, e.g. `\<p>electronvolt\per\second`. */
  siunitx: string;
  /** Prefix exponents allowed, lowest and highest (temperatures stop at kelvin: no kK). */
  range?: [number, number];
  /** One of it is `si` × T SI units, T the temperature of the numbers shown (the thermal conductance quantum). */
  timesTemperature?: boolean;
  /** Power the prefixed unit is raised to (meV²/s: the milli is squared, 1 meV²/s = 10⁻⁶ eV²/s); 1 when absent. */
  power?: number;
}

const e = ELEMENTARY_CHARGE;
/** Conductance quantum without spin, e²/h (exact from the defining constants, SI Brochure 9th ed.). */
export const CONDUCTANCE_QUANTUM = (e * e) / PLANCK;
/**
 * The thermal conductance quantum per kelvin, g₀/T = π² k_B²/(3h) in W/K²: the
 * thermal conductance of one ballistic channel (Pendry, J. Phys. A 16, 2161
 * (1983); measured by Schwab, Henriksen, Worlock & Roukes, Nature 404, 974
 * (2000)). Exact k_B and h (CODATA 2018: Tiesinga et al., Rev. Mod. Phys. 93,
 * 025010 (2021)) give 9.464 311 516 × 10⁻¹³ W/K².
 */
export const THERMAL_CONDUCTANCE_QUANTUM_PER_KELVIN = (Math.PI * Math.PI * BOLTZMANN * BOLTZMANN) / (3 * PLANCK);

/** Display bases by name. The first of each quantity's list is its default; the rest may be chosen in `display:`. */
export const BASES: Record<string, UnitBase> = {
  J: { symbol: "J", si: 1, prefix: "numerator", siunitx: "\\<p>joule" },
  eV: { symbol: "eV", si: e, prefix: "numerator", siunitx: "\\<p>electronvolt" },
  "kB K": { symbol: "k_B K", si: BOLTZMANN, prefix: "none", siunitx: "\\kelvin" },
  "1/J": { symbol: "1/J", si: 1, prefix: "denominator", siunitx: "\\per\\<p>joule" },
  "1/eV": { symbol: "1/eV", si: 1 / e, prefix: "denominator", siunitx: "\\per\\<p>electronvolt" },
  W: { symbol: "W", si: 1, prefix: "numerator", siunitx: "\\<p>watt" },
  "eV/s": { symbol: "eV/s", si: e, prefix: "numerator", siunitx: "\\<p>electronvolt\\per\\second" },
  // An energy squared per second: the heat–heat entry of an Onsager matrix of energy and particle currents.
  "eV2/s": { symbol: "eV²/s", si: e * e, prefix: "numerator", power: 2, siunitx: "\\<p>electronvolt\\squared\\per\\second" },
  "J2/s": { symbol: "J²/s", si: 1, prefix: "numerator", power: 2, siunitx: "\\<p>joule\\squared\\per\\second" },
  // A rate takes its prefix on the second (120 1/µs, SI Brochure 9th ed. §3: a prefix attaches to the unit symbol
  // and is raised to its power), from picoseconds to seconds: 1/ks would read as a slower clock, not a smaller rate.
  "1/s": { symbol: "1/s", si: 1, prefix: "denominator", siunitx: "\\per\\<p>second", range: [-12, 0] },
  "e/s": { symbol: "e/s", si: 1, prefix: "none", siunitx: "\\elementarycharge\\per\\second" },
  A: { symbol: "A", si: 1 / e, prefix: "numerator", siunitx: "\\<p>ampere" },
  K: { symbol: "K", si: 1, prefix: "numerator", siunitx: "\\<p>kelvin", range: [-9, 0] },
  S: { symbol: "S", si: 1, prefix: "numerator", siunitx: "\\<p>siemens" },
  "e2/h": { symbol: "e²/h", si: CONDUCTANCE_QUANTUM, prefix: "none", siunitx: "\\elementarycharge\\squared\\per\\planckconstant" },
  "W/K": { symbol: "W/K", si: 1, prefix: "numerator", siunitx: "\\<p>watt\\per\\kelvin" },
  // g₀ at the temperature of the numbers shown; siunitx has no such unit, so the LaTeX writer sets it as math.
  g0: { symbol: "g₀", si: THERMAL_CONDUCTANCE_QUANTUM_PER_KELVIN, prefix: "none", siunitx: "", timesTemperature: true },
  V: { symbol: "V", si: 1, prefix: "numerator", siunitx: "\\<p>volt" },
  "V/K": { symbol: "V/K", si: 1, prefix: "numerator", siunitx: "\\<p>volt\\per\\kelvin" },
  "W/K2": { symbol: "W/K²", si: 1, prefix: "numerator", siunitx: "\\<p>watt\\per\\kelvin\\squared" },
  "W Ohm/K2": { symbol: "W Ω K⁻²", si: 1, prefix: "numerator", siunitx: "\\<p>watt\\ohm\\per\\kelvin\\squared" },
  s: { symbol: "s", si: 1, prefix: "numerator", siunitx: "\\<p>second", range: [-24, 0] },
  T: { symbol: "T", si: 1, prefix: "numerator", siunitx: "\\<p>tesla" },
  kB: { symbol: "k_B", si: 1, prefix: "none", siunitx: "\\kB" },
  "1/kB": { symbol: "1/k_B", si: 1, prefix: "none", siunitx: "\\per\\kB" },
  // Entries of Callen's charge–heat matrix (Phys. Rev. 73, 1349 (1948)): L11 = G T, L12 and L21, L22 = T²(K + G S Π).
  "S K": { symbol: "S K", si: 1, prefix: "numerator", siunitx: "\\<p>siemens\\kelvin" },
  "A K": { symbol: "A K", si: 1, prefix: "numerator", siunitx: "\\<p>ampere\\kelvin" },
  "W K": { symbol: "W K", si: 1, prefix: "numerator", siunitx: "\\<p>watt\\kelvin" },
  "1": { symbol: "1", si: 1, prefix: "none", siunitx: "" },
};

/** Bases each quantity may be shown in; the first is the default (energies follow the dataset's unit, see `energyFamily`). */
export const QUANTITY_BASES: Record<Quantity, string[]> = {
  energy: ["eV", "J", "kB K"],
  affinity: ["1/eV", "1/J"],
  heat_current: ["eV/s", "W"],
  particle_current: ["1/s", "e/s", "A"],
  temperature: ["K"],
  chemical_potential: ["eV", "J"],
  conductance: ["S", "e2/h"],
  thermal_conductance: ["W/K", "g0"],
  voltage: ["V"],
  thermopower: ["V/K"],
  power_factor: ["W/K2"],
  lorenz_number: ["W Ohm/K2"],
  time: ["s"],
  field: ["T"],
  entropy: ["kB"],
  entropy_density: ["1/kB"],
  energy_squared_rate: ["eV2/s", "J2/s"],
  onsager_charge: ["S K"],
  onsager_mixed: ["A K"],
  onsager_heat: ["W K"],
  dimensionless: ["1"],
};
