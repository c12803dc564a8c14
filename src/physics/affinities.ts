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

/**
 * Reservoir temperatures and bias that the fitted coefficients imply, for
 * reading a departure as "the data behave as if T were …".
 * - beta_bar and a_Q both fitted: beta_A = beta_bar − a_Q/2, beta_B = beta_bar + a_Q/2.
 * - a_Q alone: each reservoir's temperature with the other held at its declared value.
 * - the bias: mu_A − mu_B from a_N = beta_A mu_A − beta_B mu_B with mu_B held
 *   at its declared value and the betas as above;
 * - particle counting at equal declared temperatures, mu_A ≠ mu_B:
 *   T_particles = (mu_A − mu_B)/(k_B a_N), the temperature the counting
 *   statistics show (cf. Utsumi et al., Phys. Rev. B 81, 125331 (2010)).
 * Temperatures are null where the implied beta is not positive.
 */
export interface EffectiveReservoirs {
  T_A: number | null;
  T_B: number | null;
  /** How T_A, T_B were obtained. */
  basis: "both-fitted" | "other-held-at-declared" | "declared";
  delta_mu: number | null; // J
  T_particles: number | null; // K
}

const temperatureOf = (beta: number): number | null => (beta > 0 && Number.isFinite(beta) ? 1 / (BOLTZMANN * beta) : null);

export function effectiveReservoirs(A: ReservoirState, B: ReservoirState, fit: FittedAffinities): EffectiveReservoirs {
  let betaA = A.beta;
  let betaB = B.beta;
  let T_A: number | null = A.T;
  let T_B: number | null = B.T;
  let basis: EffectiveReservoirs["basis"] = "declared";
  if (fit.a_Q !== null && fit.beta_bar !== null) {
    betaA = fit.beta_bar - fit.a_Q / 2;
    betaB = fit.beta_bar + fit.a_Q / 2;
    T_A = temperatureOf(betaA);
    T_B = temperatureOf(betaB);
    basis = "both-fitted";
  } else if (fit.a_Q !== null) {
    T_A = temperatureOf(B.beta - fit.a_Q);
    T_B = temperatureOf(A.beta + fit.a_Q);
    basis = "other-held-at-declared";
  }
  let delta_mu: number | null = null;
  let T_particles: number | null = null;
  if (fit.a_N !== null) {
    const bA = basis === "both-fitted" ? betaA : A.beta;
    const bB = basis === "both-fitted" ? betaB : B.beta;
    delta_mu = bA > 0 ? (fit.a_N + bB * B.mu) / bA - B.mu : null;
    const dmu = A.mu - B.mu;
    const equalT = Math.abs(A.beta - B.beta) <= 1e-12 * A.beta;
    if (equalT && dmu !== 0) T_particles = temperatureOf(fit.a_N / dmu);
  }
  return { T_A, T_B, basis, delta_mu, T_particles };
}
