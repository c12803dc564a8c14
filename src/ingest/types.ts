import type { AuditDefinition, CoefficientsDatasetConfig, CumulantsDatasetConfig, SamplesDatasetConfig, TraceDatasetConfig } from "../config/types.ts";
import type { DetectionStatistics } from "./trace/detectionStatistics.ts";
import type { StateOccupancy } from "./trace/traceOccupancy.ts";
import type { Affinities, ReservoirState } from "../physics/affinities.ts";

/** What the provenance table and the result document list for each input file. */
export interface DatasetRecord {
  id: string;
  file: string; // as written in audit.yaml, relative to the audit folder
  sha256: string; // hex digest of the file's bytes
  rows: number; // data rows (header and comment lines excluded)
  /** The file's format as read, for the report: "comma-separated text", "Parquet", … (src/ingest/sources). */
  format?: string;
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
  /**
   * Large files are summarised while they are read: realisations pooled into
   * cells (the arrays above then hold one entry a cell, `weight` its number of
   * realisations). Null when every row is kept as read.
   */
  reduction: SamplesReduction | null;
  /**
   * The conductor's state at the two ends of each realisation (roles state_start, state_end), with the
   * stationary distribution used for the boundary term; absent or null without state columns. Then
   * `sigma` is the total entropy production Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) (physics.md §4b).
   */
  states?: ConductorStates | null;
  /** Particles gained by each lead (roles dN_A, dN_B), when the conductor can hold some; absent or null otherwise. */
  leadParticles?: { A: Float64Array; B: Float64Array } | null;
  /**
   * Realisations that are consecutive windows cut from one trajectory (a `trace` dataset): intervals
   * resample blocks of windows. Absent or null for independent realisations.
   */
  windows?: WindowBlocks | null;
  /** What the trace's detection says about missed events (trace datasets), for the report. */
  traceNotes?: string[];
}

/** The conductor's state at the ends of each realisation and its stationary distribution. */
export interface ConductorStates {
  /** State labels as written in the data, sorted. */
  labels: number[];
  /** Index into `labels` of each row's start and end state. */
  start: Int32Array;
  end: Int32Array;
  /** Stationary probability of each label: estimated from the start states, or declared in audit.yaml. */
  probability: number[];
  source: "estimated" | "declared";
  /** ln p(x₀) − ln p(x_τ) of each row. */
  boundary: Float64Array;
  /** The reservoirs' part Σ_res of each row (k_B). */
  sigmaReservoirs: Float64Array;
}

/** Windows cut from one trajectory, grouped into blocks of consecutive windows for the block bootstrap. */
export interface WindowBlocks {
  /** Block index of each row (windows in time order). */
  block: Int32Array;
  blocks: number;
  /** Windows per block, and the integrated autocorrelation time (in windows) it was chosen from. */
  blockLength: number;
  correlationWindows: number;
  /** How the block length was chosen, for the report. */
  rule: string;
}

/** How a large `samples` file was summarised into cells (src/ingest/reduce). */
export interface SamplesReduction {
  /** Cells kept: the length of the dataset's arrays. */
  cells: number;
  /** Columns forming the cell key, and each one's cell width at the level reached (J; ΔN in counts). */
  steps: Record<string, number>;
  /** Grid level reached: 0 is the finest grid, each level doubles the widths of the continuous columns. */
  level: number;
  /** Largest difference of Σ between two realisations pooled into one cell, k_B (0: only equal rows were pooled). */
  maxSigmaSpread: number;
  /** Fraction of the realisations that share a cell with a realisation of different Σ. */
  pooledFraction: number;
  /** Parts the file was cut into and reduced separately before merging. */
  parts: number;
  /**
   * Within-cell scatter of each pair of currents, "Q,Q", "Q,W", "Q,dN", "W,W", … :
   * Σ_C Σ_{i∈C} w_i (x_i − x̄_C)(y_i − ȳ_C) in SI (J², J, counts²). Second moments
   * computed from the cells' means miss exactly this; `withinCellScatter` in
   * src/checks/helpers.ts adds it back.
   */
  scatter: Record<string, number>;
}

/** Linear-response coefficients at one row of a coefficients table (one operating point at one field). */
export interface CoefficientPoint {
  /** Operating-point coordinates (the `point` columns). */
  point: Record<string, number>;
  /** The file line of the row, as a person counts (header is line 1 unless comments precede it). */
  row: number;
  T: number; // K
  /** Magnetic field in the file's unit (`field_unit`), null when the table has no field column. */
  B: number | null;
  /** Value of the sweep variable (plots' abscissa); the row's line when there is none. */
  sweep: number;
  /**
   * The row's inputs in the dataset's form, SI: L11, L12, … (onsager) or G, S, Pi, K
   * (thermoelectric), with their standard uncertainties (null without u_ columns).
   */
  inputs: { names: string[]; values: number[]; u: number[] | null };
  /** Onsager matrix in Callen's charge–heat form (SI); L[i][j]. */
  L: number[][];
  /** First-order standard uncertainties of the L entries, or null without u_ columns. */
  uL: number[][] | null;
  /** Index in `points` of the row at −B with the same operating point (itself at B = 0); null when unpaired. */
  partner: number | null;
}

/** A row that could not be paired with its time-reversed partner, or a pair that looks wrong. */
export interface PairingFinding {
  kind: "unpaired" | "duplicate" | "temperature-mismatch";
  /** File lines involved. */
  rows: number[];
  point: Record<string, number>;
  B: number | null;
  /** One sentence naming the rows and what is missing. */
  message: string;
}

export interface CoefficientsDataset extends DatasetRecord {
  kind: "coefficients";
  config: CoefficientsDatasetConfig;
  form: "onsager" | "thermoelectric";
  /** Number of fluxes (2 for the charge–heat form). */
  n: number;
  /** Time-reversal parity of each flux (+1 for charge and heat). */
  parity: number[];
  points: CoefficientPoint[];
  /** Index pairs [row at +B, row at −B] (or [i, i] at B = 0 and without a field column), in file order. */
  pairs: [number, number][];
  /** Unpaired rows, duplicates, temperature mismatches: reported, never dropped silently. */
  findings: PairingFinding[];
  hasField: boolean;
  hasUncertainties: boolean;
  /** Column used as the abscissa of plots, null when there is none (then the file line is used). */
  sweepVariable: string | null;
  fieldUnit: string;
  /** Thermoelectric form without a Pi column: Π was set from the Kelvin relation Π(B) = T S(−B). */
  kelvinAssumed: boolean;
  /** Declared unit of each input column as written (SI when not declared). */
  units: Record<string, string>;
  /** Everything else the ingester wants checks to see. */
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

/**
 * A detector trace whose jumps do not say which lead each particle used (a jump declared `lead: unresolved`,
 * as a charge sensor beside a single dot records it). The particles and energy each lead gained are not in
 * the data, so no window samples are built and no check of the exchanged quantities sees this dataset (each
 * reports it not applicable, naming what is missing); what the trace does determine is kept: the time spent
 * in each state, the jumps out of it and its complete stays, and the detector's missed-event statistics.
 */
export interface TraceDataset extends DatasetRecord {
  kind: "trace";
  config: TraceDatasetConfig;
  /** The jumps declared with an unresolved lead, written "0 → 1". */
  unresolved: string[];
  /** Length of the record, s. */
  duration: number;
  /** Per state: time spent, jumps out by destination, complete stays (s). */
  states: StateOccupancy[];
  detection: DetectionStatistics;
}

export type Dataset = SamplesDataset | CoefficientsDataset | CumulantsDataset | TraceDataset;

export interface IngestedAudit {
  dir: string;
  definition: AuditDefinition;
  datasets: Dataset[];
}
