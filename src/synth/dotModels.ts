import { fermiOccupation } from "./fermi.ts";
import type { CountingModel, CountingTransition } from "./countingModel.ts";

/**
 * The conductors of `synth dot` and `synth double-dot` as counting models.
 * Sequential tunnelling with Fermi-function rates (Beenakker, PRB 44, 1646
 * (1991)); energies in meV, rates in 1/ns, inverse temperatures in 1/meV.
 */
export interface LeadParameters {
  beta: { A: number; B: number };
  mu: { A: number; B: number };
}

/** Tunnelling in from lead X and out to it, through a level at `energy`, with the lead's electrons at inverse temperature `beta`. */
function leadPair(empty: number, full: number, lead: "A" | "B", rate: number, energy: number, beta: number, mu: number): CountingTransition[] {
  const f = fermiOccupation(energy, beta, mu);
  const gain = (dN: number): Pick<CountingTransition, "dN_A" | "dN_B" | "dE_A" | "dE_B"> =>
    lead === "A" ? { dN_A: dN, dN_B: 0, dE_A: dN * energy, dE_B: 0 } : { dN_A: 0, dN_B: dN, dE_A: 0, dE_B: dN * energy };
  return [
    { from: empty, to: full, rate: rate * f, ...gain(-1) },
    { from: full, to: empty, rate: rate * (1 - f), ...gain(1) },
  ];
}

export interface DotModelParameters extends LeadParameters {
  level: number;
  rateA: number;
  rateB: number;
  /**
   * Inverse temperature of the bath (the detector) that drives the transitions between the dot and lead A,
   * in place of lead A's own temperature; null without back-action.
   */
  heatingBeta: number | null;
}

/** Single level: state 0 empty, 1 occupied. */
export function dotModel(p: DotModelParameters): CountingModel {
  return {
    states: 2,
    transitions: [
      ...leadPair(0, 1, "A", p.rateA, p.level, p.heatingBeta ?? p.beta.A, p.mu.A),
      ...leadPair(0, 1, "B", p.rateB, p.level, p.beta.B, p.mu.B),
    ],
  };
}

export interface DoubleDotParameters extends LeadParameters {
  /** Levels of the dot next to lead A (left) and next to lead B (right). */
  levelLeft: number;
  levelRight: number;
  rateA: number;
  rateB: number;
  /** Inter-dot tunnelling rate scale. */
  rateInter: number;
  /**
   * Inverse temperature of the bath that supplies or absorbs the detuning ε_L − ε_R in inter-dot jumps
   * (phonons, or the detector's back-action). With equal levels the jumps are elastic and no bath enters.
   */
  interBeta: number | null;
}

/**
 * Serial double dot in strong Coulomb blockade (at most one extra electron):
 * states 0 (empty), 1 (left dot, next to A), 2 (right dot, next to B). Inter-dot
 * jumps 1 ↔ 2 obey detailed balance with their bath: k(1→2)/k(2→1) = e^{β(ε_L − ε_R)}
 * (van der Wiel et al., Rev. Mod. Phys. 75, 1 (2002); local detailed balance),
 * with k(1→2) + k(2→1) = 2 rateInter. They move nothing into the leads; a charge
 * detector that resolves the three states sees every electron's direction.
 */
export function doubleDotModel(p: DoubleDotParameters): CountingModel {
  const detuning = p.levelLeft - p.levelRight;
  let forward = p.rateInter;
  let backward = p.rateInter;
  if (detuning !== 0) {
    if (p.interBeta === null) throw new Error("detuned double dot needs the inverse temperature of the inter-dot bath");
    const x = p.interBeta * detuning;
    // k(1→2) = 2Γ_c/(1 + e^{−x}), k(2→1) = 2Γ_c/(1 + e^{x}): ratio e^{x}, sum 2Γ_c.
    forward = (2 * p.rateInter) / (1 + Math.exp(-x));
    backward = (2 * p.rateInter) / (1 + Math.exp(x));
  }
  const none = { dN_A: 0, dN_B: 0, dE_A: 0, dE_B: 0 };
  return {
    states: 3,
    transitions: [
      ...leadPair(0, 1, "A", p.rateA, p.levelLeft, p.beta.A, p.mu.A),
      { from: 1, to: 2, rate: forward, ...none },
      { from: 2, to: 1, rate: backward, ...none },
      ...leadPair(0, 2, "B", p.rateB, p.levelRight, p.beta.B, p.mu.B),
    ],
  };
}

/** Particles gained by lead B in a jump: the counted current. */
export const intoB = (t: CountingTransition): number => t.dN_B;

/**
 * Entropy production in the leads per electron carried from A to B through the conductor:
 * β_B(ε_out − μ_B) − β_A(ε_in − μ_A) (Esposito, Harbola & Mukamel, RMP 81, 1665 (2009), §V), plus what a
 * bath at β_bath gains when it absorbs the energy ε_in − ε_out on the way. `betaA` is the inverse
 * temperature that actually drives the A transitions.
 */
export function cycleAffinity(levelIn: number, levelOut: number, betaA: number, betaB: number, muA: number, muB: number, bathBeta: number | null): number {
  return betaB * (levelOut - muB) - betaA * (levelIn - muA) + (bathBeta ?? 0) * (levelIn - levelOut);
}
