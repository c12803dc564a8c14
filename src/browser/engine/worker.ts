import { runAuditFromFiles, type RerunProgress } from "./engine.ts";

/*
 * The re-run as a module Web Worker (bundled into rerun-worker.js by
 * scripts/build/browserBundle.ts). One run at a time.
 *
 * in:  { type: "run", files: [path, ArrayBuffer][] }   paths relative to the audit folder
 *      { type: "cancel" }
 * out: { type: "progress", phase, done, total, label? }
 *      { type: "result", json }                        canonical JSON, as versions/<N>/result.json
 *      { type: "error", message, kind }                kind: the error's class (ConfigError, DataError, …, or Error)
 *      { type: "cancelled" }
 *
 * The checks run synchronously, so a cancel is seen between reading and the
 * checks and between two checks; a page that must stop at once terminates the worker.
 */

export type WorkerRequest = { type: "run"; files: [string, ArrayBuffer][] } | { type: "cancel" };
export type WorkerReply =
  | ({ type: "progress" } & RerunProgress)
  | { type: "result"; json: string }
  | { type: "error"; message: string; kind: string }
  | { type: "cancelled" };

interface MessagePort {
  postMessage(message: WorkerReply): void;
  addEventListener(type: "message", listener: (event: { data: WorkerRequest }) => void): void;
}

let running: AbortController | null = null;

async function run(port: MessagePort, files: [string, ArrayBuffer][]): Promise<void> {
  const controller = new AbortController();
  running = controller;
  try {
    const { json } = await runAuditFromFiles(new Map(files.map(([name, bytes]) => [name, new Uint8Array(bytes)])), {
      signal: controller.signal,
      onProgress: (p) => port.postMessage({ type: "progress", ...p }),
    });
    port.postMessage({ type: "result", json });
  } catch (err) {
    if (controller.signal.aborted) port.postMessage({ type: "cancelled" });
    else port.postMessage({ type: "error", message: err instanceof Error ? err.message : String(err), kind: err instanceof Error ? err.name : "Error" });
  } finally {
    if (running === controller) running = null;
  }
}

/** Answer the page's messages on `port` (the worker's global scope). */
export function serveRerun(port: MessagePort): void {
  port.addEventListener("message", (event) => {
    const request = event.data;
    if (request.type === "cancel") {
      if (running) running.abort();
      else port.postMessage({ type: "cancelled" });
    } else if (request.type === "run") {
      if (running) port.postMessage({ type: "error", message: "a re-run is already in progress in this worker; cancel it first", kind: "Error" });
      else void run(port, request.files);
    }
  });
}

// In a worker (not when Node imports the bundle for tests and the bench), serve the page.
const scope = globalThis as unknown as { WorkerGlobalScope?: unknown } & MessagePort;
if (typeof scope.WorkerGlobalScope === "function") serveRerun(scope);

export { runAuditFromFiles, compareResultJson } from "./engine.ts";
