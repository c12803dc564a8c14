import type { SamplesDataset } from "../../ingest/types.ts";
import { BOLTZMANN } from "../../physics/constants.ts";

/**
 * What one electron carried from A to B means for the declared leads: the
 * energy it takes from A and brings to B, read from the data as the ratio
 * ΔE_X/ΔN_X that holds in every window (a single level, or a level per lead
 * as in a serial double dot), and the affinity per electron
 *   A = β_B(ε_B − μ_B) − β_A(ε_A − μ_A)
 * (Esposito, Harbola & Mukamel, Rev. Mod. Phys. 81, 1665 (2009), §V), the
 * long-time slope of ln P(n)/P(−n) (Lebowitz & Spohn, J. Stat. Phys. 95, 333
 * (1999)). Null energies when a lead's energy per electron is not fixed.
 */
export interface PerElectron {
  /** Energy per electron exchanged with each lead (J), or null when the data do not fix it. */
  energyA: number | null;
  energyB: number | null;
  /** Declared affinity per electron (k_B), null when it cannot be formed. */
  affinity: number | null;
  /** Why the affinity could not be formed. */
  problem: string | null;
}

/** ε such that y = ε x in every row with x ≠ 0 (to 1e-9 relative), or null. */
function fixedRatio(y: ArrayLike<number>, x: ArrayLike<number>): number | null {
  let ratio: number | null = null;
  for (let i = 0; i < x.length; i++) {
    if (x[i] === 0) {
      if (Math.abs(y[i]) > 0) return null;
      continue;
    }
    const r = y[i] / x[i];
    if (ratio === null) ratio = r;
    else if (Math.abs(r - ratio) > 1e-9 * Math.abs(ratio)) return null;
  }
  return ratio;
}

/** Particles gained by each lead: per-lead columns, or ±dN when the conductor holds none. */
function leadCounts(d: SamplesDataset): { nA: ArrayLike<number>; nB: ArrayLike<number> } {
  if (d.leadParticles) return { nA: d.leadParticles.A, nB: d.leadParticles.B };
  return { nA: Float64Array.from(d.dN, (x) => -x), nB: d.dN };
}

export function perElectron(d: SamplesDataset): PerElectron {
  const { A, B } = d.reservoirs;
  if (!d.dE_A || !d.dE_B) {
    // Heat only: Q = ε ΔN fixes the energy per electron for both leads.
    const eps = fixedRatio(d.Q, d.dN);
    if (eps === null) return { energyA: null, energyB: null, affinity: null, problem: "the energy each electron carries is not the same in every window (Q is not a fixed multiple of ΔN)" };
    return { energyA: eps, energyB: eps, affinity: B.beta * (eps - B.mu) - A.beta * (eps - A.mu), problem: null };
  }
  const { nA, nB } = leadCounts(d);
  const eA = fixedRatio(d.dE_A, nA);
  const eB = fixedRatio(d.dE_B, nB);
  if (eA === null || eB === null) {
    return { energyA: eA, energyB: eB, affinity: null, problem: `the energy each electron exchanges with lead ${eA === null ? "A" : "B"} is not the same in every window, so no single affinity per electron follows from the declared leads` };
  }
  return { energyA: eA, energyB: eB, affinity: B.beta * (eB - B.mu) - A.beta * (eA - A.mu), problem: null };
}

/** One lead's temperature or chemical potential that would make the affinity per electron equal `affinity`, others as declared. */
export interface EffectiveLead {
  T_A: number | null;
  T_B: number | null;
  /** J */
  mu_A: number | null;
  mu_B: number | null;
}

export function effectiveLead(d: SamplesDataset, e: PerElectron, affinity: number): EffectiveLead {
  const { A, B } = d.reservoirs;
  if (e.energyA === null || e.energyB === null) return { T_A: null, T_B: null, mu_A: null, mu_B: null };
  const termB = B.beta * (e.energyB - B.mu);
  const termA = A.beta * (e.energyA - A.mu);
  const temperature = (beta: number) => (beta > 0 && Number.isFinite(beta) ? 1 / (BOLTZMANN * beta) : null);
  // A = β_B(ε_B − μ_B) − β_A(ε_A − μ_A), solved for one unknown at a time.
  const betaA = e.energyA !== A.mu ? (termB - affinity) / (e.energyA - A.mu) : NaN;
  const betaB = e.energyB !== B.mu ? (affinity + termA) / (e.energyB - B.mu) : NaN;
  return {
    T_A: temperature(betaA),
    T_B: temperature(betaB),
    mu_A: e.energyA - (termB - affinity) / A.beta,
    mu_B: e.energyB - (affinity + termA) / B.beta,
  };
}
