import type { Affinities } from "./affinities.ts";

/**
 * Entropy production of each realisation in units of k_B:
 *   Sigma = beta_A (dE_A − mu_A dN_A) + beta_B (dE_B − mu_B dN_B)
 *         = beta_bar W + a_Q Q + a_N dN,
 * with W = dE_A + dE_B, Q = (dE_B − dE_A)/2, dN_B = −dN_A = dN
 * (Andrieux et al., New J. Phys. 11, 043014 (2009); Campisi, Hänggi & Talkner,
 * Rev. Mod. Phys. 83, 771 (2011)). Energies in J, affinities in SI.
 */
export function entropyProduction(a: Affinities, W: Float64Array, Q: Float64Array, dN: Float64Array): Float64Array {
  const n = Q.length;
  const sigma = new Float64Array(n);
  for (let i = 0; i < n; i++) sigma[i] = a.beta_bar * W[i] + a.a_Q * Q[i] + a.a_N * dN[i];
  return sigma;
}
