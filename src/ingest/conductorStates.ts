import { DataError, recordProblem, type ProblemLog } from "../errors.ts";
import type { ConductorStates } from "./types.ts";

/**
 * The conductor's state at the two ends of each realisation, and the boundary
 * term of the total entropy production,
 *
 *   Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ),
 *
 * with p the conductor's stationary distribution (Seifert, Phys. Rev. Lett. 95,
 * 040602 (2005), eq. 9, for a Markovian conductor whose rates obey local
 * detailed balance, started in its stationary state). p is declared in
 * audit.yaml (`state_distribution`) or estimated from the start states: under
 * a stationary start, x₀ is distributed as p.
 */

/**
 * The largest magnitude of a state label: labels are held as 32-bit integers (a trace's states), whose
 * range ends at 2^31 − 1 ≈ 2.1e9; a larger label would wrap onto another state's.
 */
export const MAX_STATE_LABEL = 1e9;

/**
 * Row labels checked as integers of magnitude at most MAX_STATE_LABEL (problems logged with the row's
 * line and column, and the number read, so that the message can quote the cell as written).
 */
export function stateLabels(values: Float64Array, rows: number, lines: ArrayLike<number>, column: string, problems: ProblemLog): void {
  for (let i = 0; i < rows; i++) {
    const v = values[i];
    if (!Number.isInteger(v)) recordProblem(problems, lines[i], column, "expected an integer state label", v);
    else if (Math.abs(v) > MAX_STATE_LABEL) recordProblem(problems, lines[i], column, "expected a state label of magnitude at most 1e9", v);
  }
}

/** The labels (ascending, once each) to which a declared stationary distribution gives no probability. */
export function undeclaredStates(labels: readonly number[], declared: Record<string, number>): number[] {
  return labels.filter((l) => declared[String(l)] === undefined);
}

export interface StateInput {
  start: Float64Array;
  end: Float64Array;
  weight: Float64Array | null;
  sigmaReservoirs: Float64Array;
  /** audit.yaml's state_distribution, or undefined to estimate p from the start states. */
  declared: Record<string, number> | undefined;
  /** For messages: the file, and the key path of the dataset. */
  file: string;
  where: string;
  startColumn: string;
}

export function conductorStates(input: StateInput): ConductorStates {
  const { start, end, weight } = input;
  const n = start.length;
  const labelSet = new Set<number>();
  for (let i = 0; i < n; i++) {
    labelSet.add(start[i]);
    labelSet.add(end[i]);
  }
  const labels = [...labelSet].sort((a, b) => a - b);
  const index = new Map(labels.map((l, k) => [l, k]));
  const s = Int32Array.from(start, (v) => index.get(v)!);
  const e = Int32Array.from(end, (v) => index.get(v)!);
  let probability: number[];
  let source: ConductorStates["source"];
  if (input.declared) {
    source = "declared";
    const missing = undeclaredStates(labels, input.declared);
    if (missing.length > 0) {
      throw new DataError(
        `${input.where}.state_distribution: gives no probability for state${missing.length > 1 ? "s" : ""} ${missing.join(", ")}, which ${input.file} shows; declare the stationary probability of every state`,
      );
    }
    probability = labels.map((l) => input.declared![String(l)]);
  } else {
    source = "estimated";
    const mass = new Float64Array(labels.length);
    let total = 0;
    for (let i = 0; i < n; i++) {
      const w = weight ? weight[i] : 1;
      mass[s[i]] += w;
      total += w;
    }
    const never = labels.filter((_, k) => mass[k] === 0);
    if (never.length > 0) {
      throw new DataError(
        `${input.file}, column "${input.startColumn}": state${never.length > 1 ? "s" : ""} ${never.join(", ")} occur${never.length > 1 ? "" : "s"} at the end of a realisation but never at its start, so the stationary probability cannot be estimated from the start states; record more realisations, or declare state_distribution in audit.yaml (${input.where})`,
      );
    }
    probability = Array.from(mass, (m) => m / total);
  }
  const logP = probability.map(Math.log);
  const boundary = new Float64Array(n);
  for (let i = 0; i < n; i++) boundary[i] = logP[s[i]] - logP[e[i]];
  return { labels, start: s, end: e, probability, source, boundary, sigmaReservoirs: input.sigmaReservoirs };
}

/**
 * The carried uncertainty of an estimated p, by linearisation (the delta
 * method; van der Vaart, Asymptotic Statistics (1998), ch. 3): a statistic
 * T = Σ_i w_i f_i(b_i) / Σ_i w_i whose rows depend on p through the boundary
 * term b_i = ln p̂(x₀ᵢ) − ln p̂(x_τᵢ) moves with p̂ by
 *   T(p̂) − T(p) ≈ Σ_x G_x (p̂(x) − p(x))/p(x),  G_x = ⟨f'(b) (1[x₀ = x] − 1[x_τ = x])⟩,
 * and p̂(x) − p(x) is itself an average of 1[x₀ᵢ = x] − p(x). Adding
 *   a_i = Σ_x G_x (1[x₀ᵢ = x] − p̂(x)) / p̂(x)
 * to each row's value leaves the estimate unchanged (the a_i average to zero
 * exactly) and makes any resampling of the rows (bootstrap, block bootstrap)
 * see p re-estimated in each resample to first order, including its
 * correlation with the rest of the row. A declared p carries no sampling
 * uncertainty: the additions are zero.
 *
 * `derivative[i]` is ∂f_i/∂b_i.
 */
export function estimatedStateInfluence(states: ConductorStates, derivative: ArrayLike<number>, weight: ArrayLike<number> | null): Float64Array {
  const n = states.start.length;
  const out = new Float64Array(n);
  if (states.source === "declared") return out;
  const K = states.labels.length;
  const G = new Float64Array(K);
  let total = 0;
  for (let i = 0; i < n; i++) {
    const w = weight ? weight[i] : 1;
    total += w;
    G[states.start[i]] += w * derivative[i];
    G[states.end[i]] -= w * derivative[i];
  }
  for (let k = 0; k < K; k++) G[k] /= total;
  // Σ_x G_x (1[x₀ = x] − p(x))/p(x) = G_{x₀}/p(x₀) − Σ_x G_x.
  let sumG = 0;
  for (let k = 0; k < K; k++) sumG += G[k];
  for (let i = 0; i < n; i++) out[i] = G[states.start[i]] / states.probability[states.start[i]] - sumG;
  return out;
}

/** The assumptions every check on data with conductor states lists. */
export function stateAssumptions(states: ConductorStates): string[] {
  return [
    "The conductor is Markovian (its state is the whole memory of the dynamics) and its transition rates obey local detailed balance with the leads, so that Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) is the total entropy production of a realisation (Seifert 2005).",
    "Counting starts in the conductor's stationary state: every window is cut from a stationary trajectory.",
    states.source === "declared"
      ? `The stationary distribution of the conductor's states is declared: ${states.labels.map((l, k) => `p(${l}) = ${Number(states.probability[k].toPrecision(6))}`).join(", ")}.`
      : `The stationary distribution of the conductor's states is estimated from the start states (${states.labels.map((l, k) => `p(${l}) = ${Number(states.probability[k].toPrecision(4))}`).join(", ")}); its sampling uncertainty is carried into every interval by linearisation (delta method).`,
  ];
}
