import type { ComplexMatrix } from "./complexMatrix.ts";
import { complexZeros } from "./complexMatrix.ts";
import { hermitianEigen } from "./hermitianEigen.ts";
import { buildLattice, type Lattice, type LatticeSpec } from "./lattice.ts";
import { symmetricEigen } from "./symmetricEigen.ts";
import { propagatorIn, type Propagator } from "./timeEvolution.ts";
import { fermiOccupation } from "./fermi.ts";

/**
 * Two finite tight-binding reservoirs A and B of non-interacting spinless
 * fermions joined by contact bonds while the contact is on. Energies in the
 * model's unit, times in ħ per energy unit.
 *
 * The contact Hamiltonian is V = −Σ_j γ (e^{i j φ} c†_{b_j} c_{a_j} + h.c.):
 * bond j joins site a_j of A with site b_j of B. Consecutive bonds close a
 * plaquette with the neighbouring sites of each reservoir, so φ is the
 * Peierls phase 2π Φ/Φ₀ of the flux through each such loop (Peierls,
 * Z. Phys. 80, 763 (1933)); φ ≠ 0 (mod π) breaks time-reversal symmetry.
 */
export interface ContactSpec {
  /** Hopping amplitude γ of each contact bond, energy units. */
  strength: number;
  /** Number of contact bonds (≥ 1). */
  bonds: number;
  /** Peierls phase per contact loop, radians (needs bonds ≥ 2 to matter). */
  flux: number;
}

export interface ReservoirThermo {
  /** Inverse temperature, per energy unit. */
  beta: number;
  /** Chemical potential, energy units. */
  mu: number;
}

export interface FermionSetup {
  A: LatticeSpec;
  B: LatticeSpec;
  contact: ContactSpec;
  thermo: { A: ReservoirThermo; B: ReservoirThermo };
}

/** The model reduced to what sampling and exact moments need, in the basis of the isolated reservoirs' eigenmodes. */
export interface FermionModes {
  /** Number of modes (sites of A plus sites of B). */
  n: number;
  nA: number;
  /** Mode energies: the first nA belong to A, the rest to B. */
  energy: Float64Array;
  /** 0 for a mode of A, 1 for a mode of B. */
  region: Uint8Array;
  /** Initial Fermi occupation of each mode. */
  occupation: Float64Array;
}

export interface FermionSystem extends FermionModes {
  latticeA: Lattice;
  latticeB: Lattice;
  /** Single-particle Hamiltonian with the contact on, site basis (A sites first). */
  hamiltonian: ComplexMatrix;
  /** exp(−i H t) in the mode basis: column l is mode l evolved for a time t, row m the final mode. */
  propagator: Propagator;
}

/** Site-basis Hamiltonian of both reservoirs with the contact on. */
export function contactHamiltonian(latticeA: Lattice, latticeB: Lattice, contact: ContactSpec): ComplexMatrix {
  const nA = latticeA.sites;
  const n = nA + latticeB.sites;
  const h = complexZeros(n, n);
  for (let i = 0; i < nA; i++) for (let j = 0; j < nA; j++) h.re[i * n + j] = latticeA.hamiltonian[i * nA + j];
  const nB = latticeB.sites;
  for (let i = 0; i < nB; i++) for (let j = 0; j < nB; j++) h.re[(nA + i) * n + nA + j] = latticeB.hamiltonian[i * nB + j];
  const facingA = latticeA.facing("A");
  const facingB = latticeB.facing("B");
  if (!(Number.isInteger(contact.bonds) && contact.bonds >= 1)) throw new RangeError(`contact bonds must be a whole number ≥ 1, got ${contact.bonds}`);
  if (contact.bonds > Math.min(facingA.length, facingB.length)) {
    throw new RangeError(`${contact.bonds} contact bonds need as many facing sites, but A offers ${facingA.length} and B ${facingB.length}`);
  }
  for (let j = 0; j < contact.bonds; j++) {
    const a = facingA[j];
    const b = nA + facingB[j];
    const phase = j * contact.flux;
    // <b|V|a> = −γ e^{i j φ}; <a|V|b> is its conjugate.
    h.re[b * n + a] = -contact.strength * Math.cos(phase);
    h.im[b * n + a] = -contact.strength * Math.sin(phase);
    h.re[a * n + b] = -contact.strength * Math.cos(phase);
    h.im[a * n + b] = contact.strength * Math.sin(phase);
  }
  return h;
}

/** Eigenmodes of the isolated reservoirs and the evolution with the contact on. */
export function buildFermionSystem(setup: FermionSetup): FermionSystem {
  const latticeA = buildLattice(setup.A);
  const latticeB = buildLattice(setup.B);
  const nA = latticeA.sites;
  const nB = latticeB.sites;
  const n = nA + nB;
  const eigA = symmetricEigen(latticeA.hamiltonian, nA);
  const eigB = symmetricEigen(latticeB.hamiltonian, nB);
  const energy = new Float64Array(n);
  const region = new Uint8Array(n);
  const occupation = new Float64Array(n);
  const basis = complexZeros(n, n);
  for (let k = 0; k < nA; k++) {
    energy[k] = eigA.values[k];
    occupation[k] = fermiOccupation(energy[k], setup.thermo.A.beta, setup.thermo.A.mu);
    for (let i = 0; i < nA; i++) basis.re[i * n + k] = eigA.vectors[i * nA + k];
  }
  for (let k = 0; k < nB; k++) {
    const m = nA + k;
    energy[m] = eigB.values[k];
    region[m] = 1;
    occupation[m] = fermiOccupation(energy[m], setup.thermo.B.beta, setup.thermo.B.mu);
    for (let i = 0; i < nB; i++) basis.re[(nA + i) * n + m] = eigB.vectors[i * nB + k];
  }
  const hamiltonian = contactHamiltonian(latticeA, latticeB, setup.contact);
  const propagator = propagatorIn(hermitianEigen(hamiltonian), basis);
  return { n, nA, energy, region, occupation, latticeA, latticeB, hamiltonian, propagator };
}
