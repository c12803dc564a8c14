// Child process of the quoted-cell benchmark: ingests one audit (reading only, no checks) and prints
// the reading time and the process's peak resident set as JSON.
import { loadAuditDefinition } from "../src/config/loadAudit.ts";
import { ingestDefinition } from "../src/ingest/loadAudit.ts";

const dir = process.argv[2];
const t0 = performance.now();
const audit = await ingestDefinition(dir, loadAuditDefinition(dir));
const t1 = performance.now();
const d = audit.datasets[0];
process.stdout.write(
  `${JSON.stringify({ read_seconds: (t1 - t0) / 1000, peak_rss_mib: process.resourceUsage().maxRSS / 1024, rows: d.rows, summarised: d.kind === "samples" && d.reduction !== null })}\n`,
);
