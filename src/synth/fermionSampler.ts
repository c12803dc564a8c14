import type { Rng } from "../stats/rng.ts";
import type { FermionModes } from "./fermionModel.ts";
import { ProjectionDppSampler } from "./projectionDpp.ts";

/**
 * Exact sampling of the two-point measurement on non-interacting fermions.
 * (1) The grand-canonical state of each isolated reservoir is a product over
 *     its eigenmodes: each mode is occupied independently with its Fermi
 *     weight, so the first measurement outcome is a set S of occupied modes.
 * (2) The Slater determinant of the modes in S evolves to the orbitals
 *     Ũ e_l, l ∈ S (Ũ = exp(−i h τ) in the mode basis).
 * (3) Measuring every mode occupation of a Slater determinant with orbitals
 *     V gives the set Y with probability |det V_Y|²: a projection
 *     determinantal point process (Hough, Krishnapur, Peres & Virág, Probab.
 *     Surveys 3, 206 (2006)). Energies and numbers follow by summation.
 * Measuring every mode occupation is finer than measuring (H_A, H_B, N_A, N_B),
 * and summing over it gives exactly their joint distribution.
 *
 * When more than half the modes are occupied the empty ones are sampled
 * instead: the complement of a projection process with orbitals Ũ_{·S} is the
 * projection process with orbitals Ũ_{·S^c} (Ũ is unitary), of lower rank.
 */
export interface FermionSamples {
  dE_A: Float64Array;
  dE_B: Float64Array;
  dN: Float64Array;
}

export class FermionSampler {
  private readonly dpp: ProjectionDppSampler;
  private readonly v: Float64Array;
  private readonly initial: Uint8Array;
  private readonly final: Uint8Array;
  private readonly columns: Int32Array;

  constructor(
    private readonly modes: FermionModes,
    /** Ũ: row-major n × n real and imaginary parts. */
    private readonly ure: Float64Array,
    private readonly uim: Float64Array,
  ) {
    const n = modes.n;
    const half = Math.ceil(n / 2);
    this.dpp = new ProjectionDppSampler(n, half);
    this.v = new Float64Array(2 * n * half);
    this.initial = new Uint8Array(n);
    this.final = new Uint8Array(n);
    this.columns = new Int32Array(n);
  }

  /** Draw `count` realisations into the arrays from `offset` on. */
  sampleInto(rng: Rng, count: number, out: FermionSamples, offset = 0): void {
    const { modes, ure, uim, v, initial, final, columns } = this;
    const n = modes.n;
    for (let r = 0; r < count; r++) {
      let occupied = 0;
      for (let m = 0; m < n; m++) {
        initial[m] = rng.uniform() < modes.occupation[m] ? 1 : 0;
        occupied += initial[m];
      }
      const complement = occupied > n - occupied;
      const want = complement ? 0 : 1;
      let k = 0;
      for (let m = 0; m < n; m++) if (initial[m] === want) columns[k++] = m;
      for (let j = 0; j < n; j++) {
        const row = j * n;
        const vrow = 2 * j * k;
        for (let c = 0; c < k; c++) {
          v[vrow + 2 * c] = ure[row + columns[c]];
          v[vrow + 2 * c + 1] = uim[row + columns[c]];
        }
      }
      if (k > 0) this.dpp.sample(v, k, rng, final);
      else final.fill(0);
      let eA = 0;
      let eB = 0;
      let nB = 0;
      for (let m = 0; m < n; m++) {
        const after = complement ? 1 - final[m] : final[m];
        const change = after - initial[m];
        if (change === 0) continue;
        if (modes.region[m] === 0) eA += change * modes.energy[m];
        else {
          eB += change * modes.energy[m];
          nB += change;
        }
      }
      out.dE_A[offset + r] = eA;
      out.dE_B[offset + r] = eB;
      out.dN[offset + r] = nB;
    }
  }
}
