/**
 * Linear-response coefficients of a two-terminal conductor in Callen's
 * charge–heat form and their thermoelectric equivalents.
 *
 * Callen, Phys. Rev. 73, 1349 (1948); H. B. Callen, Thermodynamics and an
 * Introduction to Thermostatistics, 2nd ed. (Wiley 1985), ch. 14:
 *
 *     I   = L11 ΔV/T + L12 ΔT/T²
 *     J_Q = L21 ΔV/T + L22 ΔT/T²
 *
 * with G = L11/T, S = L12/(T L11), Π = L21/L11, K = det L/(T² L11) and back
 * L11 = G T, L12 = G S T², L21 = G Π T, L22 = T²(K + G S Π).
 * All quantities SI: G in S, S in V/K, Π in V, K in W/K, T in K.
 */
import { determinant } from "../linalg/determinant.ts";
import { BOLTZMANN, ELEMENTARY_CHARGE } from "./constants.ts";
import type { Matrix } from "../linalg/matrix.ts";

/**
 * The sign convention, in words, for the report. Both currents count positive
 * from terminal 1 into terminal 2; ΔV = V₁ − V₂ and ΔT = T₁ − T₂ are the
 * differences that drive them.
 */
export const SIGN_CONVENTION =
  "Currents count positive from terminal 1 into terminal 2: I is the charge current, J_Q the heat current. " +
  "The forces are ΔV/T and ΔT/T² with ΔV = V₁ − V₂ and ΔT = T₁ − T₂, so I = L11 ΔV/T + L12 ΔT/T² and J_Q = L21 ΔV/T + L22 ΔT/T² " +
  "(Callen's charge–heat form). Then G = (I/ΔV) at ΔT = 0; S = −(ΔV/ΔT) at I = 0, negative when electrons carry the current; " +
  "Π = (J_Q/I) at ΔT = 0; K = (J_Q/ΔT) at I = 0, the thermal conductance with the circuit open.";

export interface ThermoelectricCoefficients {
  G: number; // S
  S: number; // V/K
  Pi: number; // V
  K: number; // W/K
}

/** Callen's matrix from G, S, Π, K at temperature T. */
export function onsagerFromThermoelectric(c: ThermoelectricCoefficients, T: number): Matrix {
  const { G, S, Pi, K } = c;
  return [
    [G * T, G * S * T * T],
    [G * Pi * T, T * T * (K + G * S * Pi)],
  ];
}

/** G, S, Π, K from Callen's 2×2 matrix at temperature T. */
export function thermoelectricFromOnsager(L: readonly (readonly number[])[], T: number): ThermoelectricCoefficients {
  if (L.length !== 2 || L[0].length !== 2 || L[1].length !== 2) throw new RangeError(`thermoelectric coefficients need a 2×2 Onsager matrix, got ${L.length}×${L[0]?.length ?? 0}`);
  const L11 = L[0][0];
  return { G: L11 / T, S: L[0][1] / (T * L11), Pi: L[1][0] / L11, K: determinant(L) / (T * T * L11) };
}

/**
 * Device figure of merit ZT = G S² T / K (Ioffe's z for a device: the
 * conductances replace the conductivities).
 */
export function figureOfMeritZT(c: ThermoelectricCoefficients, T: number): number {
  return (c.G * c.S * c.S * T) / c.K;
}

/** Power factor G S², W/K². */
export function powerFactor(c: ThermoelectricCoefficients): number {
  return c.G * c.S * c.S;
}

/**
 * Maximum efficiency relative to Carnot in linear response with time-reversal
 * symmetry: (√(1+ZT) − 1)/(√(1+ZT) + 1) (Ioffe 1957; e.g. Benenti, Saito &
 * Casati, PRL 106, 230602 (2011), eq. for x = 1).
 */
export function maxEfficiencyOverCarnot(zt: number): number {
  const r = Math.sqrt(1 + zt);
  return (r - 1) / (r + 1);
}

/**
 * Efficiency at maximum power relative to Carnot in linear response:
 * ZT/(2(ZT + 2)) (Van den Broeck, PRL 95, 190602 (2005)); tends to 1/2 as ZT → ∞.
 */
export function efficiencyAtMaxPowerOverCarnot(zt: number): number {
  return zt / (2 * (zt + 2));
}

/** Benenti–Saito–Casati asymmetry x = L12/L21 (= S T/Π). */
export function asymmetryX(L: readonly (readonly number[])[]): number {
  return L[0][1] / L[1][0];
}

/** Benenti–Saito–Casati y = L12 L21 / det L (= G S Π / K; equals ZT when x = 1). */
export function asymmetryY(L: readonly (readonly number[])[]): number {
  return (L[0][1] * L[1][0]) / determinant(L);
}

/**
 * Maximum efficiency over Carnot with broken time reversal,
 * x (√(y+1) − 1)/(√(y+1) + 1) (Benenti, Saito & Casati, PRL 106, 230602 (2011)).
 */
export function maxEfficiencyOverCarnotXY(x: number, y: number): number {
  const r = Math.sqrt(y + 1);
  return (x * (r - 1)) / (r + 1);
}

/** Efficiency at maximum power over Carnot, (1/2) x y/(2 + y) (same source). */
export function efficiencyAtMaxPowerOverCarnotXY(x: number, y: number): number {
  return (x * y) / (2 * (2 + y));
}

/**
 * Second-law window for y at given x (same source): h(x) = 4x/(x − 1)²;
 * 0 ≤ y ≤ h(x) for x > 0 and h(x) ≤ y ≤ 0 for x < 0.
 */
export function secondLawBoundH(x: number): number {
  return (4 * x) / ((x - 1) * (x - 1));
}

/**
 * The broken-time-reversal bound on the thermal conductance from positivity
 * of the symmetric part of L: K ≥ (L12 − L21)²/(4 G T³). det of the symmetric
 * part equals det L − (L12 − L21)²/4 = T³ G K − (L12 − L21)²/4.
 */
export function thermalConductanceBound(L: readonly (readonly number[])[], T: number): number {
  const d = L[0][1] - L[1][0];
  const G = L[0][0] / T;
  return (d * d) / (4 * G * T * T * T);
}

/**
 * Callen's matrix in entropy units: N = D L D with D = diag(k_B/e, 1/T).
 *
 * Why: the entries of L carry different units (S K, A K, W K), so no single
 * SI prefix fits the matrix. Writing the forces as the dimensionless
 * x = (eΔV/(k_B T), ΔT/T) = D⁻¹ X, the conjugate fluxes become the entropy
 * currents ((k_B/e) I, J_Q/T) = D J, and the entropy production is
 * Ṡ = Xᵀ L X = xᵀ N x (Callen, Phys. Rev. 73, 1349 (1948); de Groot & Mazur,
 * Non-Equilibrium Thermodynamics (1962), ch. IV, on the freedom to rescale
 * forces and fluxes). Every entry of N is then in W/K:
 *   N11 = (k_B/e)² G T,  N12 = (k_B/e) G S T,  N21 = (k_B/e) G Π,  N22 = K + G S Π.
 * N is a congruence of L by a positive diagonal matrix, so N12 = N21 exactly
 * when L12 = L21, and N's symmetric part is positive semi-definite exactly
 * when L's is. Only for the 2×2 charge–heat matrix.
 */
export function onsagerInEntropyUnits(L: readonly (readonly number[])[], T: number): Matrix {
  if (L.length !== 2 || L.some((row) => row.length !== 2)) throw new RangeError(`entropy units are defined for the 2×2 charge–heat matrix, got ${L.length}×${L[0]?.length ?? 0}`);
  const D = entropyUnitScales(T);
  return L.map((row, i) => row.map((v, j) => D[i] * D[j] * v));
}

/** Standard uncertainties of N from those of L: each entry scales by the exact D_i D_j (k_B and e exact in the SI, T taken as exact). */
export function onsagerUncertaintyInEntropyUnits(uL: readonly (readonly number[])[], T: number): Matrix {
  return onsagerInEntropyUnits(uL, T);
}

/** D = diag(k_B/e, 1/T), in V/K and 1/K. */
function entropyUnitScales(T: number): [number, number] {
  if (!(T > 0) || !Number.isFinite(T)) throw new RangeError(`entropy units need a positive, finite temperature, got T = ${T} K`);
  return [BOLTZMANN / ELEMENTARY_CHARGE, 1 / T];
}

/** Lorenz ratio K/(G T), W Ω K⁻². */
export function lorenzNumber(c: ThermoelectricCoefficients, T: number): number {
  return c.K / (c.G * T);
}

/**
 * Callen's matrix from one row's inputs in either form: `onsager` rows are the
 * n×n entries in row-major order; `thermoelectric` rows are G, S, Π, K.
 */
export function onsagerFromInputs(form: "onsager" | "thermoelectric", values: readonly number[], T: number, n: number): Matrix {
  if (form === "thermoelectric") return onsagerFromThermoelectric({ G: values[0], S: values[1], Pi: values[2], K: values[3] }, T);
  return Array.from({ length: n }, (_, i) => values.slice(i * n, (i + 1) * n));
}
