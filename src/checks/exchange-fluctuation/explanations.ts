/**
 * What a fitted exchange relation says about the reservoirs when its coefficients differ from the
 * declared ones. The coefficients θ = (β̄, a_Q, a_N) are linear in the reservoir parameters
 * p = (β_A, β_B, γ_A, γ_B) with γ_X = β_X μ_X (physics.md §1; Andrieux, Gaspard, Monnai & Tasaki,
 * New J. Phys. 11, 043014 (2009)):
 *   β̄ = (β_A + β_B)/2,   a_Q = β_B − β_A,   a_N = γ_A − γ_B.
 * An explanation frees some parameters and holds the rest at their declared values, so the identified
 * combinations φ = K θ are affine in the freed ones: φ = φ₀ + A c. Given the fit φ̂ with covariance V
 * (inverse Fisher information of the logistic fit), the freed parameters are estimated by minimum
 * distance, ĉ = (AᵀV⁻¹A)⁻¹ AᵀV⁻¹ (φ̂ − φ₀), with covariance (AᵀV⁻¹A)⁻¹; the residual
 * (φ̂ − φ₀ − Aĉ)ᵀ V⁻¹ (…) is χ² with (rows − freed) degrees of freedom when the explanation is right
 * (Ferguson, A Course in Large Sample Theory (1996), §23, minimum chi-square; asymptotically the same as
 * the constrained maximum-likelihood fit). An explanation whose χ² is significant is excluded by the
 * data; one with zero degrees of freedom reproduces the fit exactly and cannot be excluded.
 *
 * Intervals: Wald intervals on the freed β or γ from that covariance (the delta method for the linear
 * map φ̂ → ĉ); a temperature interval is the β interval mapped through the monotone T = 1/(k_B β)
 * (unbounded above when the β interval reaches 0); a chemical potential μ = γ/β uses the delta method
 * when both are freed.
 */
import type { SamplesDataset } from "../../ingest/types.ts";
import { BOLTZMANN } from "../../physics/constants.ts";
import { inverse } from "../../linalg/solve.ts";
import { smallestEigenvalue } from "../../linalg/symmetricEigenvalues.ts";
import { chiSquareSf } from "../../stats/chiSquare.ts";
import { fmt, fmtInterval } from "../helpers.ts";
import { integerPower } from "../../math/index.ts";

type ThetaKey = "beta_bar" | "a_Q" | "a_N";
const THETA: ThetaKey[] = ["beta_bar", "a_Q", "a_N"];
/** Rows of M: θ = M p with p = (β_A, β_B, γ_A, γ_B). */
const M: Record<ThetaKey, number[]> = { beta_bar: [0.5, 0.5, 0, 0], a_Q: [-1, 1, 0, 0], a_N: [0, 0, 1, -1] };

/** One identified combination of the fit: φ = Σ_k weights[k] θ_k. */
export interface FittedCombination {
  weights: Partial<Record<ThetaKey, number>>;
  estimate: number;
}

export interface ExplanationInput {
  combinations: FittedCombination[];
  /** Covariance of the fitted combinations (same order). */
  covariance: number[][];
  /** Channels the fit saw: β̄ only with measured work, a_N only with a particle column. */
  particles: boolean;
  work: boolean;
}

/** A reservoir quantity an explanation frees. */
type Free = "T_A" | "T_B" | "mu_A" | "mu_B" | "T_common";

interface Candidate {
  id: string;
  /** "single" explanations blame one lead (or one common temperature); "joint" ones free both leads. */
  kind: "single" | "joint";
  frees: Free[];
  /** For a person: what is freed and what is held. */
  label: string;
}

export interface Quantity {
  name: string; // "T_A", "μ_A − μ_B", …
  value: number | null;
  interval: [number | null, number | null] | null;
  declared: number;
  unit: "K" | "J";
  /** How the interval was obtained. */
  method: string;
}

export interface Explanation {
  id: string;
  kind: "single" | "joint";
  label: string;
  identified: boolean;
  /** χ² of what the explanation leaves unexplained, its degrees of freedom and p (null when not identified). */
  chiSquare: number | null;
  dof: number | null;
  p: number | null;
  /** Identified and not excluded at level alpha (always so at zero degrees of freedom). */
  consistent: boolean;
  quantities: Quantity[];
}

function candidatesFor(d: SamplesDataset, input: ExplanationInput): Candidate[] {
  const out: Candidate[] = [
    { id: "lead-A-temperature", kind: "single", frees: ["T_A"], label: "T_A free, lead B and μ_A as declared" },
    { id: "lead-B-temperature", kind: "single", frees: ["T_B"], label: "T_B free, lead A and μ_B as declared" },
  ];
  if (input.particles) {
    out.push({ id: "lead-A-potential", kind: "single", frees: ["mu_A"], label: "μ_A free, T_A and lead B as declared" });
    out.push({ id: "lead-B-potential", kind: "single", frees: ["mu_B"], label: "μ_B free, T_B and lead A as declared" });
    if (d.reservoirs.A.T === d.reservoirs.B.T) {
      // Detector back-action heats both leads alike (Utsumi et al., Phys. Rev. B 81, 125331 (2010)).
      out.push({ id: "common-temperature", kind: "single", frees: ["T_common"], label: "one temperature T for both leads, μ_A and μ_B as declared" });
    }
  }
  out.push({ id: "both-temperatures", kind: "joint", frees: ["T_A", "T_B"], label: "T_A and T_B free, μ_A and μ_B as declared" });
  if (input.particles && input.work) out.push({ id: "joint-state", kind: "joint", frees: ["T_A", "T_B", "mu_A"], label: "T_A, T_B and μ_A free, μ_B as declared (only the bias enters)" });
  return out;
}

/** Direction in p = (β_A, β_B, γ_A, γ_B) of each freed parameter, and the declared p with the freed parts removed. */
function parameterisation(d: SamplesDataset, frees: Free[]): { directions: number[][]; p0: number[]; names: string[] } {
  const { A, B } = d.reservoirs;
  const p0 = [A.beta, B.beta, A.beta * A.mu, B.beta * B.mu];
  const freesMuA = frees.includes("mu_A");
  const freesMuB = frees.includes("mu_B");
  const directions: number[][] = [];
  const names: string[] = [];
  for (const f of frees) {
    if (f === "T_A") {
      // With μ_A held, γ_A = β_A μ_A moves with β_A; with μ_A freed too, γ_A is its own parameter.
      directions.push(freesMuA ? [1, 0, 0, 0] : [1, 0, A.mu, 0]);
      p0[0] = 0;
      if (!freesMuA) p0[2] = 0;
      names.push("beta_A");
    } else if (f === "T_B") {
      directions.push(freesMuB ? [0, 1, 0, 0] : [0, 1, 0, B.mu]);
      p0[1] = 0;
      if (!freesMuB) p0[3] = 0;
      names.push("beta_B");
    } else if (f === "mu_A") {
      directions.push([0, 0, 1, 0]);
      p0[2] = 0;
      names.push("gamma_A");
    } else if (f === "mu_B") {
      directions.push([0, 0, 0, 1]);
      p0[3] = 0;
      names.push("gamma_B");
    } else {
      directions.push([1, 1, A.mu, B.mu]);
      p0.fill(0);
      names.push("beta");
    }
  }
  return { directions, p0, names };
}

/** φ of a parameter vector p: K M p. */
function combinationsOf(input: ExplanationInput, p: number[]): number[] {
  return input.combinations.map((c) => THETA.reduce((acc, k) => acc + (c.weights[k] ?? 0) * M[k].reduce((s, m, j) => s + m * p[j], 0), 0));
}

const temperature = (beta: number): number | null => (beta > 0 && Number.isFinite(beta) ? 1 / (BOLTZMANN * beta) : null);

function temperatureQuantity(name: string, beta: number, se: number, z: number, declared: number): Quantity {
  const lo = beta - z * se;
  const hi = beta + z * se;
  return {
    name,
    value: temperature(beta),
    interval: beta > 0 ? [temperature(hi), lo > 0 ? temperature(lo) : null] : null,
    declared,
    unit: "K",
    method: "Wald interval on β from the fit's covariance, mapped through T = 1/(k_B β)",
  };
}

function evaluate(d: SamplesDataset, input: ExplanationInput, c: Candidate, alpha: number, z: number): Explanation {
  const { directions, p0, names } = parameterisation(d, c.frees);
  const phi0 = combinationsOf(input, p0);
  const A = directions.map((dir) => combinationsOf(input, dir)); // A[k][row]
  const rows = input.combinations.length;
  const base = { id: c.id, kind: c.kind, label: c.label };
  const unidentified: Explanation = { ...base, identified: false, chiSquare: null, dof: null, p: null, consistent: false, quantities: [] };
  if (rows < directions.length) return unidentified;
  let Vinv: number[][];
  try {
    Vinv = inverse(input.covariance);
  } catch {
    return unidentified;
  }
  const f = directions.length;
  const G = Array.from({ length: f }, (_, a) => Array.from({ length: f }, (_, b) => quadratic(A[a], Vinv, A[b])));
  // Identified when AᵀV⁻¹A is non-singular; judged on its diagonally normalised form (unit-free).
  if (G.some((row, a) => !(row[a] > 0))) return unidentified;
  const normalised = G.map((row, a) => row.map((g, b) => g / Math.sqrt(G[a][a] * G[b][b])));
  // Entries beyond double precision (a covariance of degenerate data) identify nothing.
  if (normalised.some((row) => row.some((g) => !Number.isFinite(g)))) return unidentified;
  if (!(smallestEigenvalue(normalised) > 1e-9)) return unidentified;
  const cov = inverse(G);
  const r = input.combinations.map((m, j) => m.estimate - phi0[j]);
  const rhs = A.map((a) => quadratic(a, Vinv, r));
  const est = cov.map((row) => row.reduce((s, v, b) => s + v * rhs[b], 0));
  const resid = r.map((v, j) => v - A.reduce((s, a, k) => s + a[j] * est[k], 0));
  const chi = quadratic(resid, Vinv, resid);
  const dof = rows - f;
  const p = dof > 0 ? chiSquareSf(chi, dof) : null;
  const se = cov.map((row, k) => Math.sqrt(row[k]));
  const quantities = describeQuantities(d, c, names, est, se, cov, z);
  return { ...base, identified: true, chiSquare: dof > 0 ? chi : 0, dof, p, consistent: p === null || p >= alpha, quantities };
}

function quadratic(a: readonly number[], m: readonly (readonly number[])[], b: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) s += a[i] * m[i][j] * b[j];
  return s;
}

/** Temperatures, chemical potentials and the bias μ_A − μ_B within one explanation, each with its interval. */
function describeQuantities(d: SamplesDataset, c: Candidate, names: string[], est: number[], se: number[], cov: number[][], z: number): Quantity[] {
  const { A, B } = d.reservoirs;
  const at = (n: string) => names.indexOf(n);
  const out: Quantity[] = [];
  const iA = at("beta_A");
  const iB = at("beta_B");
  const iT = at("beta");
  if (iT >= 0) out.push(temperatureQuantity("T (both leads)", est[iT], se[iT], z, A.T));
  if (iA >= 0) out.push(temperatureQuantity("T_A", est[iA], se[iA], z, A.T));
  if (iB >= 0) out.push(temperatureQuantity("T_B", est[iB], se[iB], z, B.T));
  // μ_X = γ_X/β_X: β_X is the freed one or the declared one (then exact division).
  const mu = (gName: string, bIndex: number, declaredBeta: number, declaredMu: number, label: string): Quantity | null => {
    const ig = at(gName);
    if (ig < 0) return null;
    const beta = bIndex >= 0 ? est[bIndex] : declaredBeta;
    const value = est[ig] / beta;
    // Delta method: ∂μ/∂γ = 1/β, ∂μ/∂β = −γ/β².
    const varMu = bIndex >= 0
      ? cov[ig][ig] / beta ** 2 + (est[ig] ** 2 / integerPower(beta, 4)) * cov[bIndex][bIndex] - (2 * est[ig] / integerPower(beta, 3)) * cov[ig][bIndex]
      : cov[ig][ig] / beta ** 2;
    const s = Math.sqrt(Math.max(varMu, 0));
    return { name: label, value, interval: [value - z * s, value + z * s], declared: declaredMu, unit: "J", method: bIndex >= 0 ? "delta method on (β, γ = βμ) from the fit's covariance" : "Wald interval on γ = βμ from the fit's covariance, divided by the declared β" };
  };
  const muA = mu("gamma_A", iA, A.beta, A.mu, "μ_A");
  const muB = mu("gamma_B", iB, B.beta, B.mu, "μ_B");
  if (muA) out.push(muA);
  if (muB) out.push(muB);
  if (c.frees.some((f) => f.startsWith("mu"))) {
    // The bias within this explanation: the freed μ against the other lead's declared one.
    const freed = (muA ?? muB)!;
    const sign = muA ? 1 : -1;
    const other = muA ? B.mu : A.mu;
    const value = sign * (freed.value as number) - sign * other;
    const [lo, hi] = freed.interval as [number, number];
    const bounds = [sign * lo - sign * other, sign * hi - sign * other].sort((x, y) => x - y) as [number, number];
    out.push({ name: "μ_A − μ_B", value, interval: bounds, declared: A.mu - B.mu, unit: "J", method: freed.method });
  }
  return out;
}

export function explanationsOf(d: SamplesDataset, input: ExplanationInput, alpha: number, z: number): Explanation[] {
  return candidatesFor(d, input).map((c) => evaluate(d, input, c, alpha, z));
}

/** "T_A = 1.13 K [1.1, 1.16]" in the dataset's energy unit for μ's. */
export function quantityText(d: SamplesDataset, q: Quantity): string {
  const scale = q.unit === "J" ? d.energyUnit.joules : 1;
  const unit = q.unit === "J" ? d.energyUnit.name : "K";
  if (q.value === null) return `${q.name}: no positive value reproduces the fit`;
  const iv = q.interval;
  const text = iv === null ? "" : iv[1] === null ? ` [${fmt((iv[0] as number) / scale, 3)}, ∞)` : ` ${fmtInterval((iv[0] as number) / scale, iv[1] / scale, 3)}`;
  return `${q.name} = ${fmt(q.value / scale)}${text} ${unit}`;
}

/** One explanation in words: "T_A = 1.13 [1.1, 1.16] K (T_A free, lead B and μ_A as declared)". */
export function explanationText(d: SamplesDataset, e: Explanation): string {
  return `${e.quantities.map((q) => quantityText(d, q)).join(", ")} (${e.label})`;
}

/**
 * The summary's sentence: every single-lead explanation the data allow, as alternatives, never one lead alone
 * unless the others are excluded; then the joint state where the data identify it.
 */
export function explanationSentence(d: SamplesDataset, es: Explanation[], confidence: number, alpha: number): string {
  const singles = es.filter((e) => e.kind === "single" && e.identified);
  const consistent = singles.filter((e) => e.consistent);
  const excluded = singles.filter((e) => !e.consistent);
  const level = `${fmt(confidence * 100)} % intervals`;
  const parts: string[] = [];
  if (consistent.length > 1) {
    parts.push(`The data cannot tell apart ${consistent.length} explanations of the departure, each with ${level}: ${consistent.map((e) => explanationText(d, e)).join("; or ")}.`);
  } else if (consistent.length === 1) {
    parts.push(`Of the single-lead explanations only one is consistent with the data: ${explanationText(d, consistent[0])} (${level}).`);
  } else if (singles.length > 0) {
    parts.push("No single-lead explanation reproduces every fitted coefficient.");
  }
  if (excluded.length > 0) parts.push(`Excluded by the data (χ² of the unexplained coefficients, p < ${alpha}): ${excluded.map((e) => e.label).join("; ")}.`);
  const joint = es.filter((e) => e.kind === "joint" && e.identified);
  if (joint.length > 0) parts.push(`Jointly identified: ${joint.map((e) => `${explanationText(d, e)}${e.consistent ? "" : ", itself excluded by the data"}`).join("; ")}.`);
  else parts.push("The joint state of both leads is not identified by these data (it needs measured work, or heat and particle channels that are not proportional, with a bias).");
  return parts.join(" ");
}
