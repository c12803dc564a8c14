// Worker thread of the audit pool (auditPool.ts): runs audit folders one at a time, each through the
// result cache, and answers with the outcome. Input errors come back as messages, any other failure
// as a crash report, so that the pool treats them as the build in one thread would.
import { parentPort, workerData } from "node:worker_threads";
import { InputError } from "../errors.ts";
import { runAuditCached, type CacheUse } from "./resultCache.ts";

const port = parentPort;
if (!port) throw new Error("auditWorker.ts must run in a worker thread");
const { cache } = workerData as { cache: CacheUse };
port.on("message", async (job: { index: number; folder: string }) => {
  try {
    const run = await runAuditCached(job.folder, cache);
    port.postMessage({ index: job.index, outcome: { kind: "run", run } });
  } catch (err) {
    if (err instanceof InputError) port.postMessage({ index: job.index, outcome: { kind: "input-error", message: err.message } });
    else port.postMessage({ index: job.index, outcome: { kind: "crash", message: (err as Error).stack ?? String(err) } });
  }
});
port.postMessage({ ready: true });
