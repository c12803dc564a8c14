// In-memory samples datasets drawn from laws with exactly known fluctuation properties.
import type { SamplesDataset } from "../../src/ingest/types.ts";
import type { SamplesDatasetConfig } from "../../src/config/types.ts";
import type { CheckContext } from "../../src/checks/types.ts";
import { affinities, reservoirFromTemperature } from "../../src/physics/affinities.ts";
import { entropyProduction } from "../../src/physics/entropyProduction.ts";
import { poissonDeviate } from "../../src/stats/poissonDeviate.ts";
import { rngFromText, type Rng } from "../../src/stats/rng.ts";

/** Energy unit of the fixtures: k_B × 1 K (exact SI value of k_B, CODATA 2018). */
export const E0 = 1.380649e-23;

/**
 * Symmetric law N(0, s²) tilted by e^{a x/2}: N(a s²/2, s²). Then
 * P(x)/P(−x) = e^{a x} exactly (completing the square).
 */
export function tiltedGaussian(rng: Rng, s: number, a: number): number {
  return (a * s * s) / 2 + s * rng.normal();
}

/**
 * Symmetric Laplace law e^{−|x|/s} tilted by e^{a x/2} (needs |a|/2 < 1/s):
 * exponential tails of rates 1/s ∓ a/2 on the two sides, chosen with
 * probabilities proportional to their masses 1/(1/s ∓ a/2). P(x)/P(−x) = e^{a x}.
 */
export function tiltedLaplace(rng: Rng, s: number, a: number): number {
  const rPos = 1 / s - a / 2;
  const rNeg = 1 / s + a / 2;
  const pPos = 1 / rPos / (1 / rPos + 1 / rNeg);
  const e = -Math.log(1 - rng.uniform());
  return rng.uniform() < pPos ? e / rPos : -e / rNeg;
}

/**
 * Skellam N1 − N2 with N1 ~ Poisson(l e^{b/2}), N2 ~ Poisson(l e^{−b/2}): the
 * symmetric Skellam law tilted by e^{b n/2}, so P(n)/P(−n) = e^{b n}
 * (Skellam, J. R. Stat. Soc. 109, 296 (1946)).
 */
export function tiltedSkellam(rng: Rng, l: number, b: number): number {
  return poissonDeviate(rng, l * Math.exp(b / 2)) - poissonDeviate(rng, l * Math.exp(-b / 2));
}

export interface FixtureSpec {
  id: string;
  /** Declared reservoirs: temperatures in K, chemical potentials in units of E0. */
  TA: number;
  TB: number;
  muA?: number;
  muB?: number;
  work: "zero" | "measured";
  /** Values in units of E0 (W, Q) and particles (dN); W null when the data carry no work. */
  W: Float64Array | null;
  Q: Float64Array;
  dN: Float64Array | null;
  weight?: Float64Array | null;
  field?: number;
}

/** A SamplesDataset as the ingester builds it (energies converted to J, Σ per realisation). */
export function fixtureDataset(spec: FixtureSpec): SamplesDataset {
  const n = spec.Q.length;
  const toJ = (x: Float64Array) => Float64Array.from(x, (v) => v * E0);
  const A = reservoirFromTemperature(spec.TA, (spec.muA ?? 0) * E0);
  const B = reservoirFromTemperature(spec.TB, (spec.muB ?? 0) * E0);
  const affinity = affinities(A, B);
  const W_data = spec.W ? toJ(spec.W) : null;
  const W = spec.work === "zero" || !W_data ? new Float64Array(n) : W_data;
  const Q = toJ(spec.Q);
  const dN = spec.dN ? Float64Array.from(spec.dN) : new Float64Array(n);
  const weight = spec.weight ?? null;
  let realisations = n;
  if (weight) realisations = weight.reduce((a, b) => a + b, 0);
  const config = {
    id: spec.id,
    kind: "samples",
    file: `data/${spec.id}.csv`,
    columns: { Q: "q", ...(spec.dN ? { dN: "n" } : {}), ...(spec.W ? { W: "w" } : {}), ...(weight ? { count: "count" } : {}) },
    energy_unit: "J",
    reservoirs: { A: { T: spec.TA, mu: (spec.muA ?? 0) * E0 }, B: { T: spec.TB, mu: (spec.muB ?? 0) * E0 } },
    work: spec.work,
    ...(spec.field !== undefined ? { field: spec.field } : {}),
  } as unknown as SamplesDatasetConfig;
  return {
    kind: "samples",
    id: spec.id,
    file: config.file,
    sha256: `fixture:${spec.id}`,
    rows: n,
    config,
    W,
    W_data,
    Q,
    dN,
    dE_A: W_data ? Float64Array.from(Q, (q, i) => W_data[i] / 2 - q) : null,
    dE_B: W_data ? Float64Array.from(Q, (q, i) => W_data[i] / 2 + q) : null,
    weight,
    realisations,
    sigma: entropyProduction(affinity, W, Q, dN),
    reservoirs: { A, B },
    affinity,
    energyUnit: { name: "J", joules: 1 },
    hasParticleColumn: spec.dN !== null,
    tau: null,
    reduction: null,
  };
}

/** The settings every audit gets by default (audit-format: alpha 0.01, margin 0.05, 95 %), 2000 resamples. */
export function testContext(options: Record<string, unknown> = {}): CheckContext {
  return {
    settings: { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: "auto", resamples: 2000 },
    options,
    rngFor: (digest, stream = "") => rngFromText(`${digest}|test|${stream}`),
  };
}

/**
 * A dataset obeying the detailed relation exactly with the given reservoirs:
 * independent W, Q and ΔN, each a symmetric law tilted by half its
 * coefficient (β̄, a_Q, a_N in units of 1/E0), so the joint law is
 * P(z) ∝ P0(z) e^{θ·z/2} with P0 symmetric. `drawTA`/`drawTB` let the data
 * come from other temperatures than the declared ones.
 */
export function exactExchangeData(opts: {
  seed: string;
  n: number;
  TA: number;
  TB: number;
  muA?: number;
  muB?: number;
  drawTA?: number;
  drawTB?: number;
  drawMuA?: number;
  withWork: boolean;
  heat: "gaussian" | "laplace";
  sQ: number;
  sW?: number;
  lN?: number;
}): { W: Float64Array | null; Q: Float64Array; dN: Float64Array | null } {
  const rng = rngFromText(opts.seed);
  const TA = opts.drawTA ?? opts.TA;
  const TB = opts.drawTB ?? opts.TB;
  const muA = opts.drawMuA ?? opts.muA ?? 0;
  const muB = opts.muB ?? 0;
  const bA = 1 / TA;
  const bB = 1 / TB;
  const aQ = bB - bA;
  const aN = bA * muA - bB * muB;
  const bBar = (bA + bB) / 2;
  const Q = new Float64Array(opts.n);
  const W = opts.withWork ? new Float64Array(opts.n) : null;
  const dN = opts.lN ? new Float64Array(opts.n) : null;
  for (let i = 0; i < opts.n; i++) {
    Q[i] = opts.heat === "gaussian" ? tiltedGaussian(rng, opts.sQ, aQ) : tiltedLaplace(rng, opts.sQ, aQ);
    if (W) W[i] = tiltedGaussian(rng, opts.sW ?? 0.5, bBar);
    if (dN) dN[i] = tiltedSkellam(rng, opts.lN!, aN);
  }
  return { W, Q, dN };
}
