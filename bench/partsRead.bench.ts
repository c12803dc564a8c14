// Reading a multi-part dataset one part after another in this thread, and on the pool of worker
// threads (src/ingest/reduce/parallelParts.ts): 8 Parquet parts of 10^6 rows × 3 double columns
// (BENCH_PARTS_ROWS changes the rows a part), written with hyparquet-writer into a temporary
// folder, read with loadSamples on the summarised path (the size threshold set to 0, so at any
// BENCH_PARTS_ROWS; at the default size it is the default) and on the exact path (every row kept, the
// size threshold raised), each in turn and on the workers; then 8 parts
// of 10^4 rows, which shows what starting the workers costs when the parts are small (the
// reason for PARALLEL_PARTS_FROM_BYTES). The pool is the default (one a core, at most four).
// The first parallel read, untimed, builds the workers' bundle.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { loadAuditDefinition } from "../src/config/loadAudit.ts";
import type { SamplesDatasetConfig } from "../src/config/types.ts";
import { loadSamples } from "../src/ingest/samples.ts";
import { partsThreads } from "../src/ingest/reduce/parallelParts.ts";
import { rngFromText } from "../src/stats/rng.ts";
import { formatsAudit } from "../test/helpers/formatsAudit.ts";
import { writeSamplesParquet } from "../test/helpers/writeSamplesParquet.ts";

const PARTS = 8;

/** An audit whose dataset is `parts` Parquet parts of `rows` rows each. */
async function partsAudit(root: string, rows: number): Promise<{ dir: string; config: SamplesDatasetConfig; bytes: number }> {
  const rng = rngFromText(`bench parts read ${rows}`);
  const dir = await formatsAudit(root, "parts", ["columns: { Q: Q_meV, dN: n }"], (target) => {
    fs.mkdirSync(target, { recursive: true });
    for (let k = 0; k < PARTS; k++) {
      const columns = { Q_meV: new Float64Array(rows), W: new Float64Array(rows), n: new Float64Array(rows) };
      for (let i = 0; i < rows; i++) {
        columns.Q_meV[i] = rng.normal() * 0.3;
        columns.W[i] = rng.normal() * 0.03;
        columns.n[i] = rng.int(41) - 20;
      }
      writeSamplesParquet(path.join(target, `part-${String(k).padStart(4, "0")}.parquet`), columns);
    }
  });
  const bytes = fs.readdirSync(path.join(dir, "data", "parts")).reduce((a, f) => a + fs.statSync(path.join(dir, "data", "parts", f)).size, 0);
  return { dir, config: loadAuditDefinition(dir).datasets[0] as SamplesDatasetConfig, bytes };
}

/** Seconds loadSamples takes on the audit's parts with `threads` threads (1: in turn, in this thread). */
async function timed(audit: { dir: string; config: SamplesDatasetConfig }, threads: number, exact: boolean): Promise<number> {
  const t0 = performance.now();
  // Each path forced, whatever the size: left to REDUCE_ABOVE_BYTES (64 MiB), the "summarised" read of a
  // smaller BENCH_PARTS_ROWS (40 MB at 3·10^5 rows a part) kept every row, and its figure, set beside the
  // default size's, looked like the summary growing faster than the data (1.04 s → 8.53 s for 3.3× the data).
  await loadSamples(audit.config, path.join(audit.dir, audit.config.file), "datasets[0]", { auditDir: audit.dir, partsThreads: threads, reduceAboveBytes: exact ? Infinity : 0 });
  return (performance.now() - t0) / 1000;
}

export async function run(): Promise<Record<string, unknown>> {
  const rows = Number(process.env.BENCH_PARTS_ROWS ?? 1_000_000);
  const threads = partsThreads(PARTS, Infinity, {});
  const root = fs.mkdtempSync(path.join(os.tmpdir(), "ta-bench-parts-"));
  try {
    const small = await partsAudit(root, 10_000);
    await timed(small, threads, true); // builds the workers' bundle
    const smallInTurn = await timed(small, 1, true);
    const smallOnWorkers = await timed(small, threads, true);
    const large = await partsAudit(root, rows);
    const figures = {
      summarisedInTurn: await timed(large, 1, false),
      summarisedOnWorkers: await timed(large, threads, false),
      exactInTurn: await timed(large, 1, true),
      exactOnWorkers: await timed(large, threads, true),
    };
    const mb = (b: number) => (b / 1e6).toFixed(1);
    process.stdout.write(`   ${PARTS} parts of ${rows} rows (${mb(large.bytes)} MB), ${threads} worker threads:\n`);
    process.stdout.write(`   summarised: in turn ${figures.summarisedInTurn.toFixed(2)} s, on workers ${figures.summarisedOnWorkers.toFixed(2)} s\n`);
    process.stdout.write(`   exact rows: in turn ${figures.exactInTurn.toFixed(2)} s, on workers ${figures.exactOnWorkers.toFixed(2)} s\n`);
    process.stdout.write(`   ${PARTS} parts of 10000 rows (${mb(small.bytes)} MB), exact rows: in turn ${smallInTurn.toFixed(3)} s, on workers ${smallOnWorkers.toFixed(3)} s\n`);
    return { parts: PARTS, rows, threads, megabytes: large.bytes / 1e6, ...figures, small: { rows: 10_000, megabytes: small.bytes / 1e6, inTurn: smallInTurn, onWorkers: smallOnWorkers } };
  } finally {
    fs.rmSync(root, { recursive: true, force: true });
  }
}
