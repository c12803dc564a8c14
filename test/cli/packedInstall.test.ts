// The package as users get it: packed with `npm pack` (which compiles src/ to dist/), installed from
// the tarball into a private prefix (`npm install -g --prefix`), and run from there with plain Node:
// no TypeScript tooling, no file of the repository. A file missing from `files` or `bin`, a module
// left uncompiled or a worker that still wants the sources fails here. Slow (a real install from the
// npm registry or its cache): generous time limits, and no timing is asserted.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { auditYaml, makeTempArchive } from "../archive/tempArchive.ts";
import { commaColumns, formatsAudit } from "../helpers/formatsAudit.ts";
import { writeSamplesParquet } from "../helpers/writeSamplesParquet.ts";
import { runAudit } from "../../src/report/runAudit.ts";

const REPO = path.resolve(import.meta.dirname, "..", "..");
const MINUTES = 60_000;

const work = fs.mkdtempSync(path.join(os.tmpdir(), "ta-packed-"));
const prefix = path.join(work, "prefix");
const installed = path.join(prefix, "lib", "node_modules", "transport-audit");
const bin = path.join(prefix, "bin", "transport-audit");
let installLog = "";

function npm(args: string[], cwd: string) {
  const r = spawnSync("npm", args, { cwd, encoding: "utf8", env: { ...process.env, NO_COLOR: "1", npm_config_update_notifier: "false" } });
  if (r.status !== 0) throw new Error(`npm ${args.join(" ")} exited with ${r.status}:\n${r.stdout}\n${r.stderr}`);
  return r;
}

/** The installed command, run with a PATH that holds Node's folder only (no npx, no tsx). */
function installedCli(args: string[], cwd = work) {
  const r = spawnSync(bin, args, { cwd, encoding: "utf8", env: { PATH: path.dirname(process.execPath), HOME: work, NO_COLOR: "1" } });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(() => {
  const packed = JSON.parse(npm(["pack", "--json", "--pack-destination", work], REPO).stdout) as { filename: string }[];
  const tarball = path.join(work, packed[0].filename);
  installLog = npm(["install", "-g", "--prefix", prefix, "--no-audit", "--no-fund", "--prefer-offline", tarball], work).stderr;
}, 30 * MINUTES);

describe("the installed package", () => {
  it("installs without engine warnings and without the TypeScript tooling or the sources", () => {
    expect(installLog).not.toContain("EBADENGINE");
    expect(fs.existsSync(path.join(installed, "dist", "cli", "main.js"))).toBe(true);
    expect(fs.existsSync(path.join(installed, "src"))).toBe(false);
    expect(fs.existsSync(path.join(installed, "bench"))).toBe(false);
    expect(fs.existsSync(path.join(installed, "node_modules", "tsx"))).toBe(false);
    expect(fs.existsSync(path.join(installed, "node_modules", "typescript"))).toBe(false);
    const version = (JSON.parse(fs.readFileSync(path.join(REPO, "package.json"), "utf8")) as { version: string }).version;
    expect(installedCli(["--version"])).toMatchObject({ code: 0, stdout: `${version}\n` });
  });

  it("runs a coefficient audit", async () => {
    const dir = path.join(work, "ab2");
    fs.cpSync(path.join(REPO, "audits", "ab2-thermoelectric-field-sweep"), dir, { recursive: true });
    const r = installedCli(["run", dir]);
    expect(r.stderr).not.toContain("error");
    expect([0, 1]).toContain(r.code);
    expect(r.stdout).toMatch(/stamp: (PASS|FAIL|INCONCLUSIVE)\s+fingerprint: sha256:[0-9a-f]{64}/);
    // The bundled code computes what the sources compute: the result document, byte for byte.
    const { result } = await runAudit(dir);
    expect(installedCli(["run", dir, "--json"]).stdout).toBe(`${JSON.stringify(result, null, 2)}\n`);
  }, 10 * MINUTES);

  it("runs a samples file large enough to be read by the reduction workers", () => {
    const a = makeTempArchive();
    // The test archive's 400 rows, repeated past the size from which samples are reduced on worker threads (64 MiB).
    const [header, ...rows] = fs.readFileSync(a.dataFile, "utf8").trimEnd().split("\n");
    const block = Buffer.from(`${rows.join("\n")}\n`);
    const fd = fs.openSync(a.dataFile, "w");
    fs.writeSync(fd, `${header}\n`);
    for (let written = 0; written <= 66 << 20; written += block.length) fs.writeSync(fd, block);
    fs.closeSync(fd);
    const r = installedCli(["run", a.auditDir, "--json"]);
    expect(r.stderr).not.toContain("error");
    const doc = JSON.parse(r.stdout) as { datasets: { rows: number }[] };
    expect(doc.datasets[0].rows).toBe(Math.ceil(((66 << 20) + 1) / block.length) * rows.length);
  }, 15 * MINUTES);

  it("reads every binary and compressed format through its reader, loaded when such a file is opened", async () => {
    // The one samples dataset of test/ingest/formats.test.ts (240 rows, values exact in every
    // type): each reader is imported only when a file of its format is opened, so a module or
    // a WebAssembly file missing from the package would fail here and nowhere earlier. Each
    // shape must give the comma file's checks, digit for digit.
    const byName = ["columns: { Q: Q_meV, dN: n }"];
    const checksOf = async (file: string, keys: string[], write?: (target: string) => Promise<void>) => {
      const r = installedCli(["run", await formatsAudit(work, file, keys, write), "--json"]);
      expect(r.stderr, file).not.toContain("error");
      const doc = JSON.parse(r.stdout) as { datasets: { rows: number }[]; checks: unknown[] };
      expect(doc.datasets[0].rows, file).toBe(240);
      return JSON.stringify(doc.checks).replaceAll(`data/${file}`, "<file>");
    };
    const reference = await checksOf("comma.csv", byName);
    expect(await checksOf("comma.csv.zst", byName)).toBe(reference);
    expect(await checksOf("samples.parquet", byName, async (target) => writeSamplesParquet(target, await commaColumns()))).toBe(reference);
    expect(await checksOf("compound.h5", ["dataset: /runs/exchange", ...byName])).toBe(reference);
    expect(await checksOf("structured.npy", byName)).toBe(reference);
    expect(await checksOf("deflated.npz", byName)).toBe(reference);
  }, 10 * MINUTES);

  it("builds the site of an archive big enough for the audit pool, with templates, styles and KaTeX fonts", () => {
    const root = path.join(work, "archive");
    fs.mkdirSync(path.join(root, "audits"), { recursive: true });
    fs.copyFileSync(path.join(REPO, "archive.yaml"), path.join(root, "archive.yaml"));
    // Twelve small audits: the pool of worker threads takes over from twelve (src/report/auditPool.ts).
    const ids = Array.from({ length: 12 }, (_, i) => `packed-${i + 1}`);
    for (const id of ids) {
      const dir = path.join(root, "audits", id);
      fs.mkdirSync(path.join(dir, "data"), { recursive: true });
      fs.writeFileSync(path.join(dir, "audit.yaml"), auditYaml().replace(/^id: .*$/m, `id: ${id}`));
      fs.copyFileSync(makeTempArchive().dataFile, path.join(dir, "data", "exchange.csv"));
    }
    const out = path.join(work, "site");
    const r = installedCli(["build", "--root", root, "--out", out]);
    expect(r.stderr).not.toContain("error");
    expect(r.code).toBe(0);
    const index = fs.readFileSync(path.join(out, "index.html"), "utf8");
    for (const id of ids) expect(index).toContain(id);
    const files = fs.readdirSync(out, { recursive: true }).map(String);
    expect(files.some((f) => f.endsWith("katex.min.css"))).toBe(true);
    expect(files.some((f) => f.endsWith(".woff2"))).toBe(true);
    expect(files.some((f) => f.endsWith("style.css"))).toBe(true);
    // The result cache trusts an entry only under the same digest of the tool's code, which the
    // compiled code finds from its own address: a second build takes every audit from the cache.
    const again = installedCli(["build", "--root", root, "--out", out]);
    expect(again.code).toBe(0);
    expect(again.stdout + again.stderr).toContain(`${ids.length} unchanged audit(s) taken from the result cache`);
  }, 20 * MINUTES);

  it("writes a simulated audit with synth (sampling on worker threads) that the installed tool then runs", () => {
    const out = path.join(work, "synth-dot");
    const r = installedCli(["synth", "dot", "--out", out, "--workers", "2"]);
    expect(r.stderr).not.toContain("error");
    expect(r.code).toBe(0);
    expect(fs.existsSync(path.join(out, "audit.yaml"))).toBe(true);
    const run = installedCli(["run", out]);
    expect([0, 1]).toContain(run.code);
    expect(run.stdout).toMatch(/stamp: (PASS|FAIL|INCONCLUSIVE)/);
  }, 15 * MINUTES);
});
