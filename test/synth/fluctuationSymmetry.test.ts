import { describe, expect, it } from "vitest";
import { entropyGeneratingFunction } from "../../src/synth/particleCounting.ts";
import type { FermionSystem } from "../../src/synth/fermionModel.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { bruteForceOutcomes, chain, grid, ring, system } from "./fermionFixtures.ts";

const thermo = { betaA: 1.1, muA: 0.5, betaB: 2, muB: -0.2 };

/** x_m = β_X(ε_m − μ_X): the entropy a particle in mode m carries into its reservoir. */
function entropyWeights(sys: FermionSystem): Float64Array {
  return Float64Array.from(sys.energy, (e, m) => (sys.region[m] === 0 ? thermo.betaA * (e - thermo.muA) : thermo.betaB * (e - thermo.muB)));
}

describe("exchange fluctuation relation of the fermion model (exact, no sampling)", () => {
  it("the determinant formula for ⟨e^{−sΣ}⟩ equals the enumerated average (exact algebra)", () => {
    const sys = system(chain(2), ring(3), { strength: 0.6, bonds: 2, flux: 0.9 }, thermo);
    const u = sys.propagator.at(1.7);
    const sigma = (o: { dE_A: number; dE_B: number; dN: number }) =>
      thermo.betaA * (o.dE_A + thermo.muA * o.dN) + thermo.betaB * (o.dE_B - thermo.muB * o.dN);
    for (const s of [0.3, 1, -0.4]) {
      const brute = bruteForceOutcomes(sys, u).reduce((acc, o) => acc + o.p * Math.exp(-s * sigma(o)), 0);
      expectClose(entropyGeneratingFunction(sys, u, entropyWeights(sys), s), brute, { rtol: 1e-11, source: "enumeration of all Fock states" });
    }
  });

  for (const [name, build] of [
    ["chain 9 + chain 7", () => system(chain(9), chain(7, 0.8, 0.1), { strength: 0.5 }, thermo)],
    ["grid 3x3 + ring 6, two bonds", () => system(grid(3, 3), ring(6), { strength: 0.7, bonds: 2 }, thermo)],
  ] as const) {
    it(`${name}: ⟨e^{−sΣ}⟩ = ⟨e^{−(1−s)Σ}⟩ and ⟨e^{−Σ}⟩ = 1 at every contact time`, () => {
      const sys = build();
      const x = entropyWeights(sys);
      for (const t of [0.8, 4, 15]) {
        const u = sys.propagator.at(t);
        // Andrieux, Gaspard, Monnai & Tasaki, NJP 11, 043014 (2009): exact for a time-reversal symmetric protocol.
        expectClose(entropyGeneratingFunction(sys, u, x, 1), 1, { atol: 1e-11, source: "integral fluctuation relation" });
        for (const s of [0.2, 0.35, -0.3]) {
          expectClose(entropyGeneratingFunction(sys, u, x, s), entropyGeneratingFunction(sys, u, x, 1 - s), { rtol: 1e-10, source: "detailed exchange fluctuation relation" });
        }
      }
    });
  }

  it("with a Peierls phase the symmetry pairs the field with the reversed field (Saito & Utsumi, PRB 78, 115429 (2008))", () => {
    const plus = system(chain(6), ring(5), { strength: 0.7, bonds: 2, flux: 1.2 }, thermo);
    const minus = system(chain(6), ring(5), { strength: 0.7, bonds: 2, flux: -1.2 }, thermo);
    const x = entropyWeights(plus);
    const t = 3;
    const up = plus.propagator.at(t);
    const down = minus.propagator.at(t);
    expectClose(entropyGeneratingFunction(plus, up, x, 1), 1, { atol: 1e-11, source: "integral relation holds with a field" });
    for (const s of [0.25, -0.3]) {
      expectClose(entropyGeneratingFunction(plus, up, x, s), entropyGeneratingFunction(minus, down, x, 1 - s), { rtol: 1e-10, source: "relation between B and −B" });
      // At the same field the symmetry is broken: one dataset at B ≠ 0 cannot test the detailed relation.
      expect(Math.abs(entropyGeneratingFunction(plus, up, x, s) - entropyGeneratingFunction(plus, up, x, 1 - s))).toBeGreaterThan(1e-4);
    }
  });
});
