import type { ComplexMatrix } from "./complexMatrix.ts";
import { complexAdjoint, complexMultiply, complexZeros } from "./complexMatrix.ts";
import type { HermitianEigen } from "./hermitianEigen.ts";

/**
 * Single-particle evolution exp(−i h t) (ħ = 1, t in units of ħ per energy
 * unit) written in a chosen orthonormal basis B: B† exp(−i h t) B =
 * G diag(e^{−i λ_k t}) G† with G = B† W, W the eigenvectors of h. G is
 * computed once, so many contact times cost one product each.
 */
export interface Propagator {
  n: number;
  /** Eigenvalues λ_k of h. */
  values: Float64Array;
  /** G = B† W: the eigenvectors of h in the basis B. */
  G: ComplexMatrix;
  at(t: number): ComplexMatrix;
}

export function propagatorIn(eig: HermitianEigen, basis: ComplexMatrix): Propagator {
  const n = eig.n;
  const G = complexMultiply(basis, eig.vectors, true);
  const Gd = complexAdjoint(G);
  return {
    n,
    values: eig.values,
    G,
    at(t: number): ComplexMatrix {
      // Scale the columns of G by the phases, then multiply by G†.
      const scaled = complexZeros(n, n);
      for (let k = 0; k < n; k++) {
        const c = Math.cos(eig.values[k] * t);
        const s = -Math.sin(eig.values[k] * t);
        for (let i = 0; i < n; i++) {
          const gr = G.re[i * n + k];
          const gi = G.im[i * n + k];
          scaled.re[i * n + k] = gr * c - gi * s;
          scaled.im[i * n + k] = gr * s + gi * c;
        }
      }
      return complexMultiply(scaled, Gd);
    },
  };
}
