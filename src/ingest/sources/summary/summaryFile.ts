import fs from "node:fs";
import { createHash } from "node:crypto";
import { DataError } from "../../../errors.ts";
import type { CellTableData } from "../../reduce/cellTable.ts";
import type { SamplesReductionSpec } from "../../reduce/samplesSink.ts";
import type { Located } from "../types.ts";

/**
 * The file `transport-audit summarise` writes: the cell summary of one part
 * of a large `samples` dataset (src/ingest/reduce/cellTable.ts), so that the
 * parts of a dataset can be summarised where they were produced and an audit
 * can name the summaries instead of the raw parts.
 *
 * Layout (our own): a first line naming the format and its version, one line
 * of JSON (the part it came from, the grid, the tables' shapes, the length
 * and SHA-256 of the body), then the body: every table's arrays as
 * little-endian IEEE 754 binary64, in the order `TABLE_ARRAYS` lists them.
 * Binary, because the sums must come back to the last bit (JSON would too,
 * at three times the size and parse time).
 */
export const SUMMARY_MAGIC = "transport-audit cell summary, format 1\n";

/** The file name ending a summary has (the part's own name before it, by default). */
export const SUMMARY_SUFFIX = ".summary";

/** The part a summary was written from. */
export interface SummarySourcePart {
  /** The part's file name as given to `summarise` (its last path component). */
  name: string;
  bytes: number;
  sha256: string;
  /** The format phrase its source gave ("comma-separated text (detected)"). */
  format: string;
  located: Located;
  /** Requested columns as the part names them, in the dataset's role order. */
  names: (string | null)[];
  /** Every column the part has. */
  available: string[];
}

/** What a summary holds: the part, the dataset it was written for, the grid, and the part's cell tables (unmerged). */
export interface PartSummary {
  tool: string;
  dataset: string;
  source: SummarySourcePart;
  spec: SamplesReductionSpec;
  /** Rows read from the part. */
  rows: number;
  /** Pieces the part was reduced in (worker ranges), as `reduction.parts` counts them. */
  pieces: number;
  tables: CellTableData[];
}

/** The arrays of a table in the body, with how many numbers each holds. */
const TABLE_ARRAYS: readonly { name: keyof CellTableData; length: (t: { cells: number }, g: SamplesReductionSpec["grid"]) => number }[] = [
  { name: "keys", length: (t, g) => t.cells * g.dims },
  { name: "count", length: (t) => t.cells },
  { name: "sums", length: (t, g) => t.cells * g.stored },
  { name: "sigmaMin", length: (t) => t.cells },
  { name: "sigmaMax", length: (t) => t.cells },
  { name: "sigmaRef", length: (t) => t.cells },
  { name: "expSum", length: (t) => t.cells },
  { name: "productTotals", length: (_t, g) => g.pairs.length },
];

/** Float64Arrays as lists, and numbers JSON cannot hold (±Infinity, NaN) as strings. */
function toJson(_key: string, value: unknown): unknown {
  if (value instanceof Float64Array) return Array.from(value, (v) => (Number.isFinite(v) ? v : String(v)));
  if (typeof value === "number" && !Number.isFinite(value)) return String(value);
  return value;
}

/** The grid's arrays back as Float64Arrays ("Infinity" as Infinity). */
function numbers(list: unknown, where: string): Float64Array {
  if (!Array.isArray(list)) throw new DataError(`${where}: expected a list of numbers`);
  return Float64Array.from(list, (v) => (typeof v === "number" ? v : Number(v)));
}

/** The bytes of a summary file. */
export function encodeSummary(summary: PartSummary): Buffer {
  if (new Uint8Array(new Float64Array([1]).buffer)[7] !== 0x3f) throw new Error("summaries are written on little-endian machines only");
  const g = summary.spec.grid;
  const pieces: Buffer[] = [];
  for (const table of summary.tables) {
    for (const a of TABLE_ARRAYS) {
      const values = table[a.name] as Float64Array;
      const n = a.length(table, g);
      pieces.push(Buffer.from(values.buffer, values.byteOffset, n * 8));
    }
  }
  const body = Buffer.concat(pieces);
  const header = {
    tool: summary.tool,
    dataset: summary.dataset,
    source: summary.source,
    spec: summary.spec,
    rows: summary.rows,
    pieces: summary.pieces,
    tables: summary.tables.map((t) => ({ level: t.level, cells: t.cells, sorted: t.sorted === true })),
    body: { bytes: body.length, sha256: createHash("sha256").update(body).digest("hex") },
  };
  return Buffer.concat([Buffer.from(SUMMARY_MAGIC), Buffer.from(`${JSON.stringify(header, toJson)}\n`), body]);
}

/** Write a summary file (to a temporary name beside it first, so that a stopped write leaves no partial summary). */
export function writeSummary(file: string, summary: PartSummary): void {
  const temporary = `${file}.partial-${process.pid}`;
  fs.writeFileSync(temporary, encodeSummary(summary));
  fs.renameSync(temporary, file);
}

/** Whether a file's first bytes are a summary's. */
export function isSummaryHead(head: Uint8Array): boolean {
  return Buffer.from(head.subarray(0, SUMMARY_MAGIC.length)).toString("latin1") === SUMMARY_MAGIC;
}

/** A summary from its bytes; `label` names the file in messages. Refuses a damaged or truncated file. */
export function decodeSummary(bytes: Buffer, label: string): PartSummary {
  if (!isSummaryHead(bytes)) {
    throw new DataError(`${label}: is not a summary written by transport-audit summarise (its first line should read ${JSON.stringify(SUMMARY_MAGIC.trim())})`);
  }
  const headerEnd = bytes.indexOf(10, SUMMARY_MAGIC.length);
  if (headerEnd < 0) throw new DataError(`${label}: the summary ends inside its header (the file is truncated)`);
  let header: {
    tool: string;
    dataset: string;
    source: SummarySourcePart;
    spec: SamplesReductionSpec;
    rows: number;
    pieces: number;
    tables: { level: number; cells: number; sorted: boolean }[];
    body: { bytes: number; sha256: string };
  };
  try {
    header = JSON.parse(bytes.subarray(SUMMARY_MAGIC.length, headerEnd).toString("utf8"));
  } catch {
    throw new DataError(`${label}: the summary's header line is not valid JSON (the file is damaged)`);
  }
  const body = bytes.subarray(headerEnd + 1);
  if (body.length !== header.body?.bytes || body.length % 8 !== 0) {
    throw new DataError(`${label}: the summary's cells take ${body.length} bytes, but its header announces ${header.body?.bytes} (the file is truncated or damaged)`);
  }
  const sha256 = createHash("sha256").update(body).digest("hex");
  if (sha256 !== header.body.sha256) throw new DataError(`${label}: the summary's cells do not match the SHA-256 its header records (the file is damaged)`);
  const grid = header.spec.grid;
  const spec: SamplesReductionSpec = {
    ...header.spec,
    grid: {
      ...grid,
      step0: numbers(grid.step0, `${label}: grid.step0`),
      delay: numbers(grid.delay, `${label}: grid.delay`),
      maxColumnLevel: numbers(grid.maxColumnLevel, `${label}: grid.maxColumnLevel`),
    },
  };
  // Copy the body once into an aligned buffer; each array is a view of it.
  const aligned = new Float64Array(body.length / 8);
  new Uint8Array(aligned.buffer).set(body);
  let at = 0;
  const tables = header.tables.map((shape) => {
    const table = { level: shape.level, cells: shape.cells, sorted: shape.sorted } as CellTableData;
    for (const a of TABLE_ARRAYS) {
      const n = a.length(shape, spec.grid);
      (table as unknown as Record<string, Float64Array>)[a.name] = aligned.subarray(at, at + n);
      at += n;
    }
    return table;
  });
  if (at !== aligned.length) throw new DataError(`${label}: the summary's cells do not fill its body as its header describes them (the file is damaged)`);
  return { tool: header.tool, dataset: header.dataset, source: header.source, spec, rows: header.rows, pieces: header.pieces, tables };
}
