import { describe, it, expect } from "vitest";
import {
  asymmetryX,
  asymmetryY,
  efficiencyAtMaxPowerOverCarnot,
  efficiencyAtMaxPowerOverCarnotXY,
  figureOfMeritZT,
  lorenzNumber,
  maxEfficiencyOverCarnot,
  maxEfficiencyOverCarnotXY,
  onsagerFromThermoelectric,
  onsagerInEntropyUnits,
  onsagerUncertaintyInEntropyUnits,
  powerFactor,
  secondLawBoundH,
  thermalConductanceBound,
  thermoelectricFromOnsager,
} from "../../src/physics/thermoelectric.ts";
import { LORENZ_SOMMERFELD } from "../../src/physics/constants.ts";
import { smallestNormalisedEigenvalue } from "../../src/checks/positivity/positivity.ts";
import { expectClose } from "../helpers/expectClose.ts";

const T = 4.2;
const c = { G: 3.1e-5, S: -42e-6, Pi: -42e-6 * T, K: 2.2e-11 };

describe("Callen form ↔ thermoelectric coefficients", () => {
  it("are inverse to each other both ways (identity)", () => {
    const back = thermoelectricFromOnsager(onsagerFromThermoelectric(c, T), T);
    for (const k of ["G", "S", "Pi", "K"] as const) expectClose(back[k], c[k], { rtol: 1e-12, source: "identity: conversion there and back" });
    const L = [[2.0e-4, 3.0e-9], [2.5e-9, 7.0e-13]];
    const again = onsagerFromThermoelectric(thermoelectricFromOnsager(L, T), T);
    for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) expectClose(again[i][j], L[i][j], { rtol: 1e-12, source: "identity: conversion there and back" });
  });

  it("gives a symmetric matrix exactly when the Kelvin relation Π = T S holds (constructed symmetric set)", () => {
    // L12 = G S T², L21 = G Π T: equal iff Π = T S (Onsager 1931 reciprocity ⇔ Kelvin's second relation).
    const L = onsagerFromThermoelectric(c, T);
    expectClose(L[0][1], L[1][0], { rtol: 1e-15, source: "exact: L12 = L21 when Π = T S" });
    expectClose(asymmetryX(L), 1, { rtol: 1e-15, source: "x = L12/L21 = S T/Π = 1 under Kelvin" });
  });

  it("reduces y to ZT when x = 1 (Benenti, Saito & Casati, PRL 106, 230602 (2011))", () => {
    const L = onsagerFromThermoelectric(c, T);
    expectClose(asymmetryY(L), figureOfMeritZT(c, T), { rtol: 1e-12, source: "exact: y = GSΠ/K = G S² T/K at Π = T S" });
  });

  it("has a thermal-conductance bound that is zero under Kelvin and equals G(S T − Π)²/(4T) otherwise", () => {
    expectClose(thermalConductanceBound(onsagerFromThermoelectric(c, T), T), 0, { atol: 1e-40, source: "exact: L12 = L21" });
    const broken = { ...c, Pi: 0.5 * c.Pi };
    const expected = (broken.G * (broken.S * T - broken.Pi) ** 2) / (4 * T); // algebra: (L12 − L21)² = G²T²(ST − Π)²
    expectClose(thermalConductanceBound(onsagerFromThermoelectric(broken, T), T), expected, { rtol: 1e-12, source: "exact algebra" });
  });
});

describe("figures of merit", () => {
  it("gives ZT = 0.800 for |S| = 200 µV/K, σ = 1e5 S/m, κ = 1.5 W/m K at 300 K (typical Bi2Te3, computed)", () => {
    // Geometry cancels in ZT: use a unit cube, G = σ·1 m, K = κ·1 m.
    const bi2te3 = { G: 1e5, S: 200e-6, Pi: 200e-6 * 300, K: 1.5 };
    expectClose(figureOfMeritZT(bi2te3, 300), 0.8, { rtol: 1e-12, source: "computed from typical Bi2Te3 values (Snyder & Toberer, Nat. Mater. 7, 105 (2008), order of magnitude)" });
    expectClose(powerFactor(bi2te3), 4e-3, { rtol: 1e-12, source: "S²σ = (2e-4)²·1e5" });
  });

  it("has η_max/η_C = 0.171573 at ZT = 1 and 0.267949 at ZT = 2 (linear response)", () => {
    // (√2 − 1)/(√2 + 1) = 3 − 2√2 and (√3 − 1)/(√3 + 1) = 2 − √3, exactly.
    expectClose(maxEfficiencyOverCarnot(1), 3 - 2 * Math.SQRT2, { rtol: 1e-14, source: "exact: 3 − 2√2 = 0.171573" });
    expectClose(maxEfficiencyOverCarnot(2), 2 - Math.sqrt(3), { rtol: 1e-14, source: "exact: 2 − √3 = 0.267949" });
  });

  it("has efficiency at maximum power η_C/6 at ZT = 1 and → η_C/2 as ZT → ∞ (Van den Broeck, PRL 95, 190602 (2005))", () => {
    expectClose(efficiencyAtMaxPowerOverCarnot(1), 1 / 6, { rtol: 1e-15, source: "exact: ZT/(2(ZT+2)) at ZT = 1" });
    expectClose(efficiencyAtMaxPowerOverCarnot(1e12), 0.5, { rtol: 1e-11, source: "limit ZT → ∞" });
  });

  it("reaches the Benenti–Saito–Casati bounds at y = h(x): x = 0.5 → 0.25 and 0.2; x = 2 → 1 and 0.8; h(−2) = −8/9", () => {
    // η_max/η_C ≤ x² (|x| < 1) or 1 (|x| ≥ 1); η(P_max)/η_C ≤ x²/(1 + x²); equality at the window edge y = h(x).
    expectClose(secondLawBoundH(0.5), 8, { rtol: 1e-15, source: "h(x) = 4x/(x−1)², BSC 2011" });
    expectClose(maxEfficiencyOverCarnotXY(0.5, 8), 0.25, { rtol: 1e-15, source: "BSC 2011 bound x² at x = 0.5" });
    expectClose(efficiencyAtMaxPowerOverCarnotXY(0.5, 8), 0.2, { rtol: 1e-15, source: "BSC 2011 bound x²/(1+x²) at x = 0.5" });
    expectClose(secondLawBoundH(2), 8, { rtol: 1e-15, source: "h(2) = 8" });
    expectClose(maxEfficiencyOverCarnotXY(2, 8), 1, { rtol: 1e-15, source: "BSC 2011 bound 1 for |x| ≥ 1" });
    expectClose(efficiencyAtMaxPowerOverCarnotXY(2, 8), 0.8, { rtol: 1e-15, source: "BSC 2011 bound x²/(1+x²) = 0.8 at x = 2" });
    expectClose(secondLawBoundH(-2), -8 / 9, { rtol: 1e-15, source: "h(−2) = −0.888889" });
  });

  it("gives the Sommerfeld value for a Wiedemann–Franz conductor", () => {
    // K = L0 G T ⇒ K/(G T) = L0 = 2.443004509073666e-8 W Ω K⁻² (computed from CODATA 2018 exact k_B and e).
    const wf = { G: 7.748091729863651e-5, S: 0, Pi: 0, K: LORENZ_SOMMERFELD * 7.748091729863651e-5 * 1.0 };
    expectClose(lorenzNumber(wf, 1.0), 2.443004509073666e-8, { rtol: 1e-14, source: "CODATA 2018 (Tiesinga et al., RMP 93, 025010 (2021)): (π²/3)(k_B/e)²" });
  });

  it("refuses a matrix that is not 2×2", () => {
    expect(() => thermoelectricFromOnsager([[1, 0, 0], [0, 1, 0], [0, 0, 1]], 1)).toThrow("thermoelectric coefficients need a 2×2 Onsager matrix, got 3×3");
  });
});

describe("Callen's matrix in entropy units, N = D L D with D = diag(k_B/e, 1/T)", () => {
  // k_B and e are exact in the SI since 2019 (SI Brochure, 9th ed.; CODATA 2018).
  const kOverE = 1.380649e-23 / 1.602176634e-19;

  it("gives a Wiedemann–Franz conductor N11/N22 = 3/π² (Sommerfeld: K = L0 G T with L0 = π² k_B²/(3e²))", () => {
    // With S = Π = 0 (particle–hole symmetric), N11 = (k_B/e)² G T and N22 = K = L0 G T, so the ratio is
    // (k_B/e)²/L0 = 3/π² exactly (the Sommerfeld value of L0: Ashcroft & Mermin, Solid State Physics (1976), ch. 2).
    const G = 7.75e-5; // about e²/h × 2, a single spin-degenerate channel (any value gives the same ratio)
    const Tw = 0.35;
    const L = onsagerFromThermoelectric({ G, S: 0, Pi: 0, K: LORENZ_SOMMERFELD * G * Tw }, Tw);
    const N = onsagerInEntropyUnits(L, Tw);
    expectClose(N[0][0] / N[1][1], 3 / Math.PI ** 2, { rtol: 1e-13, source: "exact: (k_B/e)²/L0 = 3/π²" });
    expectClose(N[0][0], kOverE ** 2 * G * Tw, { rtol: 1e-14, source: "definition: N11 = (k_B/e)² G T" });
    expect(N[0][1]).toBe(0);
    expect(N[1][0]).toBe(0);
  });

  it("writes every entry in W/K from G, S, Π, K as N12 = (k_B/e) G S T, N21 = (k_B/e) G Π, N22 = K + G S Π (algebra)", () => {
    const N = onsagerInEntropyUnits(onsagerFromThermoelectric(c, T), T);
    expectClose(N[0][1], kOverE * c.G * c.S * T, { rtol: 1e-13, source: "algebra: (k_B/e)(1/T) G S T²" });
    expectClose(N[1][0], kOverE * c.G * c.Pi, { rtol: 1e-13, source: "algebra: (k_B/e)(1/T) G Π T" });
    expectClose(N[1][1], c.K + c.G * c.S * c.Pi, { rtol: 1e-13, source: "algebra: T²(K + G S Π)/T²" });
  });

  it("gives the same entropy production for the same forces, Xᵀ L X = xᵀ N x (exact change of variables)", () => {
    const L = [[2.0e-4, 3.0e-9], [2.5e-9, 7.0e-13]];
    const dV = 3.0e-6; // V
    const dT = 0.02; // K
    const X = [dV / T, dT / (T * T)]; // Callen's forces
    const x = [dV / (kOverE * T), dT / T]; // e ΔV/(k_B T) and ΔT/T
    const N = onsagerInEntropyUnits(L, T);
    const quad = (M: number[][], v: number[]) => v[0] * (M[0][0] * v[0] + M[0][1] * v[1]) + v[1] * (M[1][0] * v[0] + M[1][1] * v[1]);
    expectClose(quad(N, x), quad(L, X), { rtol: 1e-13, source: "exact: X = D x, so Xᵀ L X = xᵀ D L D x" });
  });

  it("keeps reciprocity and positivity exactly: N12 = N21 iff L12 = L21, N positive semi-definite iff L is (congruence; Sylvester's law of inertia)", () => {
    const symmetric = onsagerInEntropyUnits(onsagerFromThermoelectric({ ...c, Pi: c.S * T }, T), T);
    expectClose(symmetric[0][1], symmetric[1][0], { rtol: 1e-14, source: "exact: D L D is symmetric when L is" });
    // An indefinite L (det of the symmetric part < 0) stays indefinite: the signs of the eigenvalues are kept.
    const indefinite = [[1e-4, 5e-8], [5e-8, 1e-11]];
    expect(indefinite[0][0] * indefinite[1][1] - indefinite[0][1] ** 2).toBeLessThan(0);
    const n = onsagerInEntropyUnits(indefinite, T);
    expect(n[0][0] * n[1][1] - n[0][1] * n[1][0]).toBeLessThan(0);
    expect(smallestNormalisedEigenvalue(n)).toBeCloseTo(smallestNormalisedEigenvalue(indefinite), 12);
  });

  it("scales standard uncertainties by the same exact factors, and refuses what it cannot transform", () => {
    const uN = onsagerUncertaintyInEntropyUnits([[1e-6, 2e-11], [3e-11, 4e-15]], T);
    expectClose(uN[0][0], kOverE ** 2 * 1e-6, { rtol: 1e-14, source: "exact: D11² u(L11)" });
    expectClose(uN[1][1], 4e-15 / (T * T), { rtol: 1e-14, source: "exact: D22² u(L22)" });
    expect(() => onsagerInEntropyUnits([[1, 0, 0], [0, 1, 0], [0, 0, 1]], T)).toThrow(/2×2 charge–heat matrix, got 3×3/);
    expect(() => onsagerInEntropyUnits([[1, 0], [0, 1]], 0)).toThrow(/positive, finite temperature, got T = 0 K/);
  });
});
