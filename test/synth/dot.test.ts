import { describe, expect, it } from "vitest";
import { affinityPerElectron, dotRates, meanCurrent, stationaryOccupation, type DotParameters } from "../../src/synth/dotRates.ts";
import { dotTransferDistribution, scaledCumulantGeneratingFunction } from "../../src/synth/dotCounting.ts";
import { gillespieDotTransfers } from "../../src/synth/gillespie.ts";
import { fermiOccupation } from "../../src/synth/fermi.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { chiSquareSf } from "../../src/stats/chiSquare.ts";
import { expectClose } from "../helpers/expectClose.ts";

const params: DotParameters = { level: 0.3, rateA: 1.3, rateB: 0.7, beta: { A: 2, B: 3 }, mu: { A: 0.5, B: 0 } };
const rates = dotRates(params);

/**
 * Independent route to P(n): the generating function Z(χ) = 1ᵀ exp(L(χ) τ) p0 of the
 * counting-field-tilted 2 × 2 generator (Bagrets & Nazarov, PRB 67, 085316 (2003)),
 * with the closed-form exponential of a 2 × 2 matrix, exp(Mτ) = e^{mτ}[cosh(sτ) 1 + sinh(sτ)/s (M − m)],
 * m = tr M/2, s² = m² − det M, inverted by a discrete Fourier sum over M ≥ range points.
 */
function fourierDistribution(p0: number, tau: number, nMin: number, nMax: number): number[] {
  type C = [number, number];
  const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
  const add = (a: C, b: C): C => [a[0] + b[0], a[1] + b[1]];
  const sub = (a: C, b: C): C => [a[0] - b[0], a[1] - b[1]];
  const scale = (a: C, x: number): C => [a[0] * x, a[1] * x];
  const exp = (a: C): C => scale([Math.cos(a[1]), Math.sin(a[1])], Math.exp(a[0]));
  const sqrt = (a: C): C => {
    const r = Math.hypot(a[0], a[1]);
    const re = Math.sqrt((r + a[0]) / 2);
    const im = Math.sign(a[1] || 1) * Math.sqrt(Math.max(0, (r - a[0]) / 2));
    return [re, im];
  };
  const div = (a: C, b: C): C => scale(mul(a, [b[0], -b[1]]), 1 / (b[0] * b[0] + b[1] * b[1]));
  const M = nMax - nMin + 1;
  const z: C[] = [];
  for (let k = 0; k < M; k++) {
    const chi = (2 * Math.PI * k) / M;
    // L(χ) on (p_empty, p_full): electrons into B carry e^{iχ}, out of B e^{−iχ}.
    const a: C = [-(rates.inA + rates.inB), 0];
    const b: C = add([rates.outA, 0], scale([Math.cos(chi), Math.sin(chi)], rates.outB));
    const c: C = add([rates.inA, 0], scale([Math.cos(chi), -Math.sin(chi)], rates.inB));
    const d: C = [-(rates.outA + rates.outB), 0];
    const m = scale(add(a, d), 0.5);
    const s = sqrt(sub(mul(m, m), sub(mul(a, d), mul(b, c))));
    const st = scale(s, tau);
    const ch = scale(add(exp(st), exp(scale(st, -1))), 0.5);
    const sh = scale(sub(exp(st), exp(scale(st, -1))), 0.5);
    const f: C = Math.hypot(s[0], s[1]) < 1e-12 ? [tau, 0] : div(sh, s);
    const em = exp(scale(m, tau));
    // exp(Lτ) p0, summed over the two states.
    const e00 = add(ch, mul(f, sub(a, m)));
    const e01 = mul(f, b);
    const e10 = mul(f, c);
    const e11 = add(ch, mul(f, sub(d, m)));
    const v = add(scale(add(e00, e10), 1 - p0), scale(add(e01, e11), p0));
    z.push(mul(em, v));
  }
  const out: number[] = [];
  for (let n = nMin; n <= nMax; n++) {
    let sum = 0;
    for (let k = 0; k < M; k++) {
      const ang = (-2 * Math.PI * k * n) / M;
      sum += z[k][0] * Math.cos(ang) - z[k][1] * Math.sin(ang);
    }
    out.push(sum / M);
  }
  return out;
}

describe("dot: exact finite-time distribution", () => {
  it("uniformisation of the number-resolved master equation agrees with Fourier inversion of the tilted generator", () => {
    const p0 = stationaryOccupation(rates);
    const tau = 6;
    const exact = dotTransferDistribution(rates, p0, tau);
    const total = exact.probability.reduce((s, p) => s + p, 0);
    expectClose(total, 1, { atol: 1e-13, source: "normalisation" });
    const nMin = -40;
    const nMax = 40;
    const fourier = fourierDistribution(p0, tau, nMin, nMax);
    for (let n = -8; n <= 12; n++) {
      const i = n - exact.nMin;
      // 1e-13 absolute: Fourier inversion of a law whose mass outside [−40, 40] is far below 1e-16.
      expectClose(exact.probability[i], fourier[n - nMin], { atol: 1e-13, source: "tilted-generator Fourier inversion (Bagrets & Nazarov 2003)" });
    }
  });

  it("the Gillespie histogram agrees with the exact distribution (Pearson chi-square)", () => {
    const p0 = stationaryOccupation(rates);
    const tau = 6;
    const N = 40000;
    const { transferred } = gillespieDotTransfers(rates, p0, tau, N, rngFromText("dot gillespie"));
    const exact = dotTransferDistribution(rates, p0, tau);
    const observed = new Map<number, number>();
    for (const n of transferred) observed.set(n, (observed.get(n) ?? 0) + 1);
    // Cells n with expected count ≥ 5 (Cochran's rule), the two tails pooled into one cell each.
    let chi2 = 0;
    let cells = 0;
    let lowO = 0;
    let lowE = 0;
    let highO = 0;
    let highE = 0;
    const expectedCount = (n: number) => (n - exact.nMin >= 0 && n - exact.nMin < exact.probability.length ? exact.probability[n - exact.nMin] * N : 0);
    const mode = exact.nMin + exact.probability.indexOf(Math.max(...exact.probability));
    const keep = new Set<number>();
    for (let n = exact.nMin; n < exact.nMin + exact.probability.length; n++) if (expectedCount(n) >= 5) keep.add(n);
    for (let n = exact.nMin; n < exact.nMin + exact.probability.length; n++) {
      if (keep.has(n)) {
        chi2 += ((observed.get(n) ?? 0) - expectedCount(n)) ** 2 / expectedCount(n);
        cells++;
      } else if (n < mode) {
        lowO += observed.get(n) ?? 0;
        lowE += expectedCount(n);
      } else {
        highO += observed.get(n) ?? 0;
        highE += expectedCount(n);
      }
    }
    for (const [o, e] of [
      [lowO, lowE],
      [highO, highE],
    ]) {
      if (e >= 5) {
        chi2 += (o - e) ** 2 / e;
        cells++;
      }
    }
    expect(cells).toBeGreaterThan(8);
    // Pearson (1900), cells − 1 degrees of freedom; reject below p = 0.001 (fixed seed).
    expect(chiSquareSf(chi2, cells - 1)).toBeGreaterThan(0.001);
  });

  it("starting in equilibrium with lead A, ln P(n)/P(−n) = A n exactly at every counting time", () => {
    // Lead A and the dot form one grand-canonical reservoir; path reversal of the Markov jump process maps n to −n with
    // weight e^{A n} (Esposito, Harbola & Mukamel, RMP 81, 1665 (2009)), A = β_B(ε − μ_B) − β_A(ε − μ_A).
    const A = affinityPerElectron(params);
    const p0 = fermiOccupation(params.level, params.beta.A, params.mu.A);
    for (const tau of [0.3, 2, 9]) {
      const d = dotTransferDistribution(rates, p0, tau);
      for (let n = 1; n <= 6; n++) {
        const ratio = Math.log(d.probability[n - d.nMin] / d.probability[-n - d.nMin]);
        // 1e-9: relative rounding of probabilities down to ~1e-12 from an all-positive series.
        expectClose(ratio, A * n, { atol: 1e-9, source: "exact finite-time fluctuation relation (path reversal)" });
      }
    }
  });
});

describe("dot: long-time counting statistics", () => {
  it("the scaled cumulant generating function has the Gallavotti–Cohen symmetry λ(s) = λ(−A − s)", () => {
    // Lebowitz & Spohn, J. Stat. Phys. 95, 333 (1999); Bagrets & Nazarov (2003) for the dot.
    const A = affinityPerElectron(params);
    for (const s of [-2, -0.7, 0.1, 0.4, 1.5]) {
      expectClose(scaledCumulantGeneratingFunction(rates, s), scaledCumulantGeneratingFunction(rates, -A - s), { atol: 1e-13, source: "Gallavotti–Cohen symmetry" });
    }
    // λ'(0) is the mean current Γ_A Γ_B (f_A − f_B)/(Γ_A + Γ_B) (central difference, error O(h²) ~ 1e-10).
    const h = 1e-5;
    const derivative = (scaledCumulantGeneratingFunction(rates, h) - scaledCumulantGeneratingFunction(rates, -h)) / (2 * h);
    expectClose(derivative, meanCurrent(params), { atol: 1e-8, source: "Bagrets & Nazarov (2003), sequential-tunnelling current" });
  });

  it("from the stationary state, the log-ratio slope approaches the affinity per electron at long times", () => {
    const A = affinityPerElectron(params);
    const p0 = stationaryOccupation(rates);
    const slopeAt = (tau: number) => {
      const d = dotTransferDistribution(rates, p0, tau);
      // Least-squares slope through the origin of ln P(n)/P(−n) over n = 1…4.
      let sxy = 0;
      let sxx = 0;
      for (let n = 1; n <= 4; n++) {
        sxy += n * Math.log(d.probability[n - d.nMin] / d.probability[-n - d.nMin]);
        sxx += n * n;
      }
      return sxy / sxx;
    };
    const early = Math.abs(slopeAt(5) / A - 1);
    const late = Math.abs(slopeAt(400) / A - 1);
    // The finite-time correction comes from the dot's occupation at the two ends and fades like 1/τ.
    expect(late).toBeLessThan(early);
    expectClose(slopeAt(400), A, { rtol: 0.01, source: "long-time fluctuation theorem (Bagrets & Nazarov 2003; Esposito, Harbola & Mukamel 2009)" });
  });
});

describe("dot: exact expectations written beside the data", () => {
  it("⟨e^{−Σ}⟩ is 1 when the dot starts in equilibrium with A, and differs from 1 from the stationary state", async () => {
    const { synthDot } = await import("../../src/synth/dotAudit.ts");
    const equilibrium = JSON.parse(synthDot({ start: "equilibrium-a", samples: "10" }).files["data/expected.json"]);
    // Integral relation, exact for the grand-canonical preparation of A with the dot (1e-12: rounding of the sum).
    expectClose(equilibrium.exp_minus_sigma, 1, { atol: 1e-12, source: "integral fluctuation relation ⟨e^{−Σ}⟩ = 1" });
    const stationary = JSON.parse(synthDot({ samples: "10" }).files["data/expected.json"]);
    // From the stationary state the leads' part alone misses the boundary term of the dot's occupation; with it,
    // Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) gives exactly 1 (Seifert, PRL 95, 040602 (2005)); 1e-12: rounding of the sum.
    expect(Math.abs(stationary.exp_minus_sigma_reservoirs - 1)).toBeGreaterThan(1e-3);
    expectClose(stationary.exp_minus_sigma_total, 1, { atol: 1e-12, source: "Seifert, PRL 95, 040602 (2005)" });
  });
});
