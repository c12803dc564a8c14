import type { Rng } from "../stats/rng.ts";

/**
 * A conductor between two leads as a Markov jump process on a few charge
 * states (sequential tunnelling: Beenakker, PRB 44, 1646 (1991); Bagrets &
 * Nazarov, PRB 67, 085316 (2003)). Every transition says what each lead gains
 * (particles and energy, in the model's energy unit), so that the reservoirs'
 * entropy production of a trajectory, Σ_res = Σ_X β_X (ΔE_X − μ_X ΔN_X), is a
 * sum over its jumps. A transition that moves nothing into either lead (an
 * inter-dot jump) exchanges its energy with a bath the leads do not see.
 */
export interface CountingTransition {
  from: number;
  to: number;
  /** Rate in 1/time. */
  rate: number;
  /** Particles and energy gained by lead A and lead B in this jump. */
  dN_A: number;
  dN_B: number;
  dE_A: number;
  dE_B: number;
}

export interface CountingModel {
  /** Number of charge states, labelled 0 … states − 1. */
  states: number;
  transitions: CountingTransition[];
}

/** Total exit rate of each state. */
export function exitRates(m: CountingModel): Float64Array {
  const out = new Float64Array(m.states);
  for (const t of m.transitions) out[t.from] += t.rate;
  return out;
}

/**
 * Stationary distribution p of the master equation dp/dt = L p, L p = 0 with
 * Σ p = 1, by Gaussian elimination with partial pivoting on the generator
 * with one balance row replaced by the normalisation (Kemeny & Snell, Finite
 * Markov Chains (1960), §4.1; common practice for small chains).
 */
export function stationaryDistribution(m: CountingModel): Float64Array {
  const n = m.states;
  const a = Array.from({ length: n }, () => new Float64Array(n + 1));
  for (const t of m.transitions) {
    a[t.to][t.from] += t.rate;
    a[t.from][t.from] -= t.rate;
  }
  for (let j = 0; j < n; j++) a[n - 1][j] = 1;
  a[n - 1][n] = 1;
  for (let c = 0; c < n; c++) {
    let piv = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r][c]) > Math.abs(a[piv][c])) piv = r;
    [a[c], a[piv]] = [a[piv], a[c]];
    for (let r = 0; r < n; r++) {
      if (r === c || a[r][c] === 0) continue;
      const f = a[r][c] / a[c][c];
      for (let k = c; k <= n; k++) a[r][k] -= f * a[c][k];
    }
  }
  return Float64Array.from({ length: n }, (_, i) => a[i][n] / a[i][i]);
}

/**
 * Exact finite-time joint law P(n, x₀, x_τ) of the net count n (the integer
 * `counter(t)` summed over the jumps, e.g. particles gained by lead B) and the
 * states at the two ends, starting from p0: the counting-resolved master
 * equation solved by uniformisation (Jensen, Skand. Aktuarietidskr. 36, 87
 * (1953)), exp(Lτ) = Σ_j Poisson(j; Λτ)(1 + L/Λ)^j. Every term is a sum of
 * non-negative numbers, so probabilities of 1e-200 keep their relative
 * accuracy, which log-ratios need. The series is cut where the Poisson tail is
 * below 1e-18 (Λτ + 12√(Λτ) + 40 terms).
 */
export interface JointCountLaw {
  nMin: number;
  /** probability[x0][xt][n − nMin] */
  probability: Float64Array[][];
}

export function jointCountDistribution(m: CountingModel, counter: (t: CountingTransition) => number, p0: ArrayLike<number>, tau: number): JointCountLaw {
  const S = m.states;
  const exits = exitRates(m);
  const lambda = Math.max(...exits, 1e-300);
  const mean = lambda * tau;
  const jMax = Math.ceil(mean + 12 * Math.sqrt(mean) + 40);
  const steps = m.transitions.map((t) => counter(t));
  const reach = Math.max(1, ...steps.map((c) => Math.abs(c)));
  const offset = jMax * reach;
  const size = 2 * offset + 1;
  const out: Float64Array[][] = [];
  for (let x0 = 0; x0 < S; x0++) {
    let p = Array.from({ length: S }, () => new Float64Array(size));
    let q = Array.from({ length: S }, () => new Float64Array(size));
    p[x0][offset] = p0[x0];
    const acc = Array.from({ length: S }, () => new Float64Array(size));
    let logFact = 0;
    for (let j = 0; j <= jMax; j++) {
      if (j > 0) logFact += Math.log(j);
      const w = mean > 0 ? Math.exp(-mean + j * Math.log(mean) - logFact) : j === 0 ? 1 : 0;
      const lo = Math.max(0, offset - j * reach);
      const hi = Math.min(size - 1, offset + j * reach);
      if (w > 0) for (let s = 0; s < S; s++) for (let i = lo; i <= hi; i++) acc[s][i] += w * p[s][i];
      if (j === jMax) break;
      for (let s = 0; s < S; s++) {
        const stay = 1 - exits[s] / lambda;
        for (let i = lo; i <= hi; i++) q[s][i] = stay * p[s][i];
        for (let i = Math.max(0, lo - reach); i < lo; i++) q[s][i] = 0;
        for (let i = hi + 1; i <= Math.min(size - 1, hi + reach); i++) q[s][i] = 0;
      }
      m.transitions.forEach((t, k) => {
        const r = t.rate / lambda;
        const c = steps[k];
        const src = p[t.from];
        const dst = q[t.to];
        for (let i = lo; i <= hi; i++) if (src[i] !== 0) dst[i + c] += r * src[i];
      });
      [p, q] = [q, p];
    }
    out.push(acc);
  }
  // Trim the n range to where any entry is non-zero.
  let first = size;
  let last = -1;
  for (const row of out) for (const a of row) for (let i = 0; i < size; i++) if (a[i] !== 0) { first = Math.min(first, i); last = Math.max(last, i); }
  if (last < 0) { first = offset; last = offset; }
  return { nMin: first - offset, probability: out.map((row) => row.map((a) => a.slice(first, last + 1))) };
}

/**
 * Largest real eigenvalue of the counting-field-tilted generator L(s), whose
 * jumps carry e^{s·counter}: the scaled cumulant generating function
 * K(s) = lim (1/τ) ln⟨e^{s n}⟩ (Bagrets & Nazarov 2003; Lebowitz & Spohn,
 * J. Stat. Phys. 95, 333 (1999)). L(s) + Λ·1 has non-negative entries, so its
 * Perron root is found by power iteration (Perron–Frobenius; an irreducible
 * chain is assumed), iterated until the Rayleigh-type estimate settles to 1e-15.
 */
export function tiltedGeneratorEigenvalue(m: CountingModel, counter: (t: CountingTransition) => number, s: number): number {
  const S = m.states;
  const exits = exitRates(m);
  const shift = Math.max(...exits) + 1;
  let v = new Float64Array(S).fill(1 / S);
  let w = new Float64Array(S);
  let estimate = 0;
  for (let it = 0; it < 100000; it++) {
    for (let i = 0; i < S; i++) w[i] = (shift - exits[i]) * v[i];
    for (const t of m.transitions) w[t.to] += t.rate * Math.exp(s * counter(t)) * v[t.from];
    let norm = 0;
    for (let i = 0; i < S; i++) norm += w[i];
    for (let i = 0; i < S; i++) w[i] /= norm;
    const next = norm - shift;
    [v, w] = [w, v];
    if (it > 10 && Math.abs(next - estimate) <= 1e-15 * Math.max(1, Math.abs(next))) return next;
    estimate = next;
  }
  return estimate;
}

/** A stationary trajectory: the state at time 0, then every jump's time and the state after it. */
export interface Trajectory {
  initial: number;
  times: Float64Array;
  states: Int32Array;
  /** Index of the transition taken at each jump. */
  transitions: Int32Array;
}

/**
 * One trajectory over [0, duration] by Gillespie's direct method (J. Comput.
 * Phys. 22, 403 (1976)), starting from a state drawn from p0.
 */
export function simulateTrajectory(m: CountingModel, p0: ArrayLike<number>, duration: number, rng: Rng): Trajectory {
  const exits = exitRates(m);
  const outgoing: number[][] = Array.from({ length: m.states }, () => []);
  m.transitions.forEach((t, k) => outgoing[t.from].push(k));
  let u = rng.uniform();
  let x = 0;
  while (x < m.states - 1 && u >= p0[x]) u -= p0[x++];
  const initial = x;
  const times: number[] = [];
  const states: number[] = [];
  const which: number[] = [];
  let t = 0;
  for (;;) {
    if (exits[x] <= 0) break;
    t += -Math.log(1 - rng.uniform()) / exits[x];
    if (t > duration) break;
    let r = rng.uniform() * exits[x];
    const out = outgoing[x];
    let k = out[out.length - 1];
    for (const c of out) {
      if (r < m.transitions[c].rate) { k = c; break; }
      r -= m.transitions[c].rate;
    }
    x = m.transitions[k].to;
    times.push(t);
    states.push(x);
    which.push(k);
  }
  return { initial, times: Float64Array.from(times), states: Int32Array.from(states), transitions: Int32Array.from(which) };
}
