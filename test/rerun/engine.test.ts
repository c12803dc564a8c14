/**
 * The browser's re-run engine against the command line, on every demo audit.
 * The reference is outside the engine: the result document `run` computes
 * (src/report/runAudit.ts, called here as src/cli/commands/run.ts calls it) and
 * the frozen versions/<N>/result.json that `publish` wrote. Tolerance: none;
 * the engine promises the same bytes, because a referee's re-run is compared
 * with the frozen document to the last digit.
 * Both forms run: engine.ts in Node (files in a temporary folder on disk) and
 * the built bundle rerun-worker.js imported into Node (files on its in-memory
 * volume, Node's modules replaced by the browser stand-ins), which is the code
 * a page's worker runs.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runAuditFromFiles } from "../../src/browser/engine/engine.ts";
import { buildBrowserBundle } from "../../scripts/build/browserBundle.ts";
import { ConfigError, DataError, PathError } from "../../src/errors.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { TOOL } from "../../src/version.ts";
import { auditFiles, DEMO_AUDITS, ROOT } from "./auditFiles.ts";

type Engine = { runAuditFromFiles: typeof runAuditFromFiles };

let outDir: string;
let bundled: Engine;

beforeAll(async () => {
  outDir = fs.mkdtempSync(path.join(os.tmpdir(), "rerun-bundle-"));
  const { worker } = await buildBrowserBundle(outDir);
  bundled = (await import(pathToFileURL(worker).href)) as Engine;
});
afterAll(() => {
  fs.rmSync(outDir, { recursive: true, force: true });
});

/** The newest published version's frozen result.json, when the tool that published it is this one (only that tool can reproduce it). */
function frozenByThisTool(dir: string): string | null {
  const versions = path.join(dir, "versions");
  if (!fs.existsSync(versions)) return null;
  const newest = Math.max(...fs.readdirSync(versions).filter((n) => /^\d+$/.test(n)).map(Number));
  const text = fs.readFileSync(path.join(versions, String(newest), "result.json"), "utf8");
  const tool = (JSON.parse(text) as { tool: { name: string; version: string } }).tool;
  const sameDefinition = fs.readFileSync(path.join(versions, String(newest), "audit.yaml"), "utf8") === fs.readFileSync(path.join(dir, "audit.yaml"), "utf8");
  return tool.name === TOOL.name && tool.version === TOOL.version && sameDefinition ? text : null;
}

describe.each(DEMO_AUDITS)("demo audit %s", (id) => {
  const dir = path.join(ROOT, "audits", id);
  let canonical: string;
  let printed: string;

  beforeAll(async () => {
    const { result } = await runAudit(dir);
    canonical = canonicalJson(result);
    printed = `${JSON.stringify(result, null, 2)}\n`; // what `run --json` writes (src/cli/commands/run.ts)
  });

  test("engine.ts gives the result document of run, byte for byte", async () => {
    const { json, document } = await runAuditFromFiles(auditFiles(dir));
    expect(json).toBe(canonical);
    expect(`${JSON.stringify(document, null, 2)}\n`).toBe(printed);
    const frozen = frozenByThisTool(dir);
    if (frozen !== null) expect(json).toBe(frozen);
  });

  test("the browser bundle, run in Node, gives the same bytes", async () => {
    const { json, document } = await bundled.runAuditFromFiles(auditFiles(dir));
    expect(json).toBe(canonical);
    expect(`${JSON.stringify(document, null, 2)}\n`).toBe(printed);
  });
});

describe("errors are the command line's, with files named as the audit folder holds them", () => {
  const demo = path.join(ROOT, "audits", "vq3-heat-exchange");

  test("no audit.yaml: ConfigError naming audit.yaml", async () => {
    const files = auditFiles(demo);
    files.delete("audit.yaml");
    for (const engine of [{ runAuditFromFiles }, bundled]) {
      const err = await engine.runAuditFromFiles(files).catch((e: unknown) => e);
      expect((err as Error).name).toBe("ConfigError");
      expect((err as Error).message).toMatch(/^audit\.yaml: not found; an audit folder must contain audit\.yaml/);
      expect((err as Error).message).not.toContain(os.tmpdir());
    }
    expect(await runAuditFromFiles(files).catch((e: unknown) => e)).toBeInstanceOf(ConfigError);
  });

  test("a missing data file: DataError naming the file as audit.yaml writes it", async () => {
    const files = auditFiles(demo);
    files.delete("data/exchange.csv");
    const err = await bundled.runAuditFromFiles(files).catch((e: unknown) => e);
    expect((err as Error).name).toBe("DataError");
    expect((err as Error).message).toBe("data/exchange.csv: cannot read the file (does it exist?)");
    expect(await runAuditFromFiles(files).catch((e: unknown) => e)).toBeInstanceOf(DataError);
  });

  test("a damaged cell: the same message as run gives", async () => {
    const files = auditFiles(demo);
    const text = new TextDecoder().decode(files.get("data/exchange.csv"));
    const lines = text.split("\n");
    lines[5] = lines[5].replace(/[0-9](?=[^0-9]*$)/, "x"); // the last digit of the line's last cell
    files.set("data/exchange.csv", new TextEncoder().encode(lines.join("\n")));
    const work = fs.mkdtempSync(path.join(os.tmpdir(), "rerun-cli-"));
    try {
      fs.writeFileSync(path.join(work, "audit.yaml"), files.get("audit.yaml")!);
      fs.mkdirSync(path.join(work, "data"));
      fs.writeFileSync(path.join(work, "data", "exchange.csv"), files.get("data/exchange.csv")!);
      const expected = (await runAudit(work).catch((e: unknown) => e)) as Error;
      expect(expected).toBeInstanceOf(DataError);
      const got = (await bundled.runAuditFromFiles(files).catch((e: unknown) => e)) as Error;
      expect(got.name).toBe("DataError");
      expect(got.message).toBe(expected.message);
    } finally {
      fs.rmSync(work, { recursive: true, force: true });
    }
  });

  test("a key that leaves the folder is refused before anything is written", async () => {
    const err = await runAuditFromFiles(new Map([["../outside.csv", new Uint8Array(1)]])).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(PathError);
    expect((err as Error).message).toContain('"../outside.csv"');
  });
});

test("progress: reading from none to all bytes given, each check, then done; an abort stops between checks", async () => {
  const files = auditFiles(path.join(ROOT, "audits", "vq3-heat-exchange"));
  const bytes = [...files.values()].reduce((sum, b) => sum + b.length, 0);
  const seen: { phase: string; done: number; total: number; label?: string }[] = [];
  await runAuditFromFiles(files, { onProgress: (p) => seen.push(p) });
  const checks = seen.filter((p) => p.phase === "checks");
  const reading = seen.filter((p) => p.phase === "ingest");
  expect(reading[0]).toEqual({ phase: "ingest", done: 0, total: bytes });
  expect(reading.at(-1)).toEqual({ phase: "ingest", done: bytes, total: bytes });
  expect(checks.length).toBeGreaterThan(1);
  expect(checks.map((p) => p.done)).toEqual(checks.map((_, i) => i + 1));
  expect(seen.at(-1)).toEqual({ phase: "done", done: 1, total: 1 });

  const controller = new AbortController();
  const stopped = await runAuditFromFiles(files, { signal: controller.signal, onProgress: (p) => p.phase === "checks" && p.done === 1 && controller.abort() }).catch((e: unknown) => e);
  expect((stopped as Error).name).toBe("AbortError");
});
