import type { DotRates } from "./dotRates.ts";

/**
 * Exact finite-time distribution of the net number n of electrons entering B,
 * from the number-resolved master equation of the sequential-tunnelling dot
 * (the counting-field-resolved rate equations of Bagrets & Nazarov, PRB 67,
 * 085316 (2003); Esposito, Harbola & Mukamel, RMP 81, 1665 (2009), §III).
 *
 * Solved by uniformisation (Jensen, Skand. Aktuarietidskr. 36, 87 (1953)):
 * with Λ ≥ every exit rate, exp(L τ) = Σ_j Poisson(j; Λτ) (1 + L/Λ)^j, and
 * (1 + L/Λ) has non-negative entries, so every term adds non-negative
 * numbers: even probabilities of 1e-200 keep their relative accuracy, which
 * the log-ratio ln P(n)/P(−n) needs. The Poisson series is cut where its
 * tail is below 1e-18.
 */
export interface DotDistribution {
  nMin: number;
  /** P(n) for n = nMin, nMin + 1, … */
  probability: Float64Array;
}

function logPoissonWeight(j: number, mean: number, logFactorial: number): number {
  return -mean + j * Math.log(mean) - logFactorial;
}

export function dotTransferDistribution(rates: DotRates, initialOccupation: number, tau: number): DotDistribution {
  const exitEmpty = rates.inA + rates.inB;
  const exitFull = rates.outA + rates.outB;
  const lambda = Math.max(exitEmpty, exitFull);
  const mean = lambda * tau;
  const jMax = Math.ceil(mean + 12 * Math.sqrt(mean) + 40);
  const size = 2 * jMax + 1;
  const offset = jMax; // index of n = 0
  let p0 = new Float64Array(size);
  let p1 = new Float64Array(size);
  let q0 = new Float64Array(size);
  let q1 = new Float64Array(size);
  p0[offset] = 1 - initialOccupation;
  p1[offset] = initialOccupation;
  const acc = new Float64Array(size);
  const stay0 = 1 - exitEmpty / lambda;
  const stay1 = 1 - exitFull / lambda;
  const a = rates.outA / lambda;
  const b = rates.outB / lambda;
  const c = rates.inA / lambda;
  const d = rates.inB / lambda;
  let logFact = 0;
  // Only indices offset − j … offset + j can be non-zero after j jumps.
  for (let j = 0; j <= jMax; j++) {
    if (j > 0) logFact += Math.log(j);
    const w = mean > 0 ? Math.exp(logPoissonWeight(j, mean, logFact)) : j === 0 ? 1 : 0;
    const lo = Math.max(0, offset - j);
    const hi = Math.min(size - 1, offset + j);
    if (w > 0) for (let i = lo; i <= hi; i++) acc[i] += w * (p0[i] + p1[i]);
    if (j === jMax) break;
    for (let i = Math.max(0, lo - 1); i <= Math.min(size - 1, hi + 1); i++) {
      // empty at n: stayed empty, or emptied towards A from full at n, or towards B from full at n − 1
      q0[i] = stay0 * p0[i] + a * p1[i] + (i > 0 ? b * p1[i - 1] : 0);
      // full at n: stayed full, or filled from A at n, or from B from empty at n + 1
      q1[i] = stay1 * p1[i] + c * p0[i] + (i + 1 < size ? d * p0[i + 1] : 0);
    }
    [p0, q0] = [q0, p0];
    [p1, q1] = [q1, p1];
  }
  // Trim the zero ends.
  let first = 0;
  while (first < size - 1 && acc[first] === 0) first++;
  let last = size - 1;
  while (last > first && acc[last] === 0) last--;
  return { nMin: first - offset, probability: acc.slice(first, last + 1) };
}

/**
 * Scaled cumulant generating function: the largest eigenvalue of the tilted
 * generator L(s) (electrons into B weighted by e^{s}, out of B by e^{−s}),
 * lim (1/τ) ln ⟨e^{s n}⟩ (Bagrets & Nazarov 2003). For the 2 × 2 generator
 * it is the larger root of the characteristic polynomial.
 */
export function scaledCumulantGeneratingFunction(rates: DotRates, s: number): number {
  const r0 = rates.inA + rates.inB;
  const r1 = rates.outA + rates.outB;
  const product = (rates.outA + rates.outB * Math.exp(s)) * (rates.inA + rates.inB * Math.exp(-s));
  return (-(r0 + r1) + Math.sqrt((r0 - r1) ** 2 + 4 * product)) / 2;
}
