import { fermiOccupation } from "./fermi.ts";

/**
 * Sequential tunnelling through a single spinless level ε between leads A
 * and B: a two-state Markov jump process (dot empty or occupied) whose rates
 * are the tunnelling rates Γ_X times the Fermi occupation of lead X at ε for
 * tunnelling in, and times one minus it for tunnelling out (Beenakker,
 * PRB 44, 1646 (1991); Bagrets & Nazarov, PRB 67, 085316 (2003)).
 * Rates in 1/time, energies in the model's energy unit.
 */
export interface DotParameters {
  level: number;
  rateA: number;
  rateB: number;
  beta: { A: number; B: number };
  mu: { A: number; B: number };
}

export interface DotRates {
  /** empty → occupied by an electron from A / from B */
  inA: number;
  inB: number;
  /** occupied → empty by an electron leaving to A / to B */
  outA: number;
  outB: number;
}

export function dotRates(p: DotParameters): DotRates {
  const fA = fermiOccupation(p.level, p.beta.A, p.mu.A);
  const fB = fermiOccupation(p.level, p.beta.B, p.mu.B);
  return { inA: p.rateA * fA, inB: p.rateB * fB, outA: p.rateA * (1 - fA), outB: p.rateB * (1 - fB) };
}

/** Stationary probability that the dot is occupied: balance of the total in- and out-rates. */
export function stationaryOccupation(r: DotRates): number {
  const gin = r.inA + r.inB;
  return gin / (gin + r.outA + r.outB);
}

/**
 * Affinity per electron carried from A to B: ln[(inA·outB)/(outA·inB)]
 * = β_B(ε − μ_B) − β_A(ε − μ_A), the entropy (k_B units) one transfer
 * produces in the leads (Esposito, Harbola & Mukamel, RMP 81, 1665 (2009), §V).
 */
export function affinityPerElectron(p: DotParameters): number {
  return p.beta.B * (p.level - p.mu.B) - p.beta.A * (p.level - p.mu.A);
}

/** Long-time mean current into B: Γ_A Γ_B (f_A − f_B)/(Γ_A + Γ_B) (Bagrets & Nazarov 2003). */
export function meanCurrent(p: DotParameters): number {
  const fA = fermiOccupation(p.level, p.beta.A, p.mu.A);
  const fB = fermiOccupation(p.level, p.beta.B, p.mu.B);
  return (p.rateA * p.rateB * (fA - fB)) / (p.rateA + p.rateB);
}
