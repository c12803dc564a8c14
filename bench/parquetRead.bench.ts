// Read speed of the Parquet samples reader: a file of 10^6 rows × 3 double columns (the size
// of a large `samples` dataset; BENCH_PARQUET_ROWS changes it), written with hyparquet-writer
// (SNAPPY pages, row groups of 2^20 rows) into a temporary folder, then streamed with
// readParquetColumns three times (the first pass includes the JIT warming up) and read
// whole once with readParquetTable (which also hashes the file).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { readParquetColumns, readParquetTable } from "../src/ingest/parquet/index.ts";
import { rngFromText } from "../src/stats/rng.ts";
import { writeSamplesParquet } from "../test/helpers/writeSamplesParquet.ts";

export async function run(): Promise<Record<string, unknown>> {
  const rows = Number(process.env.BENCH_PARQUET_ROWS ?? 1_000_000);
  const rng = rngFromText("bench parquet read");
  const columns = { Q: new Float64Array(rows), W: new Float64Array(rows), dN: new Float64Array(rows) };
  for (let i = 0; i < rows; i++) {
    columns.Q[i] = rng.normal() * 1e-21;
    columns.W[i] = rng.normal() * 1e-22;
    columns.dN[i] = rng.int(41) - 20;
  }
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-bench-parquet-"));
  const file = path.join(dir, "samples.parquet");
  try {
    writeSamplesParquet(file, columns);
    const megabytes = fs.statSync(file).size / 1e6;
    const passes: { seconds: number; mbPerSecond: number; rowsPerSecond: number }[] = [];
    for (let pass = 0; pass < 3; pass++) {
      const t0 = performance.now();
      let seen = 0;
      for await (const batch of readParquetColumns(file, "samples.parquet", ["Q", "W", "dN"])) seen += batch.rows;
      const seconds = (performance.now() - t0) / 1000;
      if (seen !== rows) throw new Error(`read ${seen} rows, wrote ${rows}`);
      passes.push({ seconds, mbPerSecond: megabytes / seconds, rowsPerSecond: rows / seconds });
    }
    const t1 = performance.now();
    await readParquetTable(file, "samples.parquet", ["Q", "W", "dN"]);
    const tableSeconds = (performance.now() - t1) / 1000;
    for (const [i, p] of passes.entries()) {
      process.stdout.write(`   stream pass ${i + 1}: ${p.seconds.toFixed(3)} s, ${p.mbPerSecond.toFixed(0)} MB/s, ${(p.rowsPerSecond / 1e6).toFixed(2)} M rows/s\n`);
    }
    process.stdout.write(`   readParquetTable (with SHA-256): ${tableSeconds.toFixed(3)} s\n`);
    return { rows, columns: 3, megabytes, passes, tableSeconds };
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
