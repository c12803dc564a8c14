import { Worker } from "node:worker_threads";

/**
 * True when this process runs the compiled JavaScript of the package (dist/,
 * see scripts/build/compile.ts), false when it runs the TypeScript sources
 * through tsx (tests, `npm start`, a clone of the repository).
 */
export const RUNNING_COMPILED = !import.meta.url.endsWith(".ts");

/**
 * A worker thread running the module `script`, given by its source path
 * (`new URL("./worker.ts", import.meta.url)`). In the compiled package the
 * worker runs the compiled file at the same place (`worker.js`) with plain
 * Node and starts in tens of milliseconds: scripts/build/compile.ts makes
 * every module named this way a bundle entry of its own. From the sources it runs through tsx's loader (plain
 * Node cannot load .ts files), which takes about a second on this machine
 * class as tsx transpiles the modules it loads; where that matters, a caller
 * starts the worker on a bundle instead (src/ingest/reduce/parallelReduce.ts).
 */
export function startTsWorker(script: URL, workerData?: unknown): Worker {
  if (RUNNING_COMPILED) return new Worker(compiledUrl(script), { workerData });
  const loader = import.meta.resolve("tsx/esm/api");
  const bootstrap = `import { register } from ${JSON.stringify(loader)}; register(); await import(${JSON.stringify(script.href)});`;
  return new Worker(bootstrap, { eval: true, workerData });
}

/** The compiled module of a source module's URL: the same path with `.js` for `.ts`. */
export function compiledUrl(script: URL): URL {
  return new URL(script.href.replace(/\.ts$/, ".js"));
}
