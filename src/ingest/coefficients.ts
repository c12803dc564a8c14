/**
 * Ingest a `coefficients` dataset: a table of linear-response coefficients at
 * operating points, in Callen's charge–heat (Onsager) form `L11 L12 L21 L22`
 * (up to 9×9 as `L<i><j>`) or in thermoelectric form `G S Pi K`, each with
 * optional standard uncertainties `u_<name>`. Values are converted to SI with
 * the declared per-column units, and rows at +B are paired with the row at −B
 * that has the same operating point.
 *
 * Pairing problems are *findings*, not errors: a sweep with one missing −B
 * row can still be audited everywhere else (positivity and figures of merit
 * need no partner), and refusing the whole file would hide those results.
 * They are never dropped silently: every unpaired or duplicated row is listed
 * with its file line, and the reciprocity check cannot pass while any remains,
 * because the relation is then untested at that point. Only when a row cannot
 * be given coefficients at all (thermoelectric form without Π, at B ≠ 0,
 * without its −B partner to supply Π(B) = T S(−B)) is the input refused.
 */
import { ConfigError, DataError, formatCellProblems, MAX_REPORTED_PROBLEMS, newProblemLog, recordProblem } from "../errors.ts";
import type { CoefficientsDatasetConfig } from "../config/types.ts";
import { nearest } from "../config/nearest.ts";
import { parseUnit, siUnitOf, toSI, type ParsedUnit, type QuantityKey } from "../physics/units.ts";
import { onsagerFromThermoelectric } from "../physics/thermoelectric.ts";
import { readNumericCsv, type ColumnRequest, type NumericTable, type TableReader } from "./readCsv.ts";
import { requirePositions, type NamedColumn } from "./sources/positionalColumns.ts";
import type { CoefficientPoint, CoefficientsDataset, PairingFinding } from "./types.ts";

const MAX_FLUXES = 9;
const THERMOELECTRIC = ["G", "S", "Pi", "K"] as const;
/** Paired rows whose temperatures differ by more than this fraction are reported. */
const TEMPERATURE_TOLERANCE = 1e-3;

const onsagerRole = (i: number, j: number) => `L${i + 1}${j + 1}`;

function knownRoles(form: CoefficientsDatasetConfig["form"]): string[] {
  const names: string[] = [];
  if (form === "thermoelectric") names.push(...THERMOELECTRIC);
  else for (let i = 0; i < MAX_FLUXES; i++) for (let j = 0; j < MAX_FLUXES; j++) names.push(onsagerRole(i, j));
  return [...names, ...names.map((n) => `u_${n}`)];
}

/** role → column (a name, or a 1-based position without a header), validating the `columns:` map against the roles of the form. */
function columnMapper(config: CoefficientsDatasetConfig, where: string): (role: string) => string | number {
  const roles = knownRoles(config.form);
  const map = config.columns ?? {};
  for (const key of Object.keys(map)) {
    if (!roles.includes(key)) {
      const hint = nearest(key, roles);
      throw new ConfigError(
        `${where}.columns.${key}: ${JSON.stringify(key)} is not a column role of the ${config.form} form${hint ? ` (did you mean ${hint}?)` : ""}; roles: ${config.form === "thermoelectric" ? "G, S, Pi, K" : "L11, L12, … L99"} and their u_ uncertainties`,
      );
    }
  }
  return (role) => map[role] ?? role;
}

/** Names of the form's value columns present in the table, in matrix order. */
function valueRoles(config: CoefficientsDatasetConfig, table: NumericTable, col: (r: string) => string): { names: string[]; n: number } {
  const has = (role: string) => table.columns.has(col(role));
  if (config.form === "thermoelectric") {
    return { names: THERMOELECTRIC.filter((r) => r !== "Pi" || has("Pi")), n: 2 };
  }
  let n = 0;
  while (n < MAX_FLUXES && has(onsagerRole(n, n))) n++;
  const expected: string[] = [];
  for (let i = 0; i < Math.max(n, 2); i++) for (let j = 0; j < Math.max(n, 2); j++) expected.push(onsagerRole(i, j));
  const missing = expected.filter((r) => !has(r));
  if (n < 2 || missing.length > 0) {
    throw new DataError(
      `${config.file}: the onsager form needs the ${Math.max(n, 2)}×${Math.max(n, 2)} matrix columns ${expected.map((r) => col(r)).join(", ")}; missing: ${missing.map((r) => col(r)).join(", ")}`,
    );
  }
  const extra: string[] = [];
  for (let i = 0; i < MAX_FLUXES; i++) for (let j = 0; j < MAX_FLUXES; j++) if ((i >= n || j >= n) && has(onsagerRole(i, j))) extra.push(col(onsagerRole(i, j)));
  if (extra.length > 0) {
    throw new DataError(`${config.file}: columns ${extra.join(", ")} lie outside the ${n}×${n} matrix given by the diagonal L11 … L${n}${n}; add the missing diagonal entries or remove them`);
  }
  return { names: expected, n };
}

/**
 * Parse `units:`; keys must be value columns of the form, and a map must give the unit of
 * every value column the table has (`names`): a column left out would otherwise be read as
 * SI without anyone having said so (a Π in µV taken for volts is off by 10^6).
 */
function parseUnits(config: CoefficientsDatasetConfig, names: readonly string[], n: number, col: (role: string) => string, where: string): Map<string, ParsedUnit> {
  const units = new Map<string, ParsedUnit>();
  const allowed = config.form === "thermoelectric" ? [...THERMOELECTRIC] : n === 2 ? ["L11", "L12", "L21", "L22"] : [];
  const onlyTwoByTwo = `units are accepted only for the 2×2 charge–heat matrix (L11 in S K, L12 and L21 in A K, L22 in W K); give the ${n}×${n} entries in SI and drop units`;
  const map = config.units === "SI" ? {} : (config.units ?? {});
  for (const [key, text] of Object.entries(map)) {
    if (!allowed.includes(key)) {
      const why =
        allowed.length === 0
          ? onlyTwoByTwo
          : `${JSON.stringify(key)} is not a value column of the ${config.form} form; units apply to ${allowed.join(", ")} (u_ columns take the unit of their value column)`;
      throw new ConfigError(`${where}.units.${key}: ${why}`);
    }
    units.set(key, parseUnit(text, key as QuantityKey, `${where}.units.${key}`));
  }
  if (config.units === undefined || config.units === "SI") return units;
  if (allowed.length === 0) throw new ConfigError(`${where}.units: ${onlyTwoByTwo}`);
  const missing = names.filter((role) => !units.has(role));
  if (missing.length > 0) {
    const columns = missing.map((role) => JSON.stringify(col(role))).join(", ");
    const si = missing.map((role) => `${role} in ${siUnitOf(role as QuantityKey)}`).join(", ");
    throw new ConfigError(
      `${where}.units: gives no unit for ${missing.join(", ")} (column${missing.length > 1 ? "s" : ""} ${columns} of ${config.file}); a map of units must give the unit of every coefficient column the table has, so that none is taken for SI unsaid: add ${missing.length > 1 ? "them" : "it"} (in SI: ${si}), or write units: SI when every column is in SI units`,
    );
  }
  return units;
}

interface RawRow {
  index: number;
  line: number;
  point: Record<string, number>;
  T: number;
  B: number | null;
}

function pointText(point: Record<string, number>): string {
  const parts = Object.entries(point).map(([k, v]) => `${k} = ${v}`);
  return parts.length ? parts.join(", ") : "the only operating point";
}

/**
 * Pair rows at +B with rows at −B that share the operating point (exact
 * equality of the `point` columns and of |B|). Rows at B = 0, and every row
 * when there is no field column, are their own partners.
 */
export function pairRows(
  rows: readonly RawRow[],
  hasPointColumns: boolean,
  fieldUnit: string,
): { partner: (number | null)[]; pairs: [number, number][]; findings: PairingFinding[] } {
  const partner: (number | null)[] = rows.map(() => null);
  const findings: PairingFinding[] = [];
  const groups = new Map<string, number[]>();
  for (const r of rows) {
    const key = JSON.stringify([Object.values(r.point), r.B === null ? null : Math.abs(r.B)]);
    const g = groups.get(key);
    if (g) g.push(r.index);
    else groups.set(key, [r.index]);
  }
  const fieldText = (B: number) => `B = ${B} ${fieldUnit}`;
  for (const members of groups.values()) {
    const first = rows[members[0]];
    const B = first.B;
    if (B === null || B === 0) {
      for (const i of members) partner[i] = i;
      if (members.length > 1 && hasPointColumns) {
        findings.push({
          kind: "duplicate",
          rows: members.map((i) => rows[i].line),
          point: first.point,
          B,
          message: `rows ${members.map((i) => rows[i].line).join(", ")} repeat the operating point ${pointText(first.point)}${B === 0 ? " at B = 0" : ""}; each is audited on its own`,
        });
      }
      continue;
    }
    const plus = members.filter((i) => (rows[i].B as number) > 0);
    const minus = members.filter((i) => (rows[i].B as number) < 0);
    if (plus.length === 1 && minus.length === 1) {
      partner[plus[0]] = minus[0];
      partner[minus[0]] = plus[0];
      const Tp = rows[plus[0]].T;
      const Tm = rows[minus[0]].T;
      if (Math.abs(Tp - Tm) > TEMPERATURE_TOLERANCE * (Tp + Tm) / 2) {
        findings.push({
          kind: "temperature-mismatch",
          rows: [rows[plus[0]].line, rows[minus[0]].line],
          point: first.point,
          B: Math.abs(B),
          message: `rows ${rows[plus[0]].line} and ${rows[minus[0]].line} (${pointText(first.point)}, ±${Math.abs(B)} ${fieldUnit}) were measured at ${Tp} K and ${Tm} K; they are paired at their mean temperature`,
        });
      }
      continue;
    }
    const lines = members.map((i) => rows[i].line);
    if (plus.length > 1 || minus.length > 1) {
      findings.push({
        kind: "duplicate",
        rows: lines,
        point: first.point,
        B: Math.abs(B),
        message: `rows ${lines.join(", ")} give ${plus.length} row(s) at ${fieldText(Math.abs(B))} and ${minus.length} at ${fieldText(-Math.abs(B))} for ${pointText(first.point)}; with more than one candidate none is paired — keep one row per field sign (or average repeats before auditing)`,
      });
    } else {
      const have = plus.length === 1 ? Math.abs(B) : -Math.abs(B);
      findings.push({
        kind: "unpaired",
        rows: lines,
        point: first.point,
        B: have,
        message: `row ${lines[0]} (${pointText(first.point)}, ${fieldText(have)}) has no partner at ${fieldText(-have)}; measure that point at the reversed field to test reciprocity there`,
      });
    }
  }
  const pairs: [number, number][] = [];
  rows.forEach((r, i) => {
    const p = partner[i];
    if (p === null) return;
    if (p === i) pairs.push([i, i]);
    else if ((r.B as number) > 0) pairs.push([i, p]);
  });
  return { partner, pairs, findings };
}

/** First-order standard uncertainties of Callen's L from those of G, S, Π, K (T exact). */
function onsagerUncertainty(v: { G: number; S: number; Pi: number; K: number }, u: { G: number; S: number; Pi: number; K: number }, T: number): number[][] {
  const { G, S, Pi } = v;
  const T2 = T * T;
  return [
    [T * u.G, T2 * Math.hypot(S * u.G, G * u.S)],
    [T * Math.hypot(Pi * u.G, G * u.Pi), T2 * Math.sqrt(u.K ** 2 + (S * Pi * u.G) ** 2 + (G * Pi * u.S) ** 2 + (G * S * u.Pi) ** 2)],
  ];
}

/** The columns a coefficients table must have, with the keys that name them (for a file without a header, which needs positions). */
function requiredColumns(config: CoefficientsDatasetConfig, ref: (role: string) => string | number): NamedColumn[] {
  const roles = config.form === "thermoelectric" ? ["G", "S", "K"] : ["L11", "L12", "L21", "L22"];
  const out: NamedColumn[] = roles.map((r, k) => ({ key: `columns.${r}`, column: ref(r), example: `columns: { ${r}: ${k + 2} }` }));
  if ("column" in config.temperature) out.push({ key: "temperature.column", column: config.temperature.column, example: "temperature: { column: 1 }" });
  if (config.field) out.push({ key: "field.column", column: config.field.column, example: "field: { column: 1 }" });
  config.point.forEach((p, k) => out.push({ key: `point[${k}]`, column: p, example: "point: [1]" }));
  if (config.sweep_variable !== undefined) out.push({ key: "sweep_variable", column: config.sweep_variable, example: "sweep_variable: 1" });
  return out;
}

export async function loadCoefficients(
  config: CoefficientsDatasetConfig,
  filePath: string,
  keyPath: string,
  read: TableReader = (requests) => readNumericCsv(filePath, config.file, requests),
): Promise<CoefficientsDataset> {
  const where = `audit.yaml ${keyPath}`;
  const ref = columnMapper(config, where);
  // Columns as the table keys them: names, or positions as "2" (as every source names them without a header).
  const col = (role: string) => String(ref(role));
  requirePositions(config.header, requiredColumns(config, ref), where);
  const fieldUnit = config.field_unit ?? "T";

  // Request every column the form may use; which ones exist decides the matrix size and the uncertainties.
  const requests: ColumnRequest[] = [];
  const requested = new Set<string>();
  const request = (column: string | number, role: string, optional: boolean) => {
    if (requested.has(String(column))) return;
    requested.add(String(column));
    requests.push({ column, role, optional });
  };
  if (config.form === "thermoelectric") {
    for (const r of THERMOELECTRIC) request(ref(r), r === "Pi" ? "the Peltier coefficient Pi" : `the coefficient ${r}`, r === "Pi");
    for (const r of THERMOELECTRIC) request(ref(`u_${r}`), `the standard uncertainty of ${r}`, true);
  } else {
    for (let i = 0; i < MAX_FLUXES; i++) for (let j = 0; j < MAX_FLUXES; j++) request(ref(onsagerRole(i, j)), `the Onsager entry ${onsagerRole(i, j)}`, true);
    for (let i = 0; i < MAX_FLUXES; i++) for (let j = 0; j < MAX_FLUXES; j++) request(ref(`u_${onsagerRole(i, j)}`), `the standard uncertainty of ${onsagerRole(i, j)}`, true);
  }
  if ("column" in config.temperature) request(config.temperature.column, "the temperature (kelvin)", false);
  if (config.field) request(config.field.column, "the magnetic field", false);
  for (const p of config.point) request(p, "an operating-point coordinate", false);
  if (config.sweep_variable) request(config.sweep_variable, "the sweep variable", false);

  const table = await read(requests);
  const { names, n } = valueRoles(config, table, col);
  const units = parseUnits(config, names, n, col, where);

  // Uncertainties: all of the form's value columns, or none.
  const uPresent = names.filter((r) => table.columns.has(col(`u_${r}`)));
  if (uPresent.length > 0 && uPresent.length < names.length) {
    const absent = names.filter((r) => !uPresent.includes(r));
    throw new DataError(
      `${config.file}: uncertainty columns are incomplete: found ${uPresent.map((r) => col(`u_${r}`)).join(", ")} but not ${absent.map((r) => col(`u_${r}`)).join(", ")}; give a u_ column for every coefficient, or none`,
    );
  }
  const hasUncertainties = uPresent.length > 0;

  const parity = config.parity ?? new Array<number>(n).fill(1);
  if (parity.length !== n) {
    throw new ConfigError(`${where}.parity: lists ${parity.length} parities but the matrix has ${n} fluxes; give one +1 or -1 per flux`);
  }

  // Per-cell checks: T > 0, u ≥ 0; gathered before failing.
  const problems = newProblemLog();
  const problem = (i: number, column: string, message: string, found: number) => recordProblem(problems, table.lineOfRow[i], column, message, found);
  const Tcol = "column" in config.temperature ? table.columns.get(String(config.temperature.column))! : null;
  const Tvalue = "value" in config.temperature ? config.temperature.value : Number.NaN;
  for (let i = 0; i < table.rows; i++) {
    if (Tcol && !(Tcol[i] > 0)) problem(i, String((config.temperature as { column: string | number }).column), "expected a positive temperature in kelvin", Tcol[i]);
    if (hasUncertainties) {
      for (const r of names) {
        const u = table.columns.get(col(`u_${r}`))![i];
        if (u < 0) problem(i, col(`u_${r}`), "expected a standard uncertainty ≥ 0", u);
      }
    }
  }
  if (problems.count > 0) {
    // The cells as the file writes them (text files), on this error path only; the numbers read otherwise.
    await table.cellTexts?.(problems.problems).catch(() => undefined);
    throw new DataError(formatCellProblems(config.file, problems.problems, MAX_REPORTED_PROBLEMS, problems.count));
  }

  const si = (role: string, i: number, uncertainty = false): number => {
    const raw = table.columns.get(col(uncertainty ? `u_${role}` : role))![i];
    return toSI(raw, units.get(role) ?? null);
  };

  const Bcol = config.field ? table.columns.get(String(config.field.column))! : null;
  const sweepColumn = config.sweep_variable ?? config.point[0] ?? null;
  const raw: RawRow[] = [];
  for (let i = 0; i < table.rows; i++) {
    const point: Record<string, number> = {};
    for (const p of config.point) point[p] = table.columns.get(String(p))![i];
    raw.push({ index: i, line: table.lineOfRow[i], point, T: Tcol ? Tcol[i] : Tvalue, B: Bcol ? Bcol[i] : null });
  }
  const { partner, pairs, findings } = pairRows(raw, config.point.length > 0, fieldUnit);

  const kelvinAssumed = config.form === "thermoelectric" && !names.includes("Pi");
  const points: CoefficientPoint[] = raw.map((r, i) => {
    const sweep = sweepColumn !== null ? table.columns.get(String(sweepColumn))![i] : r.line;
    if (config.form === "onsager") {
      const values = names.map((role) => si(role, i));
      const u = hasUncertainties ? names.map((role) => si(role, i, true)) : null;
      const L = Array.from({ length: n }, (_, a) => values.slice(a * n, (a + 1) * n));
      const uL = u ? Array.from({ length: n }, (_, a) => u.slice(a * n, (a + 1) * n)) : null;
      return { point: r.point, row: r.line, T: r.T, B: r.B, sweep, inputs: { names, values, u }, L, uL, partner: partner[i] };
    }
    const v = { G: si("G", i), S: si("S", i), Pi: 0, K: si("K", i) };
    const uv = hasUncertainties ? { G: si("G", i, true), S: si("S", i, true), Pi: 0, K: si("K", i, true) } : null;
    if (!kelvinAssumed) {
      v.Pi = si("Pi", i);
      if (uv) uv.Pi = si("Pi", i, true);
    } else {
      // Π(B) = T S(−B) (Onsager 1931; Casimir 1945): the partner's S, or the row's own at B = 0.
      const p = partner[i];
      if (p === null) {
        throw new DataError(
          `${config.file}:${r.line}: there is no Pi column, so Π(B) must come from the Kelvin relation Π(B) = T S(−B), but this row (${pointText(r.point)}, B = ${r.B} ${fieldUnit}) has no partner row at the reversed field; add a Pi column or the missing row`,
        );
      }
      v.Pi = r.T * si("S", p);
      if (uv) uv.Pi = r.T * si("S", p, true);
    }
    const L = onsagerFromThermoelectric(v, r.T);
    return {
      point: r.point,
      row: r.line,
      T: r.T,
      B: r.B,
      sweep,
      inputs: { names: [...THERMOELECTRIC], values: [v.G, v.S, v.Pi, v.K], u: uv ? [uv.G, uv.S, uv.Pi, uv.K] : null },
      L,
      uL: uv ? onsagerUncertainty(v, uv, r.T) : null,
      partner: partner[i],
    };
  });

  const declaredUnits: Record<string, string> = {};
  for (const role of config.form === "thermoelectric" ? THERMOELECTRIC : names) {
    declaredUnits[role] = units.get(role)?.text ?? "SI";
  }

  return {
    kind: "coefficients",
    id: config.id,
    file: config.file,
    sha256: table.sha256,
    rows: table.rows,
    config,
    form: config.form,
    n,
    parity,
    points,
    pairs,
    findings,
    hasField: config.field !== undefined,
    hasUncertainties,
    sweepVariable: sweepColumn === null ? null : String(sweepColumn),
    fieldUnit,
    kelvinAssumed,
    units: declaredUnits,
    extra: {},
  };
}
