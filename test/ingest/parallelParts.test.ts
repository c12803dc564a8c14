// The parts of a multi-part dataset read on worker threads (src/ingest/reduce/parallelParts.ts) must give
// exactly what reading them one after another gives: the same result document byte for byte below the
// size threshold (whole rows concatenated in part order), the same bits in every array of the cell
// summary above it (tables merged in part order), and, for a bad part, the same message and exit code,
// naming the first bad part in part order, with no file left open. The data are the fixtures of
// scripts/fixtures/write_formats.py (240 realisations, every value a multiple of 1/4), as parts that
// differ from one another (other rows in each), so that parts taken in any other order than part order
// give another result document and other summary bits (other rows in another order, other digests).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createHash } from "node:crypto";
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { loadAuditDefinition } from "../../src/config/loadAudit.ts";
import type { SamplesDatasetConfig } from "../../src/config/types.ts";
import { DataError } from "../../src/errors.ts";
import { PARTS_THREADS_ENV, partsThreads, PARALLEL_PARTS_FROM_BYTES } from "../../src/ingest/reduce/parallelParts.ts";
import { loadSamples } from "../../src/ingest/samples.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { cli } from "../helpers/cliInProcess.ts";
import { commaColumns, FORMAT_FIXTURES, formatsAudit } from "../helpers/formatsAudit.ts";
import { hdf5Parts, npyParts, npzParts } from "../helpers/fixtureParts.ts";
import { rejectedWith } from "../helpers/thrown.ts";
import { writeSamplesParquet } from "../helpers/writeSamplesParquet.ts";

const work = fs.mkdtempSync(path.join(os.tmpdir(), "ta-parallel-parts-"));
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));
afterEach(() => {
  delete process.env[PARTS_THREADS_ENV];
});

const BY_NAME = ["columns: { Q: Q_meV, dN: n }"];

/** A folder of parts: `copies` copies of one fixture, named part-0000… so that part order is copy order. */
function copiesOf(fixture: string, copies: number, replace: Record<number, string> = {}) {
  return (target: string) => {
    fs.mkdirSync(target, { recursive: true });
    const ext = path.extname(fixture);
    for (let k = 0; k < copies; k++) fs.copyFileSync(path.join(FORMAT_FIXTURES, replace[k] ?? fixture), path.join(target, `part-000${k}${ext}`));
  };
}

/** The comma file's 240 rows as four Parquet parts of 60 rows. */
async function parquetParts(target: string): Promise<void> {
  const columns = await commaColumns();
  fs.mkdirSync(target, { recursive: true });
  for (let k = 0; k < 4; k++) {
    const part = Object.fromEntries(Object.entries(columns).map(([name, values]) => [name, values.slice(60 * k, 60 * (k + 1))]));
    writeSamplesParquet(path.join(target, `part-000${k}.parquet`), part);
  }
}

/** The fixtures' three CSV parts and a fourth that repeats the first. */
function csvParts(target: string): void {
  fs.cpSync(path.join(FORMAT_FIXTURES, "parts"), target, { recursive: true });
  fs.copyFileSync(path.join(target, "part-0000.csv"), path.join(target, "part-0003.csv"));
}

interface PartsShape {
  name: string;
  write: (target: string) => Promise<void> | void;
  keys: string[];
}

/** Every shape: four parts, each with other rows (the CSV's fourth part repeats the first, after two others). */
const SHAPES: PartsShape[] = [
  { name: "four CSV parts", write: csvParts, keys: BY_NAME },
  { name: "four Parquet parts", write: parquetParts, keys: BY_NAME },
  { name: "four HDF5 compound tables", write: hdf5Parts("compound", 4), keys: ["dataset: /runs/exchange", ...BY_NAME] },
  { name: "four HDF5 files of 1-D datasets", write: hdf5Parts("columns", 4), keys: ["columns: { Q: /runs/Q, dN: /runs/n }"] },
  { name: "four .npy structured arrays", write: npyParts("structured.npy", 4), keys: BY_NAME },
  { name: "four .npz files of deflated members", write: npzParts("deflated.npz", 4), keys: BY_NAME },
];

/** `run --json`'s document for the audit, with the parts read by `threads` threads (1: one after another, in this thread). */
async function documentWith(dir: string, threads: number): Promise<string> {
  process.env[PARTS_THREADS_ENV] = String(threads);
  const { result } = await runAudit(dir);
  return JSON.stringify(result, null, 2);
}

/**
 * A digest of every value of a dataset, arrays by their bytes (so +0 and −0, and every NaN payload,
 * differ), the rest as JSON: equal digests are equal bits.
 */
function bitsOf(value: unknown): string {
  const hash = createHash("sha256");
  const walk = (v: unknown, at: string): void => {
    if (ArrayBuffer.isView(v)) {
      hash.update(`${at}:${v.constructor.name}:${v.byteLength}\0`);
      hash.update(new Uint8Array(v.buffer, v.byteOffset, v.byteLength));
    } else if (Array.isArray(v)) v.forEach((x, i) => walk(x, `${at}[${i}]`));
    else if (v !== null && typeof v === "object") for (const key of Object.keys(v).sort()) walk((v as Record<string, unknown>)[key], `${at}.${key}`);
    else hash.update(`${at}=${typeof v === "number" && Object.is(v, -0) ? "-0" : JSON.stringify(v)}\0`);
  };
  walk(value, "");
  return hash.digest("hex");
}

/** The dataset summarised into cells (every size above the threshold), its parts read by `threads` threads; the progress calls seen. */
async function summarisedWith(dir: string, threads: number) {
  const config = loadAuditDefinition(dir).datasets[0] as SamplesDatasetConfig;
  const progress: [number, number][] = [];
  const dataset = await loadSamples(config, path.join(dir, config.file), "datasets[0]", {
    auditDir: dir,
    reduceAboveBytes: 0,
    partsThreads: threads,
    onBytes: (done, total) => progress.push([done, total]),
  });
  return { dataset, progress };
}

describe("parts read on worker threads give what reading them in turn gives", () => {
  for (const shape of SHAPES) {
    it(`${shape.name}: the same result document (whole rows), and the same bits of the cell summary`, async () => {
      const dir = await formatsAudit(work, "parts", shape.keys, shape.write);
      const sequential = await documentWith(dir, 1);
      // The CSV parts are the fixture's three of 80 rows and the first again; the others are 240 rows cut in four.
      expect(JSON.parse(sequential).datasets[0].rows).toBe(shape.name.startsWith("four CSV") ? 240 + 80 : 240);
      expect(await documentWith(dir, 3)).toBe(sequential);
      delete process.env[PARTS_THREADS_ENV];

      const inTurn = await summarisedWith(dir, 1);
      const onWorkers = await summarisedWith(dir, 3);
      expect(onWorkers.dataset.reduction).not.toBeNull();
      expect(bitsOf(onWorkers.dataset)).toBe(bitsOf(inTurn.dataset));
      // Progress is reported once a part, as workers hand parts back: four reports, the last one of every byte.
      // None of them comes from this thread's own reading, which would report by batch.
      const total = fs.readdirSync(path.join(dir, "data", "parts")).reduce((a, f) => a + fs.statSync(path.join(dir, "data", "parts", f)).size, 0);
      expect(onWorkers.progress.length).toBe(4);
      expect(onWorkers.progress.at(-1)).toEqual([total, total]);
    }, 120_000);
  }
});

/** Open descriptors of this process (worker threads share them). */
const openFiles = () => fs.readdirSync("/proc/self/fd").length;

/** `run <dir>` through the command line with `threads` threads for parts: its exit code and message. */
async function cliWith(dir: string, threads: number) {
  process.env[PARTS_THREADS_ENV] = String(threads);
  const { code, stderr } = await cli(["run", dir]);
  return { code, stderr };
}

describe("a bad part is reported as reading in turn reports it", () => {
  it("the third of four CSV parts with another column: the same message and exit code, no file left open", async () => {
    const dir = await formatsAudit(work, "parts", BY_NAME, (target) => {
      csvParts(target);
      const text = fs.readFileSync(path.join(target, "part-0002.csv"), "utf8").replace(/^([^\n]*)/, "$1,extra").replace(/\n(?=.)/g, ",0\n").replace(/\n$/, ",0\n");
      fs.writeFileSync(path.join(target, "part-0002.csv"), text);
    });
    const before = openFiles();
    const sequential = await cliWith(dir, 1);
    const parallel = await cliWith(dir, 4);
    expect(openFiles()).toBe(before);
    expect(sequential.stderr).toContain("data/parts/part-0002.csv: its columns");
    expect(parallel).toEqual(sequential);
    expect(parallel.code).not.toBe(0);
  }, 120_000);

  it("a truncated .npy as the third of four parts and a bad one after it: the third is named, as in turn", async () => {
    const dir = await formatsAudit(work, "parts", BY_NAME, copiesOf("structured.npy", 4, { 2: "bad/truncated.npy", 3: "bad/object.npy" }));
    const config = loadAuditDefinition(dir).datasets[0] as SamplesDatasetConfig;
    const read = (threads: number) => loadSamples(config, path.join(dir, config.file), "datasets[0]", { auditDir: dir, partsThreads: threads });
    const before = openFiles();
    const sequential = await rejectedWith(DataError, () => read(1));
    const parallel = await rejectedWith(DataError, () => read(4));
    expect(openFiles()).toBe(before);
    expect(sequential.message).toContain("part-0002.npy");
    expect(parallel.message).toBe(sequential.message);
    expect(parallel.constructor).toBe(sequential.constructor);
  }, 120_000);

  it("a truncated Parquet part on the summarised path: the same message, no file left open", async () => {
    const dir = await formatsAudit(work, "parts", BY_NAME, async (target) => {
      await parquetParts(target);
      const file = path.join(target, "part-0001.parquet");
      const bytes = fs.readFileSync(file);
      fs.writeFileSync(file, bytes.subarray(0, bytes.length - 40));
    });
    const config = loadAuditDefinition(dir).datasets[0] as SamplesDatasetConfig;
    const read = (threads: number) => loadSamples(config, path.join(dir, config.file), "datasets[0]", { auditDir: dir, partsThreads: threads, reduceAboveBytes: 0 });
    const before = openFiles();
    const sequential = await read(1).then(() => null, (err: Error) => err);
    const parallel = await read(4).then(() => null, (err: Error) => err);
    expect(openFiles()).toBe(before);
    expect(sequential).toBeInstanceOf(Error);
    expect(sequential!.message).toContain("part-0001.parquet");
    expect(parallel?.message).toBe(sequential!.message);
    expect(parallel?.constructor).toBe(sequential!.constructor);
  }, 120_000);
});

describe("how many threads read the parts", () => {
  it("stays in this thread for small datasets, for threads: false, and never uses more threads than parts", () => {
    expect(partsThreads(8, PARALLEL_PARTS_FROM_BYTES - 1, {})).toBe(1);
    expect(partsThreads(8, PARALLEL_PARTS_FROM_BYTES, { threads: false })).toBe(1);
    expect(partsThreads(3, 0, { partsThreads: 4 })).toBe(3);
    expect(partsThreads(8, PARALLEL_PARTS_FROM_BYTES, {})).toBe(Math.min(4, os.availableParallelism(), 8));
  });

  it("takes TRANSPORT_AUDIT_PARTS_THREADS when no option is given, and refuses a value that is not a count", () => {
    process.env[PARTS_THREADS_ENV] = "2";
    expect(partsThreads(8, 0, {})).toBe(2);
    expect(partsThreads(8, 0, { partsThreads: 1 })).toBe(1);
    process.env[PARTS_THREADS_ENV] = "two";
    expect(() => partsThreads(8, 0, {})).toThrow('TRANSPORT_AUDIT_PARTS_THREADS: must be a whole number of threads, 1 or more; found "two"');
  });
});
