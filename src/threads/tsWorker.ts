import { Worker } from "node:worker_threads";

/**
 * A worker thread running the TypeScript module `script` through tsx's loader
 * (plain Node cannot load .ts files). It takes about a second to start on this
 * machine class, as tsx transpiles the modules it loads; where that matters, a
 * caller starts the worker on a bundle instead (src/ingest/reduce/parallelReduce.ts).
 */
export function startTsWorker(script: URL, workerData?: unknown): Worker {
  const loader = import.meta.resolve("tsx/esm/api");
  const bootstrap = `import { register } from ${JSON.stringify(loader)}; register(); await import(${JSON.stringify(script.href)});`;
  return new Worker(bootstrap, { eval: true, workerData });
}
