import os from "node:os";
import type { Worker } from "node:worker_threads";
import { InputError } from "../errors.ts";
import { startTsWorker } from "../threads/tsWorker.ts";
import { implementationDigest, runAuditCached, type CachedRun, type CacheUse } from "./resultCache.ts";

/** What running one audit folder gave: its result, or the input error that stopped it. */
export type AuditOutcome = { kind: "run"; run: CachedRun } | { kind: "input-error"; message: string };

/**
 * Archives with fewer audits than this run in this thread: from the sources a
 * worker takes about a second to start (tsx compiles them), more than a dozen
 * small audits take.
 */
export const POOL_FROM_AUDITS = 12;

/** Worker threads a pool uses by default: one a core, at most four. */
export function defaultPoolSize(): number {
  return Math.min(4, os.availableParallelism());
}

/**
 * Run audit folders (each through the result cache) and return their outcomes
 * in folder order. With two or more threads and enough folders, the folders go
 * to worker threads, each taking the next folder when it is free. Every audit
 * is computed from its own folder alone, so the outcomes do not depend on which
 * thread ran what (tested against the one-thread build). `onDone` is told of
 * each finished folder.
 */
export async function runAuditFolders(
  folders: readonly string[],
  cache: CacheUse,
  options: { threads?: number; onDone?: (done: number, total: number, folder: string) => void } = {},
): Promise<AuditOutcome[]> {
  const threads = Math.min(options.threads ?? defaultPoolSize(), folders.length);
  if (threads < 2 || folders.length < POOL_FROM_AUDITS) return runInThisThread(folders, cache, options.onDone);
  return runOnWorkers(folders, cache, threads, options.onDone);
}

/** One folder's outcome, whichever thread runs it; errors other than input errors are thrown. */
export async function auditOutcome(folder: string, cache: CacheUse): Promise<AuditOutcome> {
  try {
    return { kind: "run", run: await runAuditCached(folder, cache) };
  } catch (err) {
    if (!(err instanceof InputError)) throw err;
    return { kind: "input-error", message: err.message };
  }
}

async function runInThisThread(folders: readonly string[], cache: CacheUse, onDone?: (done: number, total: number, folder: string) => void): Promise<AuditOutcome[]> {
  const outcomes: AuditOutcome[] = [];
  for (const folder of folders) {
    outcomes.push(await auditOutcome(folder, cache));
    onDone?.(outcomes.length, folders.length, folder);
  }
  return outcomes;
}

/**
 * A worker on auditWorker.ts: its compiled module in the installed package,
 * the sources through tsx's loader otherwise. Not a bundle: the result cache
 * trusts an entry only if it was written by the same code, which it digests
 * from its own folder (src/ or dist/), and a bundle elsewhere has no such folder.
 * The digest is taken here once and handed to every worker.
 */
function startAuditWorker(cache: CacheUse): Worker {
  return startTsWorker(new URL("./auditWorker.ts", import.meta.url), { cache: { ...cache, implementation: cache.implementation ?? implementationDigest() } });
}

function runOnWorkers(folders: readonly string[], cache: CacheUse, threads: number, onDone?: (done: number, total: number, folder: string) => void): Promise<AuditOutcome[]> {
  const outcomes: (AuditOutcome | undefined)[] = new Array(folders.length);
  const workers = Array.from({ length: threads }, () => startAuditWorker(cache));
  let next = 0;
  let done = 0;
  return new Promise((resolve, reject) => {
    let settled = false;
    const fail = (err: Error) => {
      if (settled) return;
      settled = true;
      for (const w of workers) void w.terminate();
      reject(err);
    };
    // An idle worker waits until every folder is done; then all are stopped together.
    const give = (worker: Worker) => {
      if (next < folders.length) worker.postMessage({ index: next++, folder: folders[next - 1] });
    };
    for (const worker of workers) {
      worker.on("message", (msg: { ready?: true; index?: number; outcome?: AuditOutcome | { kind: "crash"; message: string } }) => {
        if (settled) return;
        if (msg.ready) return give(worker);
        const outcome = msg.outcome!;
        if (outcome.kind === "crash") return fail(new Error(`audit worker failed on ${folders[msg.index!]}: ${outcome.message}`));
        outcomes[msg.index!] = outcome;
        done++;
        onDone?.(done, folders.length, folders[msg.index!]);
        if (done === folders.length) {
          settled = true; // the exits that follow are expected
          for (const w of workers) void w.terminate();
          resolve(outcomes as AuditOutcome[]);
        } else give(worker);
      });
      worker.on("error", fail);
      worker.on("exit", (code) => fail(new Error(`an audit worker stopped with exit code ${code} before the build finished`)));
    }
  });
}
