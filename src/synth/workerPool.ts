import os from "node:os";
import type { Worker } from "node:worker_threads";
import { startTsWorker } from "../threads/tsWorker.ts";
import { blockRng, blockRunner, TASK_COLUMNS, type BlockTask } from "./blockTask.ts";

/**
 * Run a block-sampling task on worker threads (or in this thread for small
 * jobs) and gather the columns in block order. Deterministic: block b is
 * seeded from (seed, b) whichever thread draws it.
 */
export interface PoolOptions {
  /** Worker threads; 0 runs in this thread. Default: available cores, at most blocks. */
  workers?: number;
  /** Realisations per block (default 500). */
  blockSize?: number;
  /** Called after each finished block with realisations done and total. */
  onProgress?: (done: number, total: number) => void;
}

/** Start a worker that runs worker.ts. */
function startWorker(): Worker {
  return startTsWorker(new URL("./worker.ts", import.meta.url));
}

/** The same blocks drawn in this thread, synchronously (small jobs, scripts that cannot await). */
export function runBlocksInThread(task: BlockTask, total: number, seed: string, blockSize = 500): Float64Array[] {
  const blocks = Math.ceil(total / blockSize);
  const ncol = TASK_COLUMNS[task.kind].length;
  const out = Array.from({ length: ncol }, () => new Float64Array(total));
  const run = blockRunner(task);
  for (let b = 0; b < blocks; b++) {
    const columns = run(blockRng(seed, b), Math.min(blockSize, total - b * blockSize));
    for (let c = 0; c < ncol; c++) out[c].set(columns[c], b * blockSize);
  }
  return out;
}

export async function runBlocks(task: BlockTask, total: number, seed: string, options: PoolOptions = {}): Promise<Float64Array[]> {
  const blockSize = options.blockSize ?? 500;
  const blocks = Math.ceil(total / blockSize);
  const sizeOf = (b: number) => Math.min(blockSize, total - b * blockSize);
  const ncol = TASK_COLUMNS[task.kind].length;
  const out = Array.from({ length: ncol }, () => new Float64Array(total));
  let done = 0;
  const store = (b: number, columns: Float64Array[]) => {
    for (let c = 0; c < ncol; c++) out[c].set(columns[c], b * blockSize);
    done += columns[0].length;
    options.onProgress?.(done, total);
  };
  const workers = Math.min(options.workers ?? os.availableParallelism(), blocks);
  if (workers <= 1) {
    const run = blockRunner(task);
    for (let b = 0; b < blocks; b++) store(b, run(blockRng(seed, b), sizeOf(b)));
    return out;
  }
  let next = 0;
  await new Promise<void>((resolve, reject) => {
    let finished = 0;
    let failed = false;
    const pool: Worker[] = [];
    const stopAll = () => Promise.all(pool.map((w) => w.terminate()));
    const dispatch = (w: Worker) => {
      if (next < blocks) {
        const b = next++;
        w.postMessage({ type: "block", block: b, count: sizeOf(b) });
      }
    };
    for (let i = 0; i < workers; i++) {
      const w = startWorker();
      pool.push(w);
      w.on("message", (msg: { type: string; block?: number; columns?: Float64Array[]; message?: string }) => {
        if (failed) return;
        if (msg.type === "ready") return dispatch(w);
        if (msg.type === "error") {
          failed = true;
          void stopAll();
          return reject(new Error(`sampling worker failed: ${msg.message}`));
        }
        store(msg.block!, msg.columns!);
        if (++finished === blocks) {
          void stopAll().then(() => resolve());
        } else dispatch(w);
      });
      w.on("error", (err) => {
        if (failed) return;
        failed = true;
        void stopAll();
        reject(err);
      });
      w.postMessage({ type: "task", task, seed });
    }
  });
  return out;
}
