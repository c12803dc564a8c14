import { ConfigError, DataError, formatCellProblems, formatRowNumberedProblems, MAX_REPORTED_PROBLEMS, newProblemLog } from "../../errors.ts";
import type { SamplesDatasetConfig, TraceDatasetConfig } from "../../config/types.ts";
import { readSourceTable } from "../sources/readSourceTable.ts";
import { layoutSettings } from "../sources/layoutSettings.ts";
import { samplesFromColumns } from "../samples.ts";
import type { SamplesDataset, TraceDataset } from "../types.ts";
import { blockLengthFor } from "./blockLength.ts";
import { cutWindows } from "./cutWindows.ts";
import { detectionStatistics } from "./detectionStatistics.ts";
import { detectTransitions } from "./hysteresis.ts";
import { mapJumps, unmappedJumps, unmappedJumpsMessage, unresolvedJumps, type UnmappedJump } from "./transitionMap.ts";
import { quotedCells, writtenCellTexts, type CellTextLookup } from "../cellTexts.ts";
import { stateLabels, undeclaredStates } from "../conductorStates.ts";
import { traceOccupancy } from "./traceOccupancy.ts";

const SECONDS: Record<TraceDatasetConfig["time_unit"], number> = { s: 1, ms: 1e-3, us: 1e-6, "µs": 1e-6, ns: 1e-9, ps: 1e-12 };

/**
 * A `trace` dataset: the conductor's state against time, cut into windows of
 * each declared length; one samples dataset per length (sharing the series
 * named by `series`, or the trace's id), with the states at both ends of every
 * window and blocks of consecutive windows for the block bootstrap. When a
 * jump's lead is declared unresolved, one TraceDataset instead: the time in
 * each state and the jumps out of it, and nothing per lead.
 */
export async function loadTrace(config: TraceDatasetConfig, filePath: string, keyPath: string, auditDir: string): Promise<(SamplesDataset | TraceDataset)[]> {
  const where = `audit.yaml ${keyPath}`;
  const unresolved = unresolvedJumps(config);
  if (config.windows === undefined && unresolved.length === 0) {
    throw new ConfigError(`${where}.windows: is required: list the window lengths (in ${config.time_unit}) to cut the trace into, e.g. windows: [3, 8]`);
  }
  const valueColumn = config.signal === "transitions" ? config.columns.state : config.columns.level;
  if (valueColumn === undefined) {
    throw new DataError(`${where}.columns: signal ${config.signal} needs the ${config.signal === "transitions" ? "state" : "level"} column mapped`);
  }
  if (config.signal === "level" && !config.thresholds) {
    throw new DataError(`${where}.thresholds: signal level needs two thresholds (low, high) and the states below and above them`);
  }
  // Any format the tool reads (text, Parquet, …) through the shared source readers.
  const request = {
    filePath,
    label: config.file,
    auditDir,
    keyPath,
    columns: [
      { role: "time", column: config.columns.time },
      { role: config.signal === "transitions" ? "state" : "level", column: valueColumn },
    ],
    settings: layoutSettings({}),
  };
  const table = await readSourceTable(request);
  const byLine = table.located === "line";
  const lineOf = (i: number) => (byLine ? `line ${table.lineOfRow[i]}` : `row ${table.lineOfRow[i]}`);
  // Messages quote a text file's cells as written (read again, on an error path only); a binary
  // file's cells (Parquet, HDF5, NumPy) have no text and are given as the doubles they store.
  const lookup: CellTextLookup | undefined = byLine ? (problems) => writtenCellTexts(request, problems) : undefined;
  const cellOf = (column: string, values: Float64Array, i: number) => ({ row: table.lineOfRow[i], column, found: values[i] });
  const scale = SECONDS[config.time_unit];
  const rawTime = table.columns.get(config.columns.time)!;
  const rawValue = table.columns.get(valueColumn)!;
  for (let i = 1; i < table.rows; i++) {
    if (rawTime[i] < rawTime[i - 1]) {
      const [now, before] = await quotedCells(lookup, [cellOf(config.columns.time, rawTime, i), cellOf(config.columns.time, rawTime, i - 1)]);
      throw new DataError(`${config.file}, ${lineOf(i)}, column "${config.columns.time}": time ${now} comes before the previous row's ${before}; a trace lists its rows in time order`);
    }
  }
  let times: Float64Array;
  let states: Int32Array;
  let rowOf: (i: number) => string;
  let origin: string;
  if (config.signal === "transitions") {
    // The labels are checked as a samples file's are (integers that a 32-bit state holds), every bad cell at once.
    const problems = newProblemLog();
    stateLabels(rawValue, table.rows, table.lineOfRow, valueColumn, problems);
    if (problems.count > 0) {
      await lookup?.(problems.problems).catch(() => undefined);
      throw new DataError(
        byLine ? formatCellProblems(config.file, problems.problems, MAX_REPORTED_PROBLEMS, problems.count) : formatRowNumberedProblems(config.file, problems.problems, problems.count),
      );
    }
    times = Float64Array.from(rawTime, (t) => t * scale);
    states = Int32Array.from(rawValue);
    rowOf = lineOf;
    origin = `${table.rows} rows of detected states`;
  } else {
    const th = config.thresholds!;
    const detected = detectTransitions(rawTime, rawValue, th.low, th.high, th.states[0], th.states[1]);
    times = Float64Array.from(detected.times, (t) => t * scale);
    states = detected.states;
    rowOf = (i) => lineOf(detected.sampleOf[i]);
    origin = `${table.rows} samples of the detector signal, turned into ${Math.max(0, states.length - 1)} jumps by the thresholds ${th.low} (below: state ${th.states[0]}) and ${th.high} (above: state ${th.states[1]}) with hysteresis`;
  }
  // A detected state comes from a cell of the state column (its first row at `first`, the state left
  // at the row before); a state of the level signal comes from audit.yaml's thresholds, not a cell.
  const namedJumps = async (jumps: UnmappedJump[]): Promise<string[]> => {
    const place = (j: UnmappedJump) => `(first at ${rowOf(j.first)}, column "${valueColumn}")`;
    if (config.signal !== "transitions") return jumps.map((j) => `${j.from} → ${j.to} ${place(j)}`);
    const quoted = await quotedCells(lookup, jumps.flatMap((j) => [cellOf(valueColumn, rawValue, j.first - 1), cellOf(valueColumn, rawValue, j.first)]));
    return jumps.map((j, k) => `${quoted[2 * k]} → ${quoted[2 * k + 1]} ${place(j)}`);
  };
  // States a declared distribution leaves out, each with the first row of the trace in that state.
  const undeclaredMessage = async (missing: number[]): Promise<string> => {
    const firsts = missing.map((l) => states.indexOf(l));
    const quoted = await quotedCells(lookup, firsts.map((i) => cellOf(valueColumn, rawValue, i)));
    const named = missing.map((l, k) => `${l} (first at ${lineOf(firsts[k])}, column "${valueColumn}": ${quoted[k]})`);
    return `${where}.state_distribution: gives no probability for state${missing.length > 1 ? "s" : ""} ${named.join(", ")}, which ${config.file} shows; declare the stationary probability of every state`;
  };
  if (times.length < 2) throw new DataError(`${config.file}: the trace holds ${times.length} known state${times.length === 1 ? "" : "s"}; at least a start and one more row are needed to cut windows`);
  const unmapped = unmappedJumps(config, states);
  if (unmapped.length > 0) throw new DataError(unmappedJumpsMessage(config, await namedJumps(unmapped), where));
  const jumps = mapJumps(config, states);
  const detection = detectionStatistics(times, states, config.bandwidth ?? null, origin);
  if (unresolved.length > 0) {
    // Which lead each particle used is not in the data: no window samples (they would need invented
    // per-lead amounts), only what the trace determines.
    const occupancy = traceOccupancy(times, states);
    return [{ kind: "trace", id: config.id, file: config.file, sha256: table.sha256, rows: table.rows, format: table.format, config, unresolved, ...occupancy, detection }];
  }
  const series = config.series ?? config.id;
  const out: SamplesDataset[] = [];
  for (const [k, length] of config.windows!.entries()) {
    const tau = length * scale;
    const w = cutWindows(times, states, jumps, tau);
    const n = w.start.length;
    if (n < 2) {
      throw new DataError(`${where}.windows[${k}]: ${length} ${config.time_unit} leaves ${n} whole window${n === 1 ? "" : "s"} in a trace of ${(times[times.length - 1] - times[0]) / scale} ${config.time_unit}; choose shorter windows`);
    }
    const samplesConfig: SamplesDatasetConfig = {
      id: windowDatasetId(config.id, length, config.time_unit),
      kind: "samples",
      file: config.file,
      columns: { dE_A: "dE_A", dE_B: "dE_B", dN_A: "dN_A", dN_B: "dN_B", state_start: "state_start", state_end: "state_end" },
      energy_unit: config.energy_unit,
      reference_temperature: config.reference_temperature,
      reservoirs: config.reservoirs as SamplesDatasetConfig["reservoirs"],
      tau,
      work: "measured",
      series,
      state_distribution: config.state_distribution,
    };
    if (config.signal === "transitions" && config.state_distribution) {
      // As conductorStates refuses it, but naming where the trace first shows each such state, as written.
      const labels = [...new Set([...w.start, ...w.end])].sort((a, b) => a - b);
      const missing = undeclaredStates(labels, config.state_distribution);
      if (missing.length > 0) throw new DataError(await undeclaredMessage(missing));
    }
    const lines = Uint32Array.from({ length: n }, (_, i) => i + 1);
    const d = samplesFromColumns(samplesConfig, `${keyPath}.windows[${k}]`, { dE_A: w.dE_A, dE_B: w.dE_B, dN_A: w.dN_A, dN_B: w.dN_B, state_start: w.start, state_end: w.end }, n, lines, table.sha256);
    const block = blockLengthFor([w.dN_B, d.sigma]);
    const blocks = Math.ceil(n / block.length);
    out.push({
      ...d,
      windows: {
        block: Int32Array.from({ length: n }, (_, i) => Math.floor(i / block.length)),
        blocks,
        blockLength: block.length,
        correlationWindows: block.correlation,
        rule: `block length twice the integrated autocorrelation time ${Number(block.correlation.toPrecision(3))} windows of the count and of Σ, at least 2`,
      },
      traceNotes: [detection.sentence],
    });
  }
  return out;
}

/**
 * The id of the samples dataset cut at one window length: `<trace id>-tau-<length><unit>`
 * (`dd3-trace-tau-2p5ns`), within the characters every dataset id uses (letters, digits,
 * '-', '_'), so that result documents and published versions accept it.
 */
export function windowDatasetId(traceId: string, length: number, unit: string): string {
  const digits = String(length).replace(".", "p").replace("e-", "em").replace("e+", "e");
  return `${traceId}-tau-${digits}${unit === "µs" ? "us" : unit}`;
}
