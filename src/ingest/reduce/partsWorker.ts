// Worker thread of the parallel reading of a multi-part dataset (parallelParts.ts): reads the parts it
// is sent, one at a time, through the same source modules and per-part readers as the main thread,
// and answers with each part's whole rows or its cell table. A part that fails is answered with
// `ok: false` only: the main thread reads that part again itself, so that its error is thrown exactly
// as the sequential reading throws it (class, message, rows and columns).
import { parentPort } from "node:worker_threads";
import { readPart, type PartAnswer, type PartJob } from "./parallelParts.ts";

const port = parentPort;
if (!port) throw new Error("partsWorker.ts must run in a worker thread");

port.on("message", (msg: { k: number; job: PartJob }) => {
  void readPart(msg.job).then(
    (read) => {
      const answer: PartAnswer = { k: msg.k, ok: true, read };
      try {
        port.postMessage(answer, transferables(read));
      } catch {
        port.postMessage(answer); // a buffer that cannot be moved (pooled) is copied instead
      }
    },
    () => port.postMessage({ k: msg.k, ok: false } satisfies PartAnswer),
  );
});

/** The buffers behind every typed array in `value` (each once): moved to the main thread, not copied. */
function transferables(value: unknown, found = new Set<ArrayBuffer>()): ArrayBuffer[] {
  if (ArrayBuffer.isView(value)) {
    if (value.buffer instanceof ArrayBuffer && !Buffer.isBuffer(value)) found.add(value.buffer);
  } else if (Array.isArray(value)) for (const v of value) transferables(v, found);
  else if (value !== null && typeof value === "object") for (const v of Object.values(value)) transferables(v, found);
  return [...found];
}
