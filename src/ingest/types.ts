import type { AuditDefinition, CoefficientsDatasetConfig, CumulantsDatasetConfig, SamplesDatasetConfig } from "../config/types.ts";
import type { Affinities, ReservoirState } from "../physics/affinities.ts";

/** What the provenance table and the result document list for each input file. */
export interface DatasetRecord {
  id: string;
  file: string; // as written in audit.yaml, relative to the audit folder
  sha256: string; // hex digest of the file's bytes
  rows: number; // data rows (header and comment lines excluded)
}

/**
 * Repeated runs of a contact protocol: one row a realisation (or, with a
 * `count` column, a histogram cell with its multiplicity). All energies in J.
 */
export interface SamplesDataset extends DatasetRecord {
  kind: "samples";
  config: SamplesDatasetConfig;
  /** Work entering Sigma: the measured W, or zeros when `work: zero` is declared. */
  W: Float64Array;
  /** Work found in the data (W column or dE_A + dE_B), null when the data carry none. */
  W_data: Float64Array | null;
  Q: Float64Array;
  dN: Float64Array;
  dE_A: Float64Array | null;
  dE_B: Float64Array | null;
  /** Multiplicity of each row (histogram datasets), null when every row is one realisation. */
  weight: Float64Array | null;
  /** Number of realisations: sum of the weights, or the number of rows. */
  realisations: number;
  /** Entropy production of each row, units of k_B. */
  sigma: Float64Array;
  reservoirs: { A: ReservoirState; B: ReservoirState };
  affinity: Affinities;
  /** Joules per declared energy unit, so checks can present numbers in the user's unit. */
  energyUnit: { name: string; joules: number };
  hasParticleColumn: boolean;
  tau: number | null;
}

/** Linear-response coefficients at operating points (filled by the coefficients ingester). */
export interface CoefficientPoint {
  /** Operating-point coordinates (the `point` columns) and the row they came from. */
  point: Record<string, number>;
  row: number;
  T: number; // K
  B: number | null; // field, in the file's unit
  /** Onsager matrix in Callen's charge–heat form, SI; L[i][j]. */
  L: number[][];
  /** Standard uncertainties of L entries, or null when not given. */
  uL: number[][] | null;
}

export interface CoefficientsDataset extends DatasetRecord {
  kind: "coefficients";
  config: CoefficientsDatasetConfig;
  points: CoefficientPoint[];
  /** Everything the ingester wants checks to see (raw thermoelectric columns, pairing notes, …). */
  extra: Record<string, unknown>;
}

/** Mean transfer against contact time. */
export interface CumulantsDataset extends DatasetRecord {
  kind: "cumulants";
  config: CumulantsDatasetConfig;
  tau: Float64Array; // s
  Q: Float64Array | null; // J
  dN: Float64Array | null;
  u_Q: Float64Array | null;
  u_dN: Float64Array | null;
}

export type Dataset = SamplesDataset | CoefficientsDataset | CumulantsDataset;

export interface IngestedAudit {
  dir: string;
  definition: AuditDefinition;
  datasets: Dataset[];
}
