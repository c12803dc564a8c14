import { describe, expect, it } from "vitest";
import { meanTransferSeries } from "../../src/synth/meanTransfer.ts";
import { fermiOccupation } from "../../src/synth/fermi.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { chain, system } from "./fermionFixtures.ts";

/**
 * Landauer particle and energy currents (spinless, ħ = 1) between two
 * semi-infinite chains with hopping J and on-site energy 0 whose end sites
 * are joined by a bond γ:
 *   I = (1/2π) ∫ dE T(E) [f_A(E) − f_B(E)],  I_E = (1/2π) ∫ dE E T(E) [f_A − f_B]
 * (Landauer formula; Datta, Electronic Transport in Mesoscopic Systems (CUP 1995), ch. 2–3).
 *
 * Transmission: the surface Green's function of a semi-infinite chain is
 * g(E) = (E − i√(4J² − E²))/(2J²) inside the band; with E = 2J cos k this is
 * g = e^{−ik}/J. For two such surfaces joined by a bond γ, the transmission
 * T = Tr[Γ_A G Γ_B G†] (Datta ch. 3) reduces to the tunnel-junction form with the
 * multiple-reflection denominator (Caroli, Combescot, Nozières & Saint-James,
 * J. Phys. C 4, 916 (1971)):
 *   T = 4 γ² Im g_A Im g_B / |1 − γ² g_A g_B|² = 4 r sin²k / |1 − r e^{−2ik}|²,  r = (γ/J)².
 * Check: γ = J gives T = 4 sin²k / |1 − e^{−2ik}|² = 1, the perfect chain.
 * The integral runs over k ∈ (0, π) with dE = 2J sin k dk (Simpson's rule, 4000 intervals).
 */
function landauerCurrents(J: number, gamma: number, betaA: number, muA: number, betaB: number, muB: number): { I: number; IE: number } {
  const K = 4000;
  const r = (gamma / J) ** 2;
  let I = 0;
  let IE = 0;
  for (let i = 0; i <= K; i++) {
    const k = (Math.PI * i) / K;
    const w = i === 0 || i === K ? 1 : i % 2 ? 4 : 2;
    const E = 2 * J * Math.cos(k);
    const T = (4 * r * Math.sin(k) ** 2) / ((1 - r * Math.cos(2 * k)) ** 2 + (r * Math.sin(2 * k)) ** 2);
    const df = fermiOccupation(E, betaA, muA) - fermiOccupation(E, betaB, muB);
    I += w * 2 * J * Math.sin(k) * T * df;
    IE += w * 2 * J * Math.sin(k) * T * df * E;
  }
  const h = Math.PI / K / 3 / (2 * Math.PI);
  return { I: I * h, IE: IE * h };
}

function slope(ts: number[], ys: number[]): number {
  const mx = ts.reduce((s, x) => s + x, 0) / ts.length;
  const my = ys.reduce((s, y) => s + y, 0) / ys.length;
  let sxy = 0;
  let sxx = 0;
  ts.forEach((t, i) => {
    sxy += (t - mx) * (ys[i] - my);
    sxx += (t - mx) ** 2;
  });
  return sxy / sxx;
}

describe("transfer before the first return from the far end", () => {
  it("the onset of finite-size effects grows in proportion to the smaller reservoir's length (front speed 2J)", () => {
    // Weak contact γ = 0.1 J (common practice for a clean step). The finite system is compared with one whose
    // B is 60 sites longer: they agree to rounding until a signal from the contact has crossed B and come back,
    // a distance of 2(L_B − 1) sites at the largest group velocity 2Ja/ħ, i.e. t_r = (L_B − 1) ħ/J.
    const J = 1;
    const thermo = { betaA: 2, muA: 0.3, betaB: 2, muB: -0.3 };
    const lengths = [12, 20, 28];
    const onsets: number[] = [];
    for (const L of lengths) {
      const finite = meanTransferSeries(...pair(system(chain(2 * L, J), chain(L, J), { strength: 0.1 }, thermo)));
      const longer = meanTransferSeries(...pair(system(chain(2 * L, J), chain(L + 60, J), { strength: 0.1 }, thermo)));
      let onset = NaN;
      for (let t = 0.5; t < 3 * L; t += 0.25) {
        // Threshold 1e-6 particles: 1e-4 of the mean transfer at that time, far above the 1e-13 rounding floor.
        if (Math.abs(finite(t).dN - longer(t).dN) > 1e-6) {
          onset = t;
          break;
        }
      }
      // Nothing arrives before the fastest signal's round trip (Lieb–Robinson bound; Lieb & Robinson,
      // Commun. Math. Phys. 28, 251 (1972)); the lattice front's Airy tail makes the visible onset a little later.
      expect(onset).toBeGreaterThan(L - 1 - 1);
      expect(onset).toBeLessThan(L - 1 + 5);
      onsets.push(onset);
    }
    // Onset against length: slope 1/J per site (2 sites per round trip at speed 2J); 10 % covers the
    // slowly growing width of the front (∝ t^{1/3}) between the shortest and longest reservoir.
    expectClose(slope(lengths, onsets), 1 / J, { rtol: 0.1, source: "round trip 2(L−1) sites at group velocity 2Ja/ħ" });
  });

  it("in the window before the return, the mean particle current equals the Landauer current of semi-infinite chains", () => {
    const J = 1;
    const gamma = 0.5;
    const t = { betaA: 2, muA: 0.3, betaB: 2, muB: -0.3 };
    const series = meanTransferSeries(...pair(system(chain(70, J), chain(60, J), { strength: gamma }, t)));
    const ts: number[] = [];
    for (let x = 15; x <= 50; x += 1) ts.push(x); // after the switch-on transient, before t_r = 59
    const I = slope(ts, ts.map((x) => series(x).dN));
    // rtol 1e-3: the finite chains look semi-infinite before the return; what remains is the decaying
    // switch-on transient and level discreteness (observed ~2e-5 with 120 + 100 sites).
    expectClose(I, landauerCurrents(J, gamma, t.betaA, t.muA, t.betaB, t.muB).I, { rtol: 1e-3, source: "Landauer formula (Datta 1995) with the transmission derived above" });
  });

  it("with a temperature difference, the mean energy current into B equals the Landauer energy current", () => {
    const J = 1;
    const gamma = 0.6;
    const t = { betaA: 0.8, muA: 0, betaB: 3, muB: 0 };
    const series = meanTransferSeries(...pair(system(chain(70, J), chain(60, J), { strength: gamma }, t)));
    const ts: number[] = [];
    for (let x = 15; x <= 50; x += 1) ts.push(x);
    const { I, IE } = landauerCurrents(J, gamma, t.betaA, t.muA, t.betaB, t.muB);
    const heat = slope(ts, ts.map((x) => series(x).dE_B));
    const particles = slope(ts, ts.map((x) => series(x).dN));
    // Energy current into B: the energy B gains per unit time. The contact's own energy is bounded, so it
    // does not change the slope. rtol 2e-3 as above, with a smaller current.
    expectClose(heat, IE, { rtol: 2e-3, source: "Landauer energy current (Datta 1995)" });
    // Half filling at μ = 0 on both sides: particle–hole symmetry makes the particle current vanish.
    expectClose(particles, I, { atol: 1e-6, source: "Landauer formula; particle–hole symmetry at μ = 0" });
  });
});

function pair<T extends { propagator: unknown }>(sys: T): [T, T["propagator"]] {
  return [sys, sys.propagator];
}
