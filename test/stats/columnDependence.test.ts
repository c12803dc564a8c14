import { describe, expect, it } from "vitest";
import { columnDependence, identifiableCombinations } from "../../src/stats/columnDependence.ts";
import { fitExchangeLogistic } from "../../src/stats/logisticFit.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

// Columns built by exact construction, so the expected relations are known exactly; tolerances allow for
// floating-point rounding only (1e-12 relative: a few hundred units of rounding over 10^3 rows).
function counts(seed: string, n: number): Float64Array {
  const rng = rngFromText(seed);
  return Float64Array.from({ length: n }, () => Math.round(4 * rng.normal()));
}

describe("columnDependence", () => {
  it("writes Q = 0.9 ΔN as a combination of ΔN and keeps ΔN as the basis when it is preferred", () => {
    const dN = counts("dep:q", 1000);
    const Q = Float64Array.from(dN, (n) => 0.9 * n);
    const dep = columnDependence([Q, dN], null, { order: [1, 0] });
    expect(dep.basis).toEqual([1]);
    expect(dep.dependent.map((k) => k.index)).toEqual([0]);
    expectClose(dep.dependent[0].coefficients[0], 0.9, { rtol: 1e-12, source: "construction Q = 0.9 ΔN (exact)" });
    expect(dep.dependent[0].residual).toBeLessThan(1e-14);
    // θ·z = a_Q Q + a_N ΔN = (0.9 a_Q + a_N) ΔN: the identifiable coefficient of ΔN (exact algebra).
    const [phi] = identifiableCombinations(dep, [2, 0.5]);
    expectClose(phi, 0.9 * 2 + 0.5, { rtol: 1e-12, source: "0.9·a_Q + a_N (exact)" });
  });

  it("finds a zero column, a two-term relation, and the same answer for rows and their histogram", () => {
    const n = 1000;
    const rng = rngFromText("dep:three");
    const dN = counts("dep:three:n", n);
    const Q = Float64Array.from({ length: n }, () => rng.normal());
    const W = Float64Array.from(dN, (v, i) => 2 * v - 0.5 * Q[i]);
    const zero = new Float64Array(n);
    const dep = columnDependence([W, Q, dN, zero], null, { order: [2, 1, 0, 3] });
    expect(dep.basis).toEqual([2, 1]);
    const w = dep.dependent.find((k) => k.index === 0)!;
    expectClose(w.coefficients[0], 2, { rtol: 1e-12, source: "construction W = 2ΔN − 0.5Q (exact)" });
    expectClose(w.coefficients[1], -0.5, { rtol: 1e-12, source: "construction W = 2ΔN − 0.5Q (exact)" });
    expect(dep.dependent.find((k) => k.index === 3)).toEqual({ index: 3, coefficients: [0, 0], residual: 0 });
    // Weights are multiplicities: rows (1, 2) with weight 3 and (−1, −2) with weight 1 equal the four raw rows.
    const hist = columnDependence([Float64Array.of(1, -1), Float64Array.of(2, -2)], Float64Array.of(3, 1));
    expect(hist.basis).toEqual([0]);
    expectClose(hist.dependent[0].coefficients[0], 2, { rtol: 1e-14, source: "second column = 2 × first (exact)" });
  });

  it("keeps a column that departs from the span by more than the tolerance", () => {
    // Q = 0.9 ΔN + 1e−3 · (independent noise): relative residual about 1e−3·σ/(0.9·rms ΔN), far above 1e−6.
    const dN = counts("dep:near", 1000);
    const rng = rngFromText("dep:near:noise");
    const Q = Float64Array.from(dN, (v) => 0.9 * v + 1e-3 * rng.normal());
    const dep = columnDependence([Q, dN], null, { order: [1, 0] });
    expect(dep.basis).toEqual([1, 0]);
    expect(dep.dependent).toEqual([]);
  });
});

describe("fitExchangeLogistic on dependent columns", () => {
  it("names exact dependence and, fitted on the basis, recovers the combination", () => {
    // ΔN on ±1, ±2 with multiplicities giving ln P(n)/P(−n) = n ln 2 exactly: weights 2:1 at ±1 and 4:1 at ±2.
    const dN = Float64Array.of(1, -1, 2, -2);
    const weight = Float64Array.of(2, 1, 4, 1);
    const Q = Float64Array.from(dN, (n) => 0.9 * n);
    const full = fitExchangeLogistic([Q, dN], weight);
    expect(full.status).toBe("degenerate");
    expect(full.message).toBe("the features are linearly dependent (the information matrix is singular), so the coefficients are not identified separately");
    const reduced = fitExchangeLogistic([dN], weight);
    // θ = ln 2 solves the score equation Σ w (1 − σ(θn)) n = 0: 2·(1/3) − 1·(2/3) = 0 at n = ±1 and
    // 4·(1/5)·2 − 1·(4/5)·2 = 0 at n = ±2 (σ(ln 2) = 2/3, σ(2 ln 2) = 4/5; exact). rtol 1e-7: Newton stops at λ²/2 < 1e-8.
    expectClose(reduced.coefficients[0], Math.LN2, { rtol: 1e-7, source: "closed form ln 2 (exact)" });
  });
});
