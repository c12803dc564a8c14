// In-memory samples datasets for the response audits: exactly tilted Gaussian families.
import type { SamplesDataset } from "../../src/ingest/types.ts";
import type { SamplesDatasetConfig } from "../../src/config/types.ts";
import { affinities, reservoirFromBeta } from "../../src/physics/affinities.ts";
import { entropyProduction } from "../../src/physics/entropyProduction.ts";
import type { Rng } from "../../src/stats/rng.ts";

/** Energy unit of the fixtures: k_B × 1 K (exact SI value of k_B). */
export const E0 = 1.380649e-23;

export interface DatasetSpec {
  id: string;
  /** SI affinities; beta_bar in 1/J. */
  a_Q: number;
  a_N: number;
  beta_bar: number;
  tau: number;
  sweep?: string;
  series?: string;
  W: Float64Array | null;
  Q: Float64Array;
  dN: Float64Array | null;
}

/** A SamplesDataset as the ingester would build it, with reservoirs that give exactly the stated affinities. */
export function samplesDataset(spec: DatasetSpec): SamplesDataset {
  const betaA = spec.beta_bar - spec.a_Q / 2;
  const betaB = spec.beta_bar + spec.a_Q / 2;
  const A = reservoirFromBeta(betaA, spec.a_N / betaA);
  const B = reservoirFromBeta(betaB, 0);
  const affinity = affinities(A, B);
  const n = spec.Q.length;
  const W = spec.W ?? new Float64Array(n);
  const dN = spec.dN ?? new Float64Array(n);
  const config = {
    id: spec.id,
    kind: "samples",
    file: `data/${spec.id}.csv`,
    columns: spec.dN ? { Q: "Q", dN: "dN", ...(spec.W ? { W: "W" } : {}) } : { Q: "Q", ...(spec.W ? { W: "W" } : {}) },
    energy_unit: "J",
    reservoirs: { A: { beta: betaA, mu: A.mu }, B: { beta: betaB, mu: 0 } },
    tau: spec.tau,
    work: spec.W ? "measured" : "zero",
    ...(spec.sweep ? { sweep: spec.sweep } : {}),
    ...(spec.series ? { series: spec.series } : {}),
  } as SamplesDatasetConfig;
  return {
    kind: "samples",
    id: spec.id,
    file: config.file,
    sha256: `fixture-${spec.id}`,
    rows: n,
    config,
    W,
    W_data: spec.W,
    Q: spec.Q,
    dN,
    dE_A: null,
    dE_B: null,
    weight: null,
    realisations: n,
    sigma: entropyProduction(affinity, W, spec.Q, dN),
    reservoirs: { A, B },
    affinity,
    energyUnit: { name: "J", joules: 1 },
    hasParticleColumn: spec.dN !== null,
    tau: spec.tau,
    reduction: null,
  };
}

/** Lower Cholesky factor of a small symmetric positive-definite matrix. */
function cholesky(C: number[][]): number[][] {
  const n = C.length;
  const G = C.map(() => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = C[i][j];
      for (let k = 0; k < j; k++) s -= G[i][k] * G[j][k];
      G[i][j] = i === j ? Math.sqrt(s) : s / G[j][j];
    }
  }
  return G;
}

/**
 * n draws of a Gaussian P0 = N(0, C) tilted by exp(theta·z/2). The tilted law is
 * N(C theta/2, C) and obeys P(z)/P(−z) = exp(theta·z) exactly (completing the square).
 */
export function tiltedGaussian(rng: Rng, C: number[][], theta: number[], n: number): Float64Array[] {
  const G = cholesky(C);
  const d = C.length;
  const mean = C.map((row) => row.reduce((s, c, j) => s + (c * theta[j]) / 2, 0));
  const out = Array.from({ length: d }, () => new Float64Array(n));
  const z = new Array<number>(d);
  for (let k = 0; k < n; k++) {
    for (let i = 0; i < d; i++) z[i] = rng.normal();
    for (let i = 0; i < d; i++) {
      let v = mean[i];
      for (let j = 0; j <= i; j++) v += G[i][j] * z[j];
      out[i][k] = v;
    }
  }
  return out;
}
