/// <reference lib="dom" />
/**
 * The engine in a Web Worker (src/browser/engine/worker.ts): the same check
 * code `run` uses, bundled for the browser. One worker per run, ended when the
 * run ends, so nothing of one run's data stays in memory for the next.
 *
 * Messages (the engine's contract): in `{ type: "run", files }` and
 * `{ type: "cancel" }`; out `progress`, `result` (the result document's JSON,
 * the bytes `run --json` prints), `error` and `cancelled`.
 */

export interface EngineProgress {
  phase: "ingest" | "checks" | "done";
  done: number;
  total: number;
  label?: string;
}

/** The engine refused the input (kind "input", the message names file, row and column or key) or failed. */
export class EngineError extends Error {
  constructor(
    message: string,
    readonly kind: string,
  ) {
    super(message);
  }
}

/** The reader cancelled the run. */
export class RunCancelled extends Error {
  constructor() {
    super("cancelled");
  }
}

type WorkerMessage =
  | ({ type: "progress" } & EngineProgress)
  | { type: "result"; json: string }
  | { type: "error"; message: string; kind: string }
  | { type: "cancelled" };

/** How long a cancelled worker may take to confirm before it is ended anyway. */
const CANCEL_GRACE_MS = 1000;

/** Its own buffer for each file, so that it can be handed to the worker without copying. */
function ownBuffer(bytes: Uint8Array): ArrayBuffer {
  const whole = bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength && bytes.buffer instanceof ArrayBuffer;
  return whole ? (bytes.buffer as ArrayBuffer) : (bytes.slice().buffer as ArrayBuffer);
}

/**
 * Run the audit whose files are given (paths relative to the audit folder:
 * "audit.yaml", "data/x.csv") and resolve with the result document's JSON. The
 * files' buffers are transferred to the worker, so the caller must not use them
 * afterwards.
 */
export function runInWorker(workerUrl: string, files: ReadonlyMap<string, Uint8Array>, signal: AbortSignal, onProgress: (p: EngineProgress) => void): Promise<string> {
  return new Promise((resolve, reject) => {
    if (signal.aborted) {
      reject(new RunCancelled());
      return;
    }
    let worker: Worker;
    try {
      worker = new Worker(new URL(workerUrl, document.baseURI), { type: "module" });
    } catch (err) {
      reject(new EngineError(`the checks could not be started in this browser (${(err as Error).message})`, "browser"));
      return;
    }
    let settled = false;
    const finish = (fn: () => void) => {
      if (settled) return;
      settled = true;
      signal.removeEventListener("abort", onAbort);
      worker.terminate();
      fn();
    };
    const onAbort = () => {
      worker.postMessage({ type: "cancel" });
      setTimeout(() => finish(() => reject(new RunCancelled())), CANCEL_GRACE_MS);
    };
    signal.addEventListener("abort", onAbort);
    worker.onmessage = (event: MessageEvent<WorkerMessage>) => {
      const m = event.data;
      if (m.type === "progress") onProgress({ phase: m.phase, done: m.done, total: m.total, ...(m.label ? { label: m.label } : {}) });
      else if (m.type === "result") finish(() => resolve(m.json));
      else if (m.type === "error") finish(() => reject(new EngineError(m.message, m.kind)));
      else if (m.type === "cancelled") finish(() => reject(new RunCancelled()));
    };
    worker.onerror = (event: ErrorEvent) => {
      event.preventDefault();
      finish(() => reject(new EngineError(`the checks stopped in this browser: ${event.message || "the worker script could not be loaded"}`, "browser")));
    };
    const list: [string, ArrayBuffer][] = [...files].map(([p, b]) => [p, ownBuffer(b)]);
    worker.postMessage({ type: "run", files: list }, list.map(([, b]) => b));
  });
}
