// Speed of `build` on a large archive: 200 small invented audits (generated
// once into .bench/archive-200/, see bench/archiveGenerator.ts), built cold
// (empty result cache: every audit ingested and checked) and warm (every
// result taken from the cache: what remains is hashing the data files and
// rendering). The cold build runs once in one thread (--threads 1) and once with
// the default worker threads. Each build runs the command line in a child process, whose
// wall time, pages per second and peak memory are reported.
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { ensureBenchArchive, GENERATOR_VERSION } from "./archiveGenerator.ts";
import { resultCacheDir } from "../src/report/resultCache.ts";

const AUDITS = 200;

interface ChildUsage {
  code: number;
  seconds: number;
  maxRssKiB: number;
  userCpuSeconds: number;
  systemCpuSeconds: number;
}

interface BuildFigures {
  exit_status: number;
  wall_seconds: number;
  in_process_seconds: number;
  cpu_seconds: number;
  peak_rss_mib: number;
  pages: number;
  pages_per_second: number;
  audits_from_cache: number;
}

/** Report pages written: every index.html of the site. */
function countPages(dir: string): number {
  return fs
    .readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && e.name === "index.html").length;
}

async function timedBuild(root: string, out: string, extra: string[]): Promise<BuildFigures> {
  const usageFile = path.join(os.tmpdir(), `ta-bench-usage-${process.pid}-${Date.now()}.json`);
  const child = path.join(path.dirname(new URL(import.meta.url).pathname), "buildChild.ts");
  const t0 = performance.now();
  const { code, stderr } = await new Promise<{ code: number; stderr: string }>((resolve, reject) => {
    const p = spawn(process.execPath, ["--import", "tsx", child, "build", "--root", root, "--out", out, ...extra], {
      env: { ...process.env, BENCH_USAGE_FILE: usageFile },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let err = "";
    p.stdout.resume();
    p.stderr.on("data", (d: Buffer) => (err += d.toString()));
    p.on("error", reject);
    p.on("close", (c) => resolve({ code: c ?? -1, stderr: err }));
  });
  const wall = (performance.now() - t0) / 1000;
  if (!fs.existsSync(usageFile)) throw new Error(`the build child wrote no figures (exit ${code}):\n${stderr}`);
  const usage = JSON.parse(fs.readFileSync(usageFile, "utf8")) as ChildUsage;
  fs.rmSync(usageFile, { force: true });
  const pages = countPages(out);
  const fromCache = Number(/(\d+) unchanged audit\(s\) taken from the result cache/.exec(stderr)?.[1] ?? 0);
  return {
    exit_status: code,
    wall_seconds: wall,
    in_process_seconds: usage.seconds,
    cpu_seconds: usage.userCpuSeconds + usage.systemCpuSeconds,
    peak_rss_mib: usage.maxRssKiB / 1024,
    pages,
    pages_per_second: pages / wall,
    audits_from_cache: fromCache,
  };
}

function line(label: string, f: BuildFigures): string {
  return (
    `   ${label}: ${f.wall_seconds.toFixed(1)} s wall (${f.in_process_seconds.toFixed(1)} s in the command, ${f.cpu_seconds.toFixed(1)} s CPU), ` +
    `${f.pages} pages, ${f.pages_per_second.toFixed(1)} pages/s, peak memory ${f.peak_rss_mib.toFixed(0)} MiB, ` +
    `${f.audits_from_cache} audit(s) from the cache, exit status ${f.exit_status}\n`
  );
}

export async function run(): Promise<Record<string, unknown>> {
  const root = path.resolve(".bench", "archive-200");
  const out = path.resolve(".bench", "archive-200-site");
  const g0 = performance.now();
  const generated = await ensureBenchArchive(root, AUDITS, (l) => process.stderr.write(`   ${l}\n`));
  const generationSeconds = (performance.now() - g0) / 1000;
  process.stdout.write(
    generated
      ? `   generated ${AUDITS} audits into ${path.relative(process.cwd(), root)} in ${generationSeconds.toFixed(1)} s\n`
      : `   reusing ${path.relative(process.cwd(), root)} (${GENERATOR_VERSION})\n`,
  );
  fs.rmSync(resultCacheDir(root), { recursive: true, force: true });
  process.stderr.write("   cold builds (empty result cache), one thread and default threads …\n");
  const coldOneThread = await timedBuild(root, out, ["--no-cache", "--threads", "1"]);
  process.stdout.write(line("cold build, one thread", coldOneThread));
  fs.rmSync(resultCacheDir(root), { recursive: true, force: true });
  const cold = await timedBuild(root, out, []);
  process.stdout.write(line("cold build", cold));
  process.stderr.write("   warm build (every result cached) …\n");
  const warm = await timedBuild(root, out, []);
  process.stdout.write(line("warm build", warm));
  if (warm.audits_from_cache < AUDITS) {
    process.stdout.write(`   note: only ${warm.audits_from_cache} of ${AUDITS} results came from the cache (was the tool's code edited between the two builds?)\n`);
  }
  process.stdout.write(`   load average ${os.loadavg().map((x) => x.toFixed(1)).join(" ")} (timings on a busy machine are longer)\n`);
  return {
    archive: { audits: AUDITS, generator: GENERATOR_VERSION, generated_now: generated, generation_seconds: generated ? generationSeconds : null },
    cold_one_thread: coldOneThread,
    cold,
    warm,
    load_average: os.loadavg(),
  };
}
