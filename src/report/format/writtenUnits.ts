import { ELEMENTARY_CHARGE } from "../../physics/constants.ts";
import type { Quantity } from "./quantities.ts";
import { prefixBySymbol } from "./siPrefix.ts";

/** A unit as the checks write it, understood: which quantity it measures and how many SI units one of it is. */
export interface WrittenUnit {
  quantity: Quantity;
  /** SI value of one written unit: 1 meV = 1.602…×10⁻²² J. */
  si: number;
}

/**
 * Units the checks write (table columns, plot axes, summaries), each given
 * with the quantity it measures. Written units outside this list are shown as
 * they are, unconverted: a unit we do not understand is never rescaled.
 */
const FORMS: { pattern: RegExp; quantity: Quantity; si: number; power?: number }[] = [
  // Squared energies per second before the energies: the prefix is squared with its unit (1 meV²/s = 10⁻⁶ eV²/s).
  { pattern: /^(?<p>[yzafpnµumk]?)eV²\/s$/, quantity: "energy_squared_rate", si: ELEMENTARY_CHARGE * ELEMENTARY_CHARGE, power: 2 },
  { pattern: /^(?<p>[yzafpnµum]?)J²\/s$/, quantity: "energy_squared_rate", si: 1, power: 2 },
  { pattern: /^(?<p>[yzafpnµumk]?)eV$/, quantity: "energy", si: ELEMENTARY_CHARGE },
  { pattern: /^(?<p>[yzafpnµum]?)J$/, quantity: "energy", si: 1 },
  { pattern: /^1\/(?<p>[yzafpnµumk]?)eV$/, quantity: "affinity", si: 1 / ELEMENTARY_CHARGE },
  { pattern: /^1\/(?<p>[yzafpnµum]?)J$/, quantity: "affinity", si: 1 },
  { pattern: /^(?<p>[yzafpnµumk]?)eV\/s$/, quantity: "heat_current", si: ELEMENTARY_CHARGE },
  { pattern: /^(?<p>[yzafpnµumk]?)W$/, quantity: "heat_current", si: 1 },
  // An energy per second: the cross entries of an Onsager matrix of heat and particles (fluctuation-dissipation).
  { pattern: /^(?<p>[yzafpnµum]?)J\/s$/, quantity: "heat_current", si: 1 },
  { pattern: /^1\/(?<p>[pnµum]?)s$|^s⁻¹$/, quantity: "particle_current", si: 1 },
  { pattern: /^(?<p>[nµum]?)K$/, quantity: "temperature", si: 1 },
  { pattern: /^(?<p>[pnµum]?)S$/, quantity: "conductance", si: 1 },
  { pattern: /^(?<p>[yzafpnµum]?)W\/K$/, quantity: "thermal_conductance", si: 1 },
  { pattern: /^(?<p>[pnµum]?)V$/, quantity: "voltage", si: 1 },
  { pattern: /^(?<p>[pnµum]?)V\/K$/, quantity: "thermopower", si: 1 },
  { pattern: /^(?<p>[yzafpnµum]?)W\/K(²|\^2)$/, quantity: "power_factor", si: 1 },
  { pattern: /^(?<p>[yzafpnµum]?)W Ω K(⁻²|\^-2)$/, quantity: "lorenz_number", si: 1 },
  { pattern: /^(?<p>[yzafpnµum]?)s$/, quantity: "time", si: 1 },
  { pattern: /^(?<p>[µum]?)T$/, quantity: "field", si: 1 },
  // Callen's L11 = G T, L12 and L21, L22 (Phys. Rev. 73, 1349 (1948)); A K/V is S K written another way.
  { pattern: /^(?<p>[yzafpnµum]?)S K$|^A K\/V$/, quantity: "onsager_charge", si: 1 },
  { pattern: /^(?<p>[yzafpnµum]?)A K$/, quantity: "onsager_mixed", si: 1 },
  { pattern: /^(?<p>[yzafpnµum]?)W K$/, quantity: "onsager_heat", si: 1 },
  { pattern: /^k_B$/, quantity: "entropy", si: 1 },
  { pattern: /^1\/k_B$/, quantity: "entropy_density", si: 1 },
  { pattern: /^1$|^dimensionless$/, quantity: "dimensionless", si: 1 },
];

/** The written unit understood, or undefined when it is not one we know. */
export function parseWrittenUnit(unit: string): WrittenUnit | undefined {
  const u = unit.trim();
  for (const f of FORMS) {
    const m = f.pattern.exec(u);
    if (!m) continue;
    const p = m.groups?.p ? prefixBySymbol(m.groups.p) : undefined;
    const exp = p?.exponent ?? 0;
    // A prefix in the denominator divides: 1/meV is 10³ per eV.
    const inverse = u.startsWith("1/");
    return { quantity: f.quantity, si: f.si * 10 ** ((inverse ? -exp : exp) * (f.power ?? 1)) };
  }
  return undefined;
}
