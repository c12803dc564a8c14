// Worker thread for the block samplers: receives one task, then block
// numbers, and answers each with the block's columns (transferred, not copied).
import { parentPort } from "node:worker_threads";
import { blockRng, blockRunner, type BlockRunner, type BlockTask } from "./blockTask.ts";

type Message = { type: "task"; task: BlockTask; seed: string } | { type: "block"; block: number; count: number };

let runner: BlockRunner | null = null;
let seed = "";
const port = parentPort;
if (!port) throw new Error("worker.ts must run in a worker thread");
port.on("message", (msg: Message) => {
  try {
    if (msg.type === "task") {
      runner = blockRunner(msg.task);
      seed = msg.seed;
      port.postMessage({ type: "ready" });
      return;
    }
    if (!runner) throw new Error("block requested before the task");
    const columns = runner(blockRng(seed, msg.block), msg.count);
    port.postMessage({ type: "block", block: msg.block, columns }, columns.map((c) => c.buffer as ArrayBuffer));
  } catch (err) {
    port.postMessage({ type: "error", message: (err as Error).stack ?? String(err) });
  }
});
