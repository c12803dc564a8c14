// Worker thread of the audit pool (auditPool.ts): runs audit folders one at a time, each through the
// result cache, and answers with the outcome (auditOutcome, as in one thread); any other failure
// comes back as a crash report, which stops the build as it would in one thread.
import { parentPort, workerData } from "node:worker_threads";
import { auditOutcome } from "./auditPool.ts";
import type { CacheUse } from "./resultCache.ts";

const port = parentPort;
if (!port) throw new Error("auditWorker.ts must run in a worker thread");
const { cache } = workerData as { cache: CacheUse };
port.on("message", async (job: { index: number; folder: string }) => {
  try {
    port.postMessage({ index: job.index, outcome: await auditOutcome(job.folder, cache) });
  } catch (err) {
    port.postMessage({ index: job.index, outcome: { kind: "crash", message: (err as Error).stack ?? String(err) } });
  }
});
port.postMessage({ ready: true });
