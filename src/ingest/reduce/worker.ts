// Worker thread of the parallel samples reduction: reduces one byte range of a file and answers
// with its summary; reports bytes read on the way for the progress display.
import { parentPort, workerData } from "node:worker_threads";
import { reduceFileRange } from "./samplesSink.ts";
import type { RangeJob } from "./parallelReduce.ts";

const port = parentPort;
if (!port) throw new Error("worker.ts must run in a worker thread");
const job = workerData as RangeJob;
try {
  let pending = 0;
  const summary = reduceFileRange(job.fd, job.start, job.end, job.layout, job.spec, (n) => {
    pending += n;
    if (pending >= 16 << 20) {
      port.postMessage({ type: "bytes", bytes: pending });
      pending = 0;
    }
  });
  if (pending > 0) port.postMessage({ type: "bytes", bytes: pending });
  const t = summary.table;
  port.postMessage({ type: "done", summary }, [t.keys.buffer, t.count.buffer, t.sums.buffer, t.sigmaMin.buffer, t.sigmaMax.buffer, t.sigmaRef.buffer, t.expSum.buffer, t.productTotals.buffer] as ArrayBuffer[]);
} catch (err) {
  port.postMessage({ type: "error", message: (err as Error).stack ?? String(err) });
}
