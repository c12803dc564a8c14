import { ConfigError, DataError, formatCellProblems, formatRowNumberedProblems, MAX_REPORTED_PROBLEMS, type CellProblem } from "../errors.ts";
import type { CumulantsDatasetConfig } from "../config/types.ts";
import type { CumulantRole } from "../config/cumulantsSchema.ts";
import { HBAR } from "../physics/constants.ts";
import { joulesPerEnergyUnit, type EnergyUnit } from "../physics/energyUnits.ts";
import { quotedCells } from "./cellTexts.ts";
import { readNumericCsv, type ColumnRequest, type TableReader } from "./readCsv.ts";
import { agreedUnit, unitStatements } from "./sources/fileEnergyUnit.ts";
import type { SourceTable } from "./sources/readSourceTable.ts";
import { requirePositions } from "./sources/positionalColumns.ts";
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

/** A standard uncertainty whose variance u² and weight 1/u² are both finite, non-zero doubles. */
function isUsableVariance(u: number): boolean {
  const v = u * u;
  return v >= Number.MIN_VALUE * 2 ** 52 && Number.isFinite(v) && Number.isFinite(1 / v);
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
export async function loadCumulants(
  config: CumulantsDatasetConfig,
  filePath: string,
  keyPath: string,
  read: TableReader = (requests) => readNumericCsv(filePath, config.file, requests),
): Promise<CumulantsDataset> {
  const where = `audit.yaml ${keyPath}`;
  const mapped = (config.columns ?? {}) as Partial<Record<CumulantRole, string | number>>;
  const roles: CumulantRole[] = ["tau", "Q", "dN", "u_Q", "u_dN"];
  // A column by name, or by 1-based position in a file without a header (named "2" in messages, as the sources name it).
  const columnOf = (role: CumulantRole) => String(mapped[role] ?? role);
  requirePositions(config.header, [{ key: "columns.tau", column: mapped.tau ?? "tau", example: "columns: { tau: 1 }" }], where);
  if (config.header === false && mapped.Q === undefined && mapped.dN === undefined) {
    throw new ConfigError(`${where}.columns: the file has no header row (header: false), so map Q or dN (or both) to their 1-based positions, e.g. columns: { tau: 1, Q: 2 }`);
  }
  const requests: ColumnRequest[] = roles.map((role) => ({
    role: `${role}, ${ROLE_MEANING[role]}`,
    column: mapped[role] ?? role,
    optional: role !== "tau" && mapped[role] === undefined,
  }));
  const table: Awaited<ReturnType<TableReader>> & { units?: SourceTable["units"]; located?: SourceTable["located"] } = await read(requests);
  // Without energy_unit: the unit the file states for Q and u_Q (HDF5 `units` attributes), else J.
  const stated = config.energy_unit === undefined ? agreedUnit(unitStatements({ columns: requests.map((r, i) => ({ ...r, role: roles[i] })), label: config.file }, table.units, ["Q", "u_Q"]), false, keyPath) : null;
  config = { ...config, energy_unit: config.energy_unit ?? stated?.unit ?? "J" };
  const joules = joulesPerEnergyUnit(config.energy_unit as EnergyUnit, config.reference_temperature, `${where}.energy_unit`);
  const seconds = secondsPerTimeUnit(config, joules, where);
  const col = (role: CumulantRole) => table.columns.get(columnOf(role));
  if (!col("Q") && !col("dN")) {
    throw new DataError(
      `${config.file}: no column for Q or dN; the header has ${table.headers.map((h) => `"${h}"`).join(", ")}; name a mean-transfer column Q or dN, or map one under ${keyPath}.columns`,
    );
  }
  for (const [u, x] of [["u_Q", "Q"], ["u_dN", "dN"]] as const) {
    if (col(u) && !col(x)) throw new DataError(`${config.file}: column "${columnOf(u)}" gives ${ROLE_MEANING[u]}, but there is no column for ${x}`);
  }

  // A problem is worded once the cells it names are known as the file writes them: `1.0e-3` is not
  // shown as 0.001, nor `1.50` as 1.5 (text files are read again for them, on this error path only).
  // A binary file's cell (Parquet, HDF5, NumPy) has no text: it is given as the double it stores.
  const pending: { i: number; role: CumulantRole; cells: CumulantRole[]; word: (quoted: string[]) => string }[] = [];
  let count = 0;
  const note = (i: number, role: CumulantRole, cells: CumulantRole[], word: (quoted: string[]) => string) => {
    count++;
    if (pending.length < MAX_REPORTED_PROBLEMS) pending.push({ i, role, cells, word });
  };
  const byRow = table.located === "row";
  const cellOf = (i: number, role: CumulantRole) => ({ row: table.lineOfRow[i], column: columnOf(role), found: col(role)![i] });
  const refusal = async (): Promise<DataError> => {
    const quoted = await quotedCells(table.cellTexts, pending.flatMap((p) => p.cells.map((role) => cellOf(p.i, role))));
    let k = 0;
    const problems: CellProblem[] = pending.map((p) => ({ row: table.lineOfRow[p.i], column: columnOf(p.role), message: p.word(quoted.slice(k, (k += p.cells.length))) }));
    // A binary file has no lines: its rows are counted from 1 (`data/curve.parquet, row 14, column …`).
    return new DataError(byRow ? formatRowNumberedProblems(config.file, problems, count) : formatCellProblems(config.file, problems, MAX_REPORTED_PROBLEMS, count));
  };
  const tauRaw = col("tau")!;
  const factorOf: Record<"u_Q" | "u_dN", number> = { u_Q: joules, u_dN: 1 };
  for (let i = 0; i < table.rows; i++) {
    if (!(tauRaw[i] > 0)) note(i, "tau", ["tau"], ([t]) => `expected a positive contact time, found ${t}`);
    else if (!(tauRaw[i] * seconds > 0)) note(i, "tau", ["tau"], ([t]) => `contact time ${t} ${config.time_unit} is 0 s in double precision; give it in a larger time unit`);
    for (const u of ["u_Q", "u_dN"] as const) {
      const v = col(u)?.[i];
      if (v === undefined) continue;
      if (!(v > 0)) note(i, u, [u], ([w]) => `expected a positive standard uncertainty, found ${w}`);
      else if (!isUsableVariance(v * factorOf[u])) {
        // The fit weights each row by 1/u² (in SI units); a square that underflows to 0 or overflows cannot weight anything.
        const side = (v * factorOf[u]) ** 2 > 0 ? "beyond" : "below";
        note(i, u, [u], ([w]) => `standard uncertainty ${w} cannot weight the fit: its square in SI units is ${side} the range of double precision`);
      }
    }
  }
  if (count) throw await refusal();

  // The linear-growth fit forms sums of t², x² and (x/u)² over the rows (Bevington & Robinson, Data Reduction
  // and Error Analysis, 3rd ed., §6.3): values whose squares overflow double precision cannot be fitted.
  const n = table.rows;
  const squares = (x: number) => Number.isFinite(x * x * n);
  for (let i = 0; i < n; i++) {
    if (!squares(tauRaw[i] * seconds)) {
      note(i, "tau", ["tau"], ([t]) => `contact time ${t} ${config.time_unit} is beyond the range a least-squares fit can square in double precision; check the time unit`);
    }
    for (const [x, u, factor] of [["Q", "u_Q", joules], ["dN", "u_dN", 1]] as const) {
      const v = col(x)?.[i];
      if (v === undefined) continue;
      const w = col(u)?.[i];
      if (!squares(v * factor)) note(i, x, [x], ([m]) => `mean transfer ${m} is beyond the range a least-squares fit can square in double precision; check the unit`);
      else if (w !== undefined && !squares((v * factor) / (w * factor))) {
        const ratio = (v / w).toPrecision(3);
        note(i, x, [x, u], ([m, s]) => `mean transfer ${m} is ${ratio} times its standard uncertainty ${s}, beyond what a weighted fit can square in double precision; check the value and its uncertainty`);
      }
    }
  }
  if (count) throw await refusal();

  const order = Array.from({ length: table.rows }, (_, i) => i).sort((a, b) => tauRaw[a] - tauRaw[b] || a - b);
  for (let k = 1; k < order.length; k++) {
    if (tauRaw[order[k]] === tauRaw[order[k - 1]]) {
      const [a, b] = [order[k - 1], order[k]].sort((p, q) => p - q);
      // Two cells written differently (`1.0`, `1.00`) can be the same double: both are quoted then.
      const [here, there] = await quotedCells(table.cellTexts, [cellOf(b, "tau"), cellOf(a, "tau")]);
      throw new DataError(
        `${config.file}${byRow ? ", row " : ":"}${table.lineOfRow[b]}, column "${columnOf("tau")}": contact time ${here} repeats ${byRow ? "row" : "line"} ${table.lineOfRow[a]}${there === here ? "" : ` (written ${there} there)`}; give one row per contact time (average repeated runs first)`,
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
    ...(stated && table.format ? { format: `${table.format}; ${stated.statement}` } : {}),
  };
}
