// Start-up of the command line as users run it: the package is packed (`npm pack` compiles src/ to
// dist/), installed from the tarball into .bench/startup/prefix (reinstalled only when the tarball
// changes), and each command is timed as a fresh process, side by side with `node -e 0` in the same
// run (the floor of any Node program on this machine). Targets of issue 19: --version and --help
// under 0.3 s, `run` on a 40-row coefficient audit under 1 s, on a 10^5-row samples audit under 2 s.
// For `run`, the floors are printed too: loading its modules alone (no audit), loading only the
// packages every audit needs (yaml and zod), and the audit itself (ingest and checks) timed inside
// a process whose modules are loaded; a run cannot be faster than Node's start plus its modules plus
// its audit. BENCH_STARTUP_REPEATS sets the repetitions (median reported; default 5).
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { ensureLargeSamplesAudit } from "./largeSamples.ts";

const REPO = path.resolve(path.dirname(new URL(import.meta.url).pathname), "..");
const HERE = path.resolve(".bench", "startup");
const TIME = "/usr/bin/time";

interface Figure {
  label: string;
  wall: number;
  cpu: number | null;
  target?: number;
  /** Timed inside the process (the audit alone): not comparable with `node -e 0`. */
  inProcess?: boolean;
}

/** Pack the repository and install the tarball into HERE/prefix, unless that very tarball is installed already. */
function installPackage(): string {
  fs.mkdirSync(HERE, { recursive: true });
  const packed = spawnSync("npm", ["pack", "--json", "--pack-destination", HERE], { cwd: REPO, encoding: "utf8" });
  if (packed.status !== 0) throw new Error(`npm pack failed:\n${packed.stderr}`);
  const { filename, integrity } = (JSON.parse(packed.stdout) as { filename: string; integrity: string }[])[0];
  const prefix = path.join(HERE, "prefix");
  const stamp = path.join(HERE, "installed.txt");
  if (!fs.existsSync(stamp) || fs.readFileSync(stamp, "utf8") !== integrity) {
    fs.rmSync(prefix, { recursive: true, force: true });
    const t0 = performance.now();
    const install = spawnSync("npm", ["install", "-g", "--prefix", prefix, "--no-audit", "--no-fund", "--prefer-offline", path.join(HERE, filename)], { encoding: "utf8" });
    if (install.status !== 0) throw new Error(`npm install of the tarball failed:\n${install.stderr}`);
    fs.writeFileSync(stamp, integrity);
    process.stdout.write(`   installed ${filename} in ${((performance.now() - t0) / 1000).toFixed(0)} s\n`);
  }
  return prefix;
}

/** One run of a command: wall seconds, and CPU seconds (user + system) when /usr/bin/time is there. */
function timeOnce(command: string[], cwd: string): { wall: number; cpu: number | null } {
  const useTime = fs.existsSync(TIME);
  const args = useTime ? ["-f", "%U %S", ...command] : command.slice(1);
  const t0 = performance.now();
  const r = spawnSync(useTime ? TIME : command[0], args, { cwd, encoding: "utf8", env: { ...process.env, NO_COLOR: "1" } });
  const wall = (performance.now() - t0) / 1000;
  if (r.status !== 0 && r.status !== 1) throw new Error(`${command.join(" ")} exited with ${r.status}:\n${r.stderr}`);
  if (!useTime) return { wall, cpu: null };
  const [user, system] = r.stderr.trim().split("\n").pop()!.split(" ").map(Number);
  return { wall, cpu: user + system };
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

function measure(label: string, command: string[], cwd: string, repeats: number, target?: number): Figure {
  timeOnce(command, cwd); // page cache and the machine's caches warm, as for a user's second call
  const runs = Array.from({ length: repeats }, () => timeOnce(command, cwd));
  const cpus = runs.map((r) => r.cpu).filter((c): c is number => c !== null);
  return { label, wall: median(runs.map((r) => r.wall)), cpu: cpus.length ? median(cpus) : null, ...(target ? { target } : {}) };
}

/**
 * The audit alone: a fresh process loads runAudit's modules, then times one
 * `runAudit` of `dir` (ingest and checks, what `run` does after its start).
 */
function measureAudit(label: string, installed: string, dir: string, repeats: number): Figure {
  const script = `const { runAudit } = await import(${JSON.stringify(path.join(installed, "dist", "report", "runAudit.js"))});
const t0 = performance.now(); const u0 = process.cpuUsage();
await runAudit(${JSON.stringify(dir)});
const u = process.cpuUsage(u0);
process.stdout.write(JSON.stringify({ wall: (performance.now() - t0) / 1000, cpu: (u.user + u.system) / 1e6 }));`;
  const once = () => {
    const r = spawnSync(process.execPath, ["--input-type=module", "-e", script], { cwd: HERE, encoding: "utf8" });
    if (r.status !== 0) throw new Error(`timing the audit of ${dir} failed:\n${r.stderr}`);
    return JSON.parse(r.stdout) as { wall: number; cpu: number };
  };
  once();
  const runs = Array.from({ length: repeats }, once);
  return { label, wall: median(runs.map((r) => r.wall)), cpu: median(runs.map((r) => r.cpu)), inProcess: true };
}

/** A 40-row coefficient audit: the demo thermoelectric sweep cut to its first 8 gate voltages (5 fields each). */
function coefficientAudit40(): string {
  const dir = path.join(HERE, "coefficients-40");
  const source = path.join(REPO, "audits", "ab2-thermoelectric-field-sweep");
  fs.mkdirSync(path.join(dir, "data"), { recursive: true });
  fs.copyFileSync(path.join(source, "audit.yaml"), path.join(dir, "audit.yaml"));
  const lines = fs.readFileSync(path.join(source, "data", "coefficients.csv"), "utf8").split("\n");
  fs.writeFileSync(path.join(dir, "data", "coefficients.csv"), `${lines.slice(0, 41).join("\n")}\n`);
  return dir;
}

export async function run(): Promise<Record<string, unknown>> {
  const repeats = Number(process.env.BENCH_STARTUP_REPEATS ?? 5);
  const loadBefore = os.loadavg()[0];
  const prefix = installPackage();
  const bin = path.join(prefix, "bin", "transport-audit");
  const installed = path.join(prefix, "lib", "node_modules", "transport-audit");
  const coefficients = coefficientAudit40();
  const samplesDir = path.join(HERE, "samples-1e5");
  ensureLargeSamplesAudit(samplesDir, 1e5);
  const node = process.execPath;
  const loadRun = `await import(${JSON.stringify(path.join(installed, "dist", "cli", "commands", "run.js"))})`;
  // yaml and zod as the installed package resolves them (its own node_modules, or hoisted beside it).
  const packagesOnly = `import { createRequire } from "node:module"; const r = createRequire(${JSON.stringify(path.join(installed, "package.json"))}); await import(r.resolve("yaml")); await import(r.resolve("zod"));`;
  const figures: Figure[] = [
    measure("node -e 0", [node, "-e", "0"], HERE, repeats),
    measure("--version", [bin, "--version"], HERE, repeats, 0.3),
    measure("--help", [bin, "--help"], HERE, repeats, 0.3),
    measure("  (from the sources, through tsx) --version", [node, path.join(REPO, "bin", "transport-audit.js"), "--version"], REPO, Math.min(repeats, 3)),
    measure("  floor: loading yaml and zod only, unbundled", [node, "--input-type=module", "-e", packagesOnly], HERE, repeats),
    measure("  floor: loading run's modules only", [node, "--input-type=module", "-e", loadRun], HERE, repeats),
    measure("run, 40-row coefficient audit", [bin, "run", coefficients], HERE, repeats, 1),
    measureAudit("  floor: its audit alone, in-process", installed, coefficients, repeats),
    measure("run, 10^5-row samples audit", [bin, "run", samplesDir], HERE, repeats, 2),
    measureAudit("  floor: its audit alone, in-process", installed, samplesDir, repeats),
  ];
  const floor = figures[0];
  const ratio = (f: Figure) => (f.inProcess ? "".padStart(17) : `${(f.wall / floor.wall).toFixed(1).padStart(5)}× node -e 0`);
  const line = (f: Figure) =>
    `   ${f.label.padEnd(44)} ${f.wall.toFixed(3).padStart(7)} s wall  ${f.cpu === null ? "" : `${f.cpu.toFixed(2).padStart(5)} s CPU`}  ${ratio(f)}${f.target ? `  (target < ${f.target} s: ${f.wall < f.target ? "met" : "not met"})` : ""}\n`;
  process.stdout.write(`   median of ${repeats} runs each, after one warm-up run; load average before: ${loadBefore.toFixed(2)}\n`);
  for (const f of figures) process.stdout.write(line(f));
  process.stdout.write(`   load average after: ${os.loadavg()[0].toFixed(2)} (figures taken beside other work are not the machine's)\n`);
  return { repeats, loadAverage: os.loadavg()[0], figures: figures.map((f) => ({ ...f, ...(f.inProcess ? {} : { ratio_to_node: f.wall / floor.wall }) })) };
}
