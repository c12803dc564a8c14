// Child process of the large-samples benchmark: ingests one audit and runs its checks, timing the two
// apart, and writes the figures (with the process's peak resident set and the audit's CPU time, worker
// threads included) as JSON to the file named by BENCH_USAGE_FILE.
import fs from "node:fs";
import { loadAuditDefinition } from "../src/config/loadAudit.ts";
import { ingestDefinition } from "../src/ingest/loadAudit.ts";
import { runChecks, resultDocumentOf } from "../src/report/runAudit.ts";

const dir = process.argv[2];
const usage0 = process.resourceUsage();
const t0 = performance.now();
const definition = loadAuditDefinition(dir);
const audit = await ingestDefinition(dir, definition);
const t1 = performance.now();
const checks = runChecks(audit);
const result = resultDocumentOf(audit, checks);
const t2 = performance.now();
const usage = process.resourceUsage();
const d = audit.datasets[0];
fs.writeFileSync(
  process.env.BENCH_USAGE_FILE!,
  JSON.stringify({
    read_seconds: (t1 - t0) / 1000,
    analysis_seconds: (t2 - t1) / 1000,
    total_seconds: (t2 - t0) / 1000,
    peak_rss_mib: usage.maxRSS / 1024,
    // CPU time of the audit alone (all threads), without the loading of the code before t0.
    cpu_seconds: (usage.userCPUTime + usage.systemCPUTime - usage0.userCPUTime - usage0.systemCPUTime) / 1e6,
    stamp: result.stamp,
    statuses: Object.fromEntries(checks.map((c) => [c.check, c.status])),
    cells: d.kind === "samples" ? d.sigma.length : null,
  }),
);
