// Speed and memory of a large `samples` audit: 10^7 realisations (W, Q, ΔN) by default, generated once
// into .bench/ (bench/largeSamples.ts), audited by `run`'s pipeline in a child process, side by side with a
// vectorised Python reference (pandas' C reader + numpy, bench/reference.py) on the same file when
// /usr/bin/python3 has pandas (`apt-get install python3-pandas`). BENCH_LARGE_ROWS=1e8 measures the
// bounded-memory case (a ~2 GB file; generation takes minutes the first time).
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { ensureLargeSamplesAudit, largeSamplesFamily } from "./largeSamples.ts";

interface ChildFigures {
  read_seconds: number;
  analysis_seconds: number;
  total_seconds: number;
  peak_rss_mib: number;
  cpu_seconds: number;
  stamp: string;
  statuses: Record<string, string>;
  cells: number | null;
}

function runChild(dir: string): ChildFigures & { wall_seconds: number } {
  const usageFile = path.join(os.tmpdir(), `ta-bench-audit-${process.pid}.json`);
  const t0 = performance.now();
  const child = spawnSync(process.execPath, ["--import", "tsx", path.join("bench", "auditChild.ts"), dir], {
    env: { ...process.env, BENCH_USAGE_FILE: usageFile },
    stdio: ["ignore", "inherit", "inherit"],
  });
  const wall = (performance.now() - t0) / 1000;
  if (child.status !== 0) throw new Error(`audit child exited with ${child.status}`);
  const figures = JSON.parse(fs.readFileSync(usageFile, "utf8")) as ChildFigures;
  fs.rmSync(usageFile, { force: true });
  return { ...figures, wall_seconds: wall };
}

function runPython(csv: string, fit: boolean): Record<string, number> | null {
  const python = "/usr/bin/python3";
  if (!fs.existsSync(python) || spawnSync(python, ["-c", "import pandas, numpy"]).status !== 0) return null;
  const theta = largeSamplesFamily().theta;
  const child = spawnSync(python, [path.join("bench", "reference.py"), csv, String(theta.W), String(theta.Q), String(theta.N), ...(fit ? ["--fit"] : [])], { encoding: "utf8" });
  if (child.status !== 0) throw new Error(`reference.py failed: ${child.stderr}`);
  return JSON.parse(child.stdout.trim().split("\n").pop()!) as Record<string, number>;
}

export async function run(): Promise<Record<string, unknown>> {
  const rows = Number(process.env.BENCH_LARGE_ROWS ?? 1e7);
  const dir = path.resolve(".bench", `large-samples-${rows.toExponential(0).replace("+", "")}`);
  const t0 = performance.now();
  const data = ensureLargeSamplesAudit(dir, rows, (done) => {
    if (process.stderr.isTTY && done % 1_000_000 === 0) process.stderr.write(`\r   generating: ${done.toLocaleString("en-US")} rows`);
  });
  if (data.generated) process.stdout.write(`\n   generated ${data.csv} in ${((performance.now() - t0) / 1000).toFixed(0)} s\n`);
  const mb = data.bytes / 1e6;
  // Page cache: read the file once so both sides start warm.
  spawnSync("cat", [data.csv], { stdio: ["ignore", "ignore", "ignore"] });
  const ours = runChild(dir);
  const reference = rows <= 2e7 ? runPython(data.csv, false) : null;
  const referenceFit = reference ? runPython(data.csv, true) : null;
  const line = (label: string, value: string) => process.stdout.write(`   ${label.padEnd(34)} ${value}\n`);
  line("file", `${mb.toFixed(0)} MB, ${rows.toLocaleString("en-US")} realisations`);
  line("transport-audit wall (child process)", `${ours.wall_seconds.toFixed(2)} s`);
  line("  reading + summarising", `${ours.read_seconds.toFixed(2)} s  (${(mb / ours.read_seconds).toFixed(0)} MB/s, ${(rows / ours.read_seconds / 1e6).toFixed(1)} M realisations/s)`);
  line("  analysis (all checks)", `${ours.analysis_seconds.toFixed(2)} s  (${(ours.analysis_seconds / ours.read_seconds).toFixed(2)} of the reading time; ${ours.cells} cells)`);
  line("  peak memory", `${ours.peak_rss_mib.toFixed(0)} MiB`);
  const cores = os.cpus().length;
  line("  CPU time, all threads", `${ours.cpu_seconds.toFixed(2)} s  (at best ${(ours.cpu_seconds / cores).toFixed(2)} s of wall time on ${cores} cores)`);
  line("  verdicts", `${ours.stamp}: ${Object.entries(ours.statuses).map(([k, v]) => `${k} ${v}`).join(", ")}`);
  if (reference) {
    line("pandas + numpy reference", `${reference.total_seconds.toFixed(2)} s (parse ${reference.parse_seconds.toFixed(2)} s, statistics ${reference.stats_seconds.toFixed(2)} s), peak ${reference.peak_rss_mib.toFixed(0)} MiB`);
    line("ratio (ours / reference, in-process)", (ours.total_seconds / reference.total_seconds).toFixed(2));
    // The floor of the ratio for this work: its CPU time spread perfectly over every core.
    line("  floor of the ratio (CPU time / cores)", (ours.cpu_seconds / cores / reference.total_seconds).toFixed(2));
    if (referenceFit) {
      line("  reference with the logistic fit", `${referenceFit.total_seconds.toFixed(2)} s, peak ${referenceFit.peak_rss_mib.toFixed(0)} MiB`);
      line("  ratio to it", (ours.total_seconds / referenceFit.total_seconds).toFixed(2));
    }
  } else line("pandas + numpy reference", rows > 2e7 ? "not run at this size" : "not run: /usr/bin/python3 lacks pandas (apt-get install python3-pandas)");
  return { rows, megabytes: mb, ours, reference, reference_with_fit: referenceFit, machine: { cpus: os.cpus().length, model: os.cpus()[0]?.model, node: process.version } };
}
