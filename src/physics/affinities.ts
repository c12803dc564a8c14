import { BOLTZMANN } from "./constants.ts";

/** A reservoir's grand-canonical state in SI: beta in 1/J, mu in J, T in K. */
export interface ReservoirState {
  T: number;
  beta: number;
  mu: number;
}

/**
 * Affinities conjugate to the exchanged energy and particles, with
 * A and B the two reservoirs and dN counted as particles gained by B:
 *   a_Q = beta_B − beta_A          (1/J; positive when A is hotter)
 *   a_N = beta_A mu_A − beta_B mu_B (dimensionless; positive when particles are pushed A → B)
 *   beta_bar = (beta_A + beta_B)/2 (1/J)
 * Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11, 043014 (2009).
 */
export interface Affinities {
  a_Q: number;
  a_N: number;
  beta_bar: number;
}

export function reservoirFromTemperature(T: number, mu: number): ReservoirState {
  return { T, beta: 1 / (BOLTZMANN * T), mu };
}

export function reservoirFromBeta(beta: number, mu: number): ReservoirState {
  return { T: 1 / (BOLTZMANN * beta), beta, mu };
}

export function affinities(A: ReservoirState, B: ReservoirState): Affinities {
  return {
    a_Q: B.beta - A.beta,
    a_N: A.beta * A.mu - B.beta * B.mu,
    beta_bar: (A.beta + B.beta) / 2,
  };
}

/** Coefficients of ln P(z)/P(−z) = beta_bar W + a_Q Q + a_N dN fitted from data (null: channel not fitted). */
export interface FittedAffinities {
  beta_bar: number | null;
  a_Q: number | null;
  a_N: number | null;
}
