// Runs the command line in a child process of the build benchmark and leaves
// the child's own resource use (peak resident set, CPU) in the file named by
// BENCH_USAGE_FILE, so that the figures are those of the build alone.
import fs from "node:fs";
import { main } from "../src/cli/program.ts";

const usageFile = process.env.BENCH_USAGE_FILE;
const t0 = performance.now();
const code = await main(process.argv.slice(2));
const seconds = (performance.now() - t0) / 1000;
const usage = process.resourceUsage();
if (usageFile) {
  // maxRSS is in kibibytes (getrusage(2)); CPU times in microseconds.
  fs.writeFileSync(usageFile, JSON.stringify({ code, seconds, maxRssKiB: usage.maxRSS, userCpuSeconds: usage.userCPUTime / 1e6, systemCpuSeconds: usage.systemCPUTime / 1e6 }));
}
process.exitCode = code;
