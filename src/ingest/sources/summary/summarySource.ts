import fs from "node:fs";
import { DataError } from "../../../errors.ts";
import { sha256OfDescriptor } from "../fileBytes.ts";
import { openDataFile } from "../openDataFile.ts";
import type { OpenSource, SourceRequest } from "../types.ts";
import type { SamplesReductionSpec } from "../../reduce/samplesSink.ts";
import { decodeSummary, SUMMARY_SUFFIX, type PartSummary } from "./summaryFile.ts";

/** An opened summary: the part's columns and format as the summary records them, and its cells. */
export interface OpenSummary extends OpenSource {
  summary: PartSummary;
}

/** Whether a part is a summary (by its name: `summarise` writes `<part>.summary` unless told otherwise). */
export function isSummaryPath(file: string): boolean {
  return file.endsWith(SUMMARY_SUFFIX);
}

/** The part a summary stands for in a dataset's list: its own path without the suffix. */
export function partOfSummary(file: string): string {
  return isSummaryPath(file) ? file.slice(0, -SUMMARY_SUFFIX.length) : file;
}

/**
 * A summary opened through the checked descriptor (openDataFile). It offers
 * the part's column names and format, so that the parts of a dataset are
 * compared alike whether raw or summarised, but no rows: its cells go
 * straight into the merge (src/ingest/reduce/samplesSource.ts).
 */
export function openSummary(request: SourceRequest): OpenSummary {
  const { fd, size } = openDataFile(request.filePath, request.label, request.auditDir);
  try {
    const bytes = Buffer.allocUnsafe(size);
    let got = 0;
    while (got < size) {
      const k = fs.readSync(fd, bytes, got, size - got, got);
      if (k === 0) break;
      got += k;
    }
    const summary = decodeSummary(bytes.subarray(0, got), request.label);
    // The summary's roles must be the dataset's, in its order (the names line up with the request).
    const recorded = Object.keys(summary.spec.roles).join(", ");
    const mapped = request.columns.map((w) => w.role).join(", ");
    if (recorded !== mapped || summary.source.names.length !== request.columns.length) {
      throw new DataError(`${request.label}: the summary maps the roles ${recorded}, but the dataset maps ${mapped}; summarise the part again with this audit.yaml`);
    }
    return {
      label: request.label,
      format: summary.source.format,
      located: summary.source.located,
      names: summary.source.names,
      available: summary.source.available,
      byteSize: size,
      summary,
      // eslint-disable-next-line require-yield
      async *batches() {
        throw new DataError(`${request.label}: is a summary of cells, not a table of rows; only a samples dataset of several parts can name summaries`);
      },
      sha256: async () => sha256OfDescriptor(fd, size),
      close: async () => fs.closeSync(fd),
    };
  } catch (err) {
    fs.closeSync(fd);
    throw err;
  }
}

/** The facts a summary's grid rests on, by name: the dataset's column roles, units, Σ coefficients and the grid itself. */
function gridFacts(spec: SamplesReductionSpec): [string, string][] {
  // Numbers as JavaScript prints them (shortest exact form), ±Infinity by name.
  const json = (v: unknown) =>
    JSON.stringify(v, (_k, x) => (x instanceof Float64Array ? Array.from(x) : typeof x === "number" && !Number.isFinite(x) ? String(x) : x)).replace(/"(-?Infinity)"/g, "$1");
  const g = spec.grid;
  return [
    ["columns", json(spec.roles)],
    ["energy unit (J)", json(spec.joules)],
    ["Σ coefficients (work, Q, ΔN)", json([spec.sigma.cW, spec.sigma.cQ, spec.sigma.cN])],
    ["β̄", json(spec.betaBar)],
    ["key columns", json(spec.keyColumns)],
    ["stored columns", json(spec.storedColumns)],
    ["finest steps", json(g.step0)],
    ["delays", json(g.delay)],
    ["column level limits", json(g.maxColumnLevel)],
    ["capacity", json(g.capacity)],
    ["start level", json(g.startLevel)],
    ["moment pairs", json(g.pairs)],
  ];
}

/**
 * Refuse a summary whose grid is not the one this audit's configuration
 * gives the dataset (another energy unit, other reservoirs or columns, or
 * another tool's grid): its cells could not be merged cell by cell.
 */
export function checkSummaryGrid(summary: PartSummary, expected: SamplesReductionSpec, label: string): void {
  const found = gridFacts(summary.spec);
  const wanted = gridFacts(expected);
  const lines: string[] = [];
  wanted.forEach(([name, v], i) => {
    if (found[i][1] !== v) lines.push(`${name}: the audit gives ${v}, the summary has ${found[i][1]}`);
  });
  if (lines.length > 0) {
    throw new DataError(
      `${label}: was summarised on another grid than this audit gives the dataset (written by transport-audit ${summary.tool} for dataset "${summary.dataset}"), so its cells cannot be merged: ${lines.join("; ")}; summarise the part again with this audit.yaml`,
    );
  }
}

/** SHA-256 of a raw part whose summary stands beside it in the dataset: read through the checked descriptor, not parsed. */
export async function digestOfPart(request: SourceRequest): Promise<string> {
  const { fd, size } = openDataFile(request.filePath, request.label, request.auditDir);
  try {
    return await sha256OfDescriptor(fd, size);
  } finally {
    fs.closeSync(fd);
  }
}

/**
 * Parts in the order they are merged: by the path each stands for (a
 * summary for its part), so that a dataset of summaries merges its cells in
 * the order the raw parts would be read, and a part and its summary are
 * neighbours. Paths compare by code point, as listParts sorts them.
 */
export function inPartOrder<R extends { label: string }>(requests: R[]): R[] {
  const key = (r: R) => partOfSummary(r.label);
  return [...requests].sort((a, b) => (key(a) < key(b) ? -1 : key(a) > key(b) ? 1 : isSummaryPath(a.label) ? 1 : -1));
}
