/**
 * Tight-binding lattices for the finite reservoirs: open chains, rings and
 * open rectangular grids with nearest-neighbour hopping −J and a uniform
 * on-site energy (the textbook model of e.g. Ashcroft & Mermin, Solid State
 * Physics (1976), ch. 10). Energies are in the model's energy unit.
 */
export type LatticeKind = "chain" | "ring" | "grid";

export interface LatticeSpec {
  kind: LatticeKind;
  /** Sites along the transport direction (chain, ring) or grid length. */
  length: number;
  /** Grid width (rows); 1 for chains and rings. */
  width: number;
  /** Hopping amplitude J > 0; the matrix element is −J. */
  hopping: number;
  /** On-site energy of every site. */
  onsite: number;
}

export interface Lattice {
  spec: LatticeSpec;
  sites: number;
  /** Real symmetric single-particle Hamiltonian, row-major sites × sites. */
  hamiltonian: Float64Array;
  /**
   * Sites facing the other reservoir, in the order contact bonds use them:
   * for a reservoir on the left ("A") the last column, on the right ("B") the first.
   */
  facing(side: "A" | "B"): number[];
}

/** Site index of grid point (x, y): x along the transport direction, y across it. */
const gridSite = (x: number, y: number, width: number) => x * width + y;

export function latticeSites(spec: LatticeSpec): number {
  return spec.kind === "grid" ? spec.length * spec.width : spec.length;
}

export function buildLattice(spec: LatticeSpec): Lattice {
  const { kind, length, width, hopping, onsite } = spec;
  if (!(Number.isInteger(length) && length >= 1)) throw new RangeError(`lattice length must be a whole number ≥ 1, got ${length}`);
  if (kind === "ring" && length < 3) throw new RangeError(`a ring needs at least 3 sites, got ${length}`);
  if (!(Number.isInteger(width) && width >= 1)) throw new RangeError(`lattice width must be a whole number ≥ 1, got ${width}`);
  if (kind !== "grid" && width !== 1) throw new RangeError(`a ${kind} has width 1, got ${width}`);
  const n = latticeSites(spec);
  const h = new Float64Array(n * n);
  const bond = (i: number, j: number) => {
    h[i * n + j] = -hopping;
    h[j * n + i] = -hopping;
  };
  for (let i = 0; i < n; i++) h[i * n + i] = onsite;
  if (kind === "grid") {
    for (let x = 0; x < length; x++) {
      for (let y = 0; y < width; y++) {
        if (x + 1 < length) bond(gridSite(x, y, width), gridSite(x + 1, y, width));
        if (y + 1 < width) bond(gridSite(x, y, width), gridSite(x, y + 1, width));
      }
    }
  } else {
    for (let i = 0; i + 1 < length; i++) bond(i, i + 1);
    if (kind === "ring") bond(length - 1, 0);
  }
  return {
    spec,
    sites: n,
    hamiltonian: h,
    facing(side) {
      if (kind === "grid") {
        const x = side === "A" ? length - 1 : 0;
        return Array.from({ length: width }, (_, y) => gridSite(x, y, width));
      }
      if (kind === "ring") return Array.from({ length }, (_, i) => i);
      // An open chain faces the other reservoir with its end: the last sites for A, the first for B.
      return Array.from({ length }, (_, i) => (side === "A" ? length - 1 - i : i));
    },
  };
}
