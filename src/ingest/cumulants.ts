import { ConfigError, DataError, formatCellProblems, type CellProblem } from "../errors.ts";
import type { CumulantsDatasetConfig } from "../config/types.ts";
import type { CumulantRole } from "../config/cumulantsSchema.ts";
import { HBAR } from "../physics/constants.ts";
import { joulesPerEnergyUnit, type EnergyUnit } from "../physics/energyUnits.ts";
import { readNumericCsv, type ColumnRequest } from "./readCsv.ts";
import type { CumulantsDataset } from "./types.ts";

const SECONDS_PER: Record<string, number> = { s: 1, ms: 1e-3, us: 1e-6, "µs": 1e-6, ns: 1e-9, ps: 1e-12, fs: 1e-15 };

const ROLE_MEANING: Record<CumulantRole, string> = {
  tau: "the contact time",
  Q: "the mean energy carried A → B",
  dN: "the mean particles gained by B",
  u_Q: "the standard uncertainty of Q",
  u_dN: "the standard uncertainty of dN",
};

/** Seconds per unit of the time column; ħ/J needs the hopping energy J (Planck constant: CODATA 2018, exact). */
export function secondsPerTimeUnit(config: CumulantsDatasetConfig, joules: number, where: string): number {
  if (config.time_unit !== "hbar/J") return SECONDS_PER[config.time_unit];
  if (config.hopping === undefined) {
    throw new ConfigError(`${where}.hopping: is required when time_unit is hbar/J; give the hopping energy J in ${config.energy_unit}`);
  }
  return HBAR / (config.hopping * joules);
}

function scaled(values: Float64Array | undefined, factor: number): Float64Array | null {
  if (!values) return null;
  return values.map((v) => v * factor);
}

/**
 * Ingest a `cumulants` table: contact time, mean transfers and optional
 * standard uncertainties, converted to s, J and particles and sorted by
 * contact time. Headers default to the role names (`tau`, `Q`, `dN`, `u_Q`,
 * `u_dN`); roles mapped in `columns` must be present.
 */
export async function loadCumulants(config: CumulantsDatasetConfig, filePath: string, keyPath: string): Promise<CumulantsDataset> {
  const where = `audit.yaml ${keyPath}`;
  const mapped = (config.columns ?? {}) as Partial<Record<CumulantRole, string>>;
  const joules = joulesPerEnergyUnit(config.energy_unit as EnergyUnit, config.reference_temperature, `${where}.energy_unit`);
  const seconds = secondsPerTimeUnit(config, joules, where);
  const roles: CumulantRole[] = ["tau", "Q", "dN", "u_Q", "u_dN"];
  const columnOf = (role: CumulantRole) => mapped[role] ?? role;
  const requests: ColumnRequest[] = roles.map((role) => ({
    role: `${role}, ${ROLE_MEANING[role]}`,
    column: columnOf(role),
    optional: role !== "tau" && mapped[role] === undefined,
  }));
  const table = await readNumericCsv(filePath, config.file, requests);
  const col = (role: CumulantRole) => table.columns.get(columnOf(role));
  if (!col("Q") && !col("dN")) {
    throw new DataError(
      `${config.file}: no column for Q or dN; the header has ${table.headers.map((h) => `"${h}"`).join(", ")}; name a mean-transfer column Q or dN, or map one under ${keyPath}.columns`,
    );
  }
  for (const [u, x] of [["u_Q", "Q"], ["u_dN", "dN"]] as const) {
    if (col(u) && !col(x)) throw new DataError(`${config.file}: column "${columnOf(u)}" gives ${ROLE_MEANING[u]}, but there is no column for ${x}`);
  }

  const problems: CellProblem[] = [];
  let count = 0;
  const note = (i: number, role: CumulantRole, message: string) => {
    count++;
    if (problems.length < 20) problems.push({ row: table.lineOfRow[i], column: columnOf(role), message });
  };
  const tauRaw = col("tau")!;
  for (let i = 0; i < table.rows; i++) {
    if (!(tauRaw[i] > 0)) note(i, "tau", `expected a positive contact time, found ${tauRaw[i]}`);
    for (const u of ["u_Q", "u_dN"] as const) {
      const v = col(u)?.[i];
      if (v !== undefined && !(v > 0)) note(i, u, `expected a positive standard uncertainty, found ${v}`);
    }
  }
  if (count) throw new DataError(formatCellProblems(config.file, problems, 20, count));

  const order = Array.from({ length: table.rows }, (_, i) => i).sort((a, b) => tauRaw[a] - tauRaw[b] || a - b);
  for (let k = 1; k < order.length; k++) {
    if (tauRaw[order[k]] === tauRaw[order[k - 1]]) {
      const [a, b] = [order[k - 1], order[k]].sort((p, q) => p - q);
      throw new DataError(
        `${config.file}:${table.lineOfRow[b]}, column "${columnOf("tau")}": contact time ${tauRaw[b]} repeats line ${table.lineOfRow[a]}; give one row per contact time (average repeated runs first)`,
      );
    }
  }
  const sorted = (values: Float64Array | undefined) => (values ? Float64Array.from(order, (i) => values[i]) : undefined);
  return {
    kind: "cumulants",
    id: config.id,
    file: config.file,
    sha256: table.sha256,
    rows: table.rows,
    config,
    tau: scaled(sorted(tauRaw), seconds)!,
    Q: scaled(sorted(col("Q")), joules),
    dN: scaled(sorted(col("dN")), 1),
    u_Q: scaled(sorted(col("u_Q")), joules),
    u_dN: scaled(sorted(col("u_dN")), 1),
  };
}
