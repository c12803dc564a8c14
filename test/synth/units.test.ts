import { describe, it } from "vitest";
import { betaPerMeV, fieldForPeierlsPhase, secondsToHbarPerMeV } from "../../src/synth/units.ts";
import { fermiOccupation } from "../../src/synth/fermi.ts";
import { formatCell } from "../../src/synth/csv.ts";
import { expectClose } from "../helpers/expectClose.ts";

describe("simulator units", () => {
  it("fieldForPeierlsPhase: one flux quantum h/e through (10 nm)² is 41.35667696 T (CODATA 2018 exact h and e)", () => {
    // h/e = 6.62607015e-34 / 1.602176634e-19 = 4.135667696…e-15 Wb; divided by 1e-16 m².
    expectClose(fieldForPeierlsPhase(2 * Math.PI, 1e-16), 41.35667696923859, { rtol: 1e-12, source: "h/e from the exact SI constants" });
  });

  it("betaPerMeV: k_B T at 1 K is 0.08617333262 meV (CODATA 2018 exact k_B and e)", () => {
    expectClose(1 / betaPerMeV(1), 0.08617333262145179, { rtol: 1e-12, source: "k_B/e = 8.617333262e-5 eV/K" });
  });

  it("secondsToHbarPerMeV: ħ/meV is 6.582119569e-13 s", () => {
    // ħ/e = 6.582119569…e-16 eV s (exact SI constants), so ħ/(1 meV) = 6.582119569e-13 s.
    expectClose(secondsToHbarPerMeV(6.582119569509066e-13), 1, { rtol: 1e-12, source: "ħ from the exact SI constants" });
  });

  it("fermiOccupation is 1/2 at the chemical potential and does not overflow far from it", () => {
    expectClose(fermiOccupation(0.3, 7, 0.3), 0.5, { atol: 0, source: "f(μ) = 1/2" });
    expectClose(fermiOccupation(1e3, 1e3, 0), 0, { atol: 1e-300, source: "e^{−10⁶} underflows to 0" });
    expectClose(fermiOccupation(-1e3, 1e3, 0), 1, { atol: 0, source: "f → 1 deep below μ" });
    // Symmetry f(μ + x) = 1 − f(μ − x).
    expectClose(fermiOccupation(0.7, 2, 0.2), 1 - fermiOccupation(-0.3, 2, 0.2), { atol: 1e-16, source: "particle–hole symmetry of the Fermi function" });
  });

  it("formatCell keeps twelve significant digits and writes whole numbers as integers", () => {
    expectClose(Number(formatCell(0.1234567890123456)), 0.123456789012, { atol: 0, source: "toPrecision(12)" });
    expectClose(Number(formatCell(-3)), -3, { atol: 0, source: "integers unchanged" });
    expectClose(Number(formatCell(-0)), 0, { atol: 0, source: "negative zero written as 0" });
  });
});
