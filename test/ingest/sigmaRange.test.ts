import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import h5wasm from "h5wasm/node";
import type { SamplesReadOptions } from "../../src/ingest/samples.ts";
import { DataError } from "../../src/errors.ts";
import { loadSamplesFile } from "../helpers/loadSamplesFile.ts";
import { rejectedWith } from "../helpers/thrown.ts";
import { writeSamplesParquet } from "../helpers/writeSamplesParquet.ts";

/**
 * A realisation's entropy production is refused beyond ±10^6 k_B (src/ingest/samplesRows.ts,
 * SIGMA_LIMIT): more than any realisation of a small conductor produces, so a unit error or a
 * damaged cell (a bound of common practice, stated and argued there). Every way a samples file reaches Σ must refuse the same rows
 * with the same words: the whole-file readers of text, Parquet, HDF5 and NumPy files, and
 * the summary of a large file (one thread or worker threads, plain rows or counted ones).
 *
 * The dataset: energies in units of k_B T₀ with T₀ = 1 K, reservoirs at T_A = 2 K and
 * T_B = 1 K, no work, no particles, so Σ = (β_B − β_A) Q = Q (T₀/T_B − T₀/T_A) = Q/2
 * (physics.md §1; exact but for a rounding or two). Q = ±2.4e6 gives Σ ≈ ±1.2e6, outside;
 * Q = ±1.8e6 gives Σ ≈ ±9e5, inside (and far beyond where e^−Σ leaves double precision).
 */

const ROWS = 40;
/** Q of each row (units of k_B · 1 K): small values, with `outer` at rows 3 and 7 (file rows from 1). */
function heats(outer: number): number[] {
  return Array.from({ length: ROWS }, (_, i) => (i === 2 ? outer : i === 6 ? -outer : ((i % 7) - 3) * 0.5));
}

interface Shape {
  name: string;
  file: string;
  /** Write the Q values (and a count column when asked) into `target`. */
  write(target: string, Q: number[], counted: boolean): Promise<void> | void;
  keys: string;
  /** Where row i (from 0) is in messages: line or row. */
  where(file: string, i: number): string;
}

/** Text with the count column whether it is mapped or not (a delimiter to detect), the first cell quoted if asked. */
const csv = (quoted: boolean) => (target: string, Q: number[]) => {
  const cell = (q: number, i: number) => (quoted && i === 0 ? `"${q}"` : String(q));
  fs.writeFileSync(target, `q,c\n${Q.map((q, i) => `${cell(q, i)},1`).join("\n")}\n`);
};

/** A .npy file (NumPy format 1.0, numpy/lib/format.py): magic, version, header length, a dict, then the values. */
function writeNpy(target: string, Q: number[], counted: boolean): void {
  const descr = counted ? "[('q', '<f8'), ('c', '<f8')]" : "[('q', '<f8')]";
  let header = `{'descr': ${descr}, 'fortran_order': False, 'shape': (${Q.length},), }`;
  // The header, magic and length included, is padded with spaces to a multiple of 64 bytes and ends in a newline.
  header += " ".repeat(64 - ((10 + header.length + 1) % 64)) + "\n";
  const values = new Float64Array(counted ? Q.flatMap((q) => [q, 1]) : Q);
  const head = Buffer.alloc(10);
  Buffer.from([0x93, ...Buffer.from("NUMPY", "latin1"), 1, 0]).copy(head);
  head.writeUInt16LE(header.length, 8);
  fs.writeFileSync(target, Buffer.concat([head, Buffer.from(header, "latin1"), Buffer.from(values.buffer)]));
}

async function writeHdf5(target: string, Q: number[], counted: boolean): Promise<void> {
  await h5wasm.ready;
  const file = new h5wasm.File(target, "w");
  file.create_dataset({ name: "q", data: Float64Array.from(Q) });
  if (counted) file.create_dataset({ name: "c", data: new Float64Array(Q.length).fill(1) });
  file.close();
}

const line = (file: string, i: number) => `${file}:${i + 2}`;
const row = (file: string, i: number) => `${file}, row ${i + 1}`;

const SHAPES: Shape[] = [
  { name: "comma-separated text", file: "runs.csv", write: csv(false), keys: "q", where: line },
  { name: "text with a quoted cell (the general text reader)", file: "runs.csv", write: csv(true), keys: "q", where: line },
  { name: "Parquet", file: "runs.parquet", write: (t, Q, counted) => writeSamplesParquet(t, { q: Float64Array.from(Q), ...(counted ? { c: new Float64Array(Q.length).fill(1) } : {}) }), keys: "q", where: row },
  { name: "NumPy .npy", file: "runs.npy", write: writeNpy, keys: "q", where: row },
  { name: "HDF5, one dataset per column", file: "runs.h5", write: writeHdf5, keys: "/q", where: row },
];

function loadRuns(shape: Shape, Q: number[], options: SamplesReadOptions & { counted?: boolean } = {}) {
  const counted = options.counted ?? false;
  const countKey = shape.keys.startsWith("/") ? "/c" : "c";
  return loadSamplesFile(shape.file, (target) => shape.write(target, Q, counted), [
    `columns: { Q: ${shape.keys}${counted ? `, count: ${countKey}` : ""} }`,
    "energy_unit: kT",
    "reference_temperature: 1.0",
    "reservoirs: { A: { T: 2.0 }, B: { T: 1.0 } }",
    "work: zero",
  ], options);
}

function expected(shape: Shape, column: string): string {
  const fix = "check energy_unit, the reservoirs' temperatures (or β) and chemical potentials, and the row's cells";
  return [3, 7]
    .map(
      (r, k) =>
        `${shape.where(`data/${shape.file}`, r - 1)}, column "${column}": dataset "runs": the entropy production of this row, Σ = ${k ? "-1.20e6" : "1.20e6"} k_B, is beyond ±1e6 k_B, more than any realisation of a small conductor produces (a million electrons at an affinity of 1 k_B each); ${fix}`,
    )
    .join("\n");
}

const PATHS: { name: string; options: SamplesReadOptions & { counted?: boolean } }[] = [
  { name: "read whole", options: { reduceAboveBytes: Infinity } },
  { name: "summarised in this thread", options: { reduceAboveBytes: 0, threads: false } },
  { name: "summarised, with a count column", options: { reduceAboveBytes: 0, threads: false, counted: true } },
];

describe("entropy production per realisation beyond ±10^6 k_B", () => {
  for (const shape of SHAPES) {
    for (const p of PATHS) {
      it(`is refused in ${shape.name}, ${p.name}, naming dataset, file, row and column`, async () => {
        const err = await rejectedWith(DataError, () => loadRuns(shape, heats(2.4e6), p.options));
        expect(err.message).toBe(expected(shape, shape.keys));
      });
    }
  }

  it("is refused the same way by the worker threads that summarise a large text file", async () => {
    const err = await rejectedWith(DataError, () => loadRuns(SHAPES[0], heats(2.4e6), { reduceAboveBytes: 0, threads: true }));
    expect(err.message).toBe(expected(SHAPES[0], "q"));
  });

  it("accepts Σ = ±9e5 k_B, inside, on every path", async () => {
    for (const shape of SHAPES) {
      for (const p of PATHS) {
        const d = await loadRuns(shape, heats(1.8e6), p.options);
        // Σ = Q/2 with Q = 1.8e6: 9e5 to a few roundings of the unit conversions (rtol 1e-12); a summary
        // keeps each cell's mean Σ, within its cell's width of the row's (rtol 1e-3 here).
        const extreme = d.sigma.reduce((m, s) => Math.max(m, Math.abs(s)), 0);
        expect(Math.abs(extreme - 9e5)).toBeLessThan(9e5 * (d.reduction ? 1e-3 : 1e-12));
      }
    }
  });
});
