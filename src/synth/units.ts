import { BOLTZMANN, ELEMENTARY_CHARGE, HBAR, PLANCK } from "../physics/constants.ts";

/**
 * The simulators' units: energies in meV (the audit's `energy_unit: meV`),
 * temperatures in K. Constants are the exact SI values (CODATA 2018).
 */
export const JOULES_PER_MEV = 1e-3 * ELEMENTARY_CHARGE;

/** Inverse temperature in 1/meV at T kelvin. */
export function betaPerMeV(T: number): number {
  return JOULES_PER_MEV / (BOLTZMANN * T);
}

/** A contact time in seconds expressed in units of ħ/meV (the lattice model's time unit). */
export function secondsToHbarPerMeV(seconds: number): number {
  return (seconds * JOULES_PER_MEV) / HBAR;
}

/** The magnetic field (T) whose flux through an area (m²) gives the Peierls phase φ = 2π Φ/(h/e). */
export function fieldForPeierlsPhase(phase: number, area: number): number {
  return ((phase / (2 * Math.PI)) * (PLANCK / ELEMENTARY_CHARGE)) / area;
}
