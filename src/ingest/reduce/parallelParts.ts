import os from "node:os";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { ConfigError } from "../../errors.ts";
import { openSource } from "../sources/index.ts";
import type { SourceRequest } from "../sources/types.ts";
import type { SampleRole } from "../samplesRows.ts";
import { startTsWorker } from "../../threads/tsWorker.ts";
import { workerBundle } from "./parallelReduce.ts";
import type { ReduceInput } from "./reduceSamples.ts";
import type { SamplesReductionSpec } from "./samplesSink.ts";
import { reducePart, wholeRows, type PartCells, type SamplesRows } from "./samplesSource.ts";

/**
 * The parts of a multi-part dataset read on a small pool of worker threads.
 * Each worker reads one whole part at a time, through the same source module
 * and the same per-part reader as the sequential loop of samplesSource.ts
 * (whole rows below the size threshold, the part's cell tables on the
 * dataset's one grid above it), and hands back its columns or tables. The
 * main thread then takes the parts in sorted part order, exactly as the
 * sequential loop takes them: rows are concatenated, tables merged, digests
 * listed in that order, so the result is bit for bit the sequential one
 * whichever worker finishes first. A part whose worker fails (a bad cell, a
 * missing column, a truncated file, a worker that could not start) is read
 * again on the main thread, so its error is the sequential reading's own,
 * and the first failing part in part order is the one reported.
 */

/** Names the number of threads for parts (a whole number; 1 reads the parts one after another in this thread). */
export const PARTS_THREADS_ENV = "TRANSPORT_AUDIT_PARTS_THREADS";

/**
 * Below this many bytes of parts in all, the parts are read in this thread.
 * Each worker starts cold: it loads the readers and their packages and its
 * JIT warms up on its own parts, which cost about half a second to a second
 * here before it pays back (bench/partsRead.bench.ts, 8 Parquet parts, two
 * threads on two cores): 1.3 MB took 0.13 s in turn against 0.5–0.7 s on
 * workers, 40 MB 0.67 s against 1.56 s (whole rows) and 1.04 s against 1.51 s
 * (summarised), 134 MB 3.76 s against 2.35 s and 8.5 s against 6.2 s. The
 * gains cross zero near 60–80 MB; 96 MiB leaves a margin for a busier machine.
 */
export const PARALLEL_PARTS_FROM_BYTES = 96 << 20;

/** One part to read, as the worker receives it. */
export interface PartJob {
  request: SourceRequest;
  /** Whole rows (below the size threshold) or the part's cells on `spec`'s grid. */
  mode: "rows" | "cells";
  part: ReduceInput;
  wantOfRole: Partial<Record<SampleRole, number>>;
  spec: SamplesReductionSpec | null;
  cellCapacity?: number;
}

/** What a worker read of one part: the part's columns as the file states them, and its rows or cells. */
export interface PartRead {
  available: string[];
  format: string;
  rows?: SamplesRows;
  cells?: PartCells;
}

/** A worker's answer about part `k`. */
export type PartAnswer = { k: number; ok: true; read: PartRead } | { k: number; ok: false };

/**
 * One part read whole in this thread, its file closed whatever happens: what
 * a worker does, and what the main thread repeats for a part whose worker
 * failed, then with `beforeReading` checking the part's columns and format
 * between opening and reading, where the sequential loop checks them.
 */
export async function readPart(job: PartJob, beforeReading?: (available: string[], format: string) => void): Promise<PartRead> {
  const source = await openSource(job.request);
  try {
    beforeReading?.(source.available, source.format);
    const meta = { available: source.available, format: source.format };
    if (job.mode === "rows") return { ...meta, rows: await wholeRows(source, job.request) };
    // Byte ranges in this thread: the worker is already one of the pool (the same pieces, the same cells).
    return { ...meta, cells: await reducePart(job.part, source, job.wantOfRole, job.spec, { threads: false, cellCapacity: job.cellCapacity }) };
  } finally {
    await source.close();
  }
}

/** The threads a pool for parts may use by default: one a core, at most four (as src/report/auditPool.ts). */
function defaultPartsThreads(): number {
  return Math.min(4, os.availableParallelism());
}

/** TRANSPORT_AUDIT_PARTS_THREADS as a number, undefined when unset. */
function threadsFromEnvironment(): number | undefined {
  const text = process.env[PARTS_THREADS_ENV];
  if (text === undefined || text === "") return undefined;
  const n = Number(text);
  if (!Number.isInteger(n) || n < 1) throw new ConfigError(`${PARTS_THREADS_ENV}: must be a whole number of threads, 1 or more; found ${JSON.stringify(text)}`);
  return n;
}

/**
 * How many worker threads read the parts; below 2 they are read in this
 * thread. A number given (the `partsThreads` option, else
 * TRANSPORT_AUDIT_PARTS_THREADS) is taken as it is, whatever the sizes. By
 * default: one a core, at most four, and only for datasets of at least
 * PARALLEL_PARTS_FROM_BYTES. Never more threads than parts, and none where
 * there are no worker threads (the browser bundle maps node:worker_threads
 * to nothing, as it does for parallelReduce.ts) or `threads: false` asks for
 * this thread.
 */
export function partsThreads(parts: number, bytes: number, options: { partsThreads?: number; threads?: boolean }): number {
  if (options.threads === false || typeof Worker !== "function") return 1;
  const given = options.partsThreads ?? threadsFromEnvironment();
  if (given === undefined && bytes < PARALLEL_PARTS_FROM_BYTES) return 1;
  return Math.min(given ?? defaultPartsThreads(), parts);
}

/** Start a worker on the bundle of partsWorker.ts, or through tsx's loader when there is none. */
async function startPartsWorker(): Promise<Worker> {
  const script = new URL("./partsWorker.ts", import.meta.url);
  const bundle = script.protocol === "file:" && script.pathname.endsWith(".ts") ? await workerBundle(fileURLToPath(script), "parts-worker", { packagesOutside: true }) : null;
  if (bundle) return new Worker(bundle);
  return startTsWorker(new URL("./partsWorker.ts", import.meta.url));
}

/**
 * Every job read on `threads` workers, each taking the next part in part
 * order when it is free. The answer for part k is its read, or null when its
 * worker failed or it was not read (a part after one that failed is not
 * started: the first failure in part order is what the caller reports). All
 * workers are ended before this returns or throws.
 */
export async function readPartsOnWorkers(jobs: PartJob[], threads: number, onPartRead?: (k: number) => void): Promise<(PartRead | null)[]> {
  const reads: (PartRead | null)[] = jobs.map(() => null);
  let next = 0;
  let firstFailure = Infinity;
  const workers: Worker[] = [];
  const serve = async (): Promise<void> => {
    let worker: Worker;
    try {
      worker = await startPartsWorker();
    } catch {
      return; // the parts this worker would have read stay null: the caller reads them itself
    }
    workers.push(worker);
    // Listening at once: an 'error' event with no listener would end the process.
    let dead = false;
    const waiting = new Map<number, (answer: PartAnswer) => void>();
    const failAll = () => {
      dead = true;
      for (const [k, answer] of waiting) answer({ k, ok: false });
      waiting.clear();
    };
    worker.on("message", (answer: PartAnswer) => {
      waiting.get(answer.k)?.(answer);
      waiting.delete(answer.k);
    });
    worker.on("error", failAll);
    worker.on("exit", failAll);
    while (!dead) {
      const k = next++;
      if (k >= jobs.length || k > firstFailure) return;
      const answer = await new Promise<PartAnswer>((resolve) => {
        waiting.set(k, resolve);
        worker.postMessage({ k, job: jobs[k] });
      });
      if (answer.ok) {
        reads[k] = answer.read;
        onPartRead?.(k);
      } else firstFailure = Math.min(firstFailure, k);
    }
  };
  try {
    await Promise.all(Array.from({ length: threads }, serve));
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return reads;
}
