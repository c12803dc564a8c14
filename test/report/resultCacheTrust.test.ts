// What the result cache trusts. A stored result may stand in for running an
// audit only if it is exactly what running it again gives; the reference is
// the uncached computation. Two ways to break that promise are tested here:
// an entry edited on disk (a forged verdict must never reach a page), and a
// change to the code that computes results outside src/ (a dependency's
// installed files or the lockfile), which must re-run the audits.
import { createHash } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { buildSite } from "../../src/report/buildSite.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { asStored, cacheFileOf, readCachedResult, resultCacheDir, runAuditCached } from "../../src/report/resultCache.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { dependencyClosure, runtimeImports, toolDigest, type ToolLayout } from "../../src/report/toolDigest.ts";
import { makeTempArchive } from "../archive/tempArchive.ts";

const REPO = path.resolve(import.meta.dirname, "..", "..");

beforeAll(() => {
  // This user's key for the tests lives in a folder of their own, not in the home folder.
  process.env.XDG_CACHE_HOME = fs.mkdtempSync(path.join(os.tmpdir(), "ta-user-cache-"));
});

afterEach(() => {
  vi.restoreAllMocks();
});

/** Capture what is written to stderr while `work` runs. */
async function stderrOf<T>(work: () => Promise<T>): Promise<{ value: T; stderr: string }> {
  let stderr = "";
  vi.spyOn(process.stderr, "write").mockImplementation((chunk: string | Uint8Array) => {
    stderr += String(chunk);
    return true;
  });
  const value = await work();
  vi.restoreAllMocks();
  return { value, stderr };
}

interface StoredEntry {
  seal: string;
  result: { stamp: string; checks: { id: string; status: string; summary: string }[] };
}

/** Rewrite the stored entry: every verdict PASS with an invented summary, as a forger would. */
function forgeEntry(file: string, recomputeDigest: boolean): void {
  const entry = JSON.parse(fs.readFileSync(file, "utf8")) as StoredEntry;
  entry.result.stamp = "pass";
  for (const check of entry.result.checks) {
    check.status = "pass";
    check.summary = "Invented: every relation holds exactly.";
  }
  // A forger who knows the format recomputes a plain SHA-256 over the content; without the key it cannot be an HMAC.
  if (recomputeDigest) entry.seal = `hmac-sha256:${createHash("sha256").update(canonicalJson({ ...entry, seal: undefined })).digest("hex")}`;
  fs.writeFileSync(file, canonicalJson(entry));
}

describe("an edited cache entry", () => {
  for (const recomputeDigest of [false, true]) {
    it(`is not trusted${recomputeDigest ? " even with a recomputed plain digest" : ""}: the audit runs again and stderr says so`, async () => {
      const a = makeTempArchive();
      const cache = { dir: resultCacheDir(a.root), read: true };
      const first = await runAuditCached(a.auditDir, cache);
      expect(JSON.stringify(first.result)).not.toContain("Invented");
      const file = cacheFileOf(cache.dir, first.result.fingerprint);
      const honest = fs.readFileSync(file, "utf8");
      forgeEntry(file, recomputeDigest);
      expect(readCachedResult(cache.dir, first.result.fingerprint)).toBeNull();
      const { value: run, stderr } = await stderrOf(() => runAuditCached(a.auditDir, cache));
      expect(run.fromCache).toBe(false);
      expect(canonicalJson(run.result)).toBe(canonicalJson(asStored((await runAudit(a.auditDir)).result)));
      expect(stderr).toBe(`warning: the cached result of ${a.auditDir} (${file}) does not match its digest (edited or damaged); running the audit again\n`);
      expect(fs.readFileSync(file, "utf8")).toBe(honest); // rewritten with the honest result
    });
  }

  it("never reaches the draft page, draft result or index of a build", async () => {
    const a = makeTempArchive();
    const out = path.join(a.root, "site");
    await buildSite({ root: a.root, out });
    const cacheDir = resultCacheDir(a.root);
    const [name] = fs.readdirSync(cacheDir);
    forgeEntry(path.join(cacheDir, name), true);
    const { value: outcome, stderr } = await stderrOf(() => buildSite({ root: a.root, out }));
    expect(outcome.cache).toEqual({ reused: 0, recomputed: 1, unstored: 0 });
    expect(stderr).toContain("does not match its digest (edited or damaged); running the audit again");
    const written = fs.readdirSync(out, { recursive: true, withFileTypes: true }).filter((e) => e.isFile() && /\.(html|json)$/.test(e.name));
    expect(written.length).toBeGreaterThan(1);
    for (const e of written) expect(fs.readFileSync(path.join(e.parentPath, e.name), "utf8"), e.name).not.toContain("Invented");
  });

  it("sealed under another user's key is re-run without a warning (it is not ours to judge)", async () => {
    const a = makeTempArchive();
    const cache = { dir: resultCacheDir(a.root), read: true };
    const first = await runAuditCached(a.auditDir, cache);
    const file = cacheFileOf(cache.dir, first.result.fingerprint);
    const honest = fs.readFileSync(file, "utf8");
    fs.writeFileSync(file, honest.replace(/"key":"[0-9a-f]{16}"/, `"key":"${"0".repeat(16)}"`));
    const { value: run, stderr } = await stderrOf(() => runAuditCached(a.auditDir, cache));
    expect(run.fromCache).toBe(false);
    expect(stderr).toBe("");
    expect(fs.readFileSync(file, "utf8")).toBe(honest);
  });
});

/**
 * A copy of the tool's code and lockfile in a temporary root whose
 * node_modules links to every installed package except ml-matrix, which is a
 * real copy that the test may edit (the shared installation stays untouched).
 */
function toolCopy(): ToolLayout & { mlMatrix: string } {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), "ta-tool-copy-"));
  fs.cpSync(path.join(REPO, "src"), path.join(root, "src"), { recursive: true });
  for (const f of ["package.json", "package-lock.json"]) fs.copyFileSync(path.join(REPO, f), path.join(root, f));
  const modules = path.join(root, "node_modules");
  fs.mkdirSync(modules);
  const installed = fs.realpathSync(path.join(REPO, "node_modules"));
  for (const name of fs.readdirSync(installed)) {
    if (name === "ml-matrix" || name.startsWith(".")) continue;
    fs.symlinkSync(path.join(installed, name), path.join(modules, name));
  }
  const mlMatrix = path.join(modules, "ml-matrix");
  fs.cpSync(path.join(installed, "ml-matrix"), mlMatrix, { recursive: true });
  return { root, code: path.join(root, "src"), entry: path.join(root, "src", "report", "runAudit.ts"), mlMatrix };
}

describe("the tool's digest, which keys every cache entry", () => {
  it("covers the installed code of the packages the audit computation imports, found from the code itself", () => {
    const layout = { root: REPO, code: path.join(REPO, "src"), entry: path.join(REPO, "src", "report", "runAudit.ts") };
    const imported = runtimeImports(layout);
    // The linear algebra of the fits and the readers of audit.yaml and CSV are among them; the site generator is not.
    expect(imported).toEqual(expect.arrayContaining(["ml-matrix", "yaml", "csv-parse", "zod"]));
    expect(imported).not.toContain("@11ty/eleventy");
    const folders = dependencyClosure(imported, REPO).map((f) => path.basename(f));
    // ml-matrix's own dependencies come with it.
    expect(folders).toEqual(expect.arrayContaining(["ml-matrix", "ml-array-rescale", "is-any-array"]));
  });

  it("changes when a dependency's installed code or the lockfile changes, and not for a package the audit does not use", () => {
    const copy = toolCopy();
    const before = toolDigest(copy);
    expect(toolDigest(copy)).toBe(before);
    const matrixFile = path.join(copy.mlMatrix, "matrix.js");
    const original = fs.readFileSync(matrixFile, "utf8");
    fs.writeFileSync(matrixFile, `${original}\n// edited\n`);
    const edited = toolDigest(copy);
    expect(edited).not.toBe(before);
    fs.writeFileSync(matrixFile, original);
    expect(toolDigest(copy)).toBe(before);
    // Another resolved version in the lockfile (as `npm install` of another release leaves it).
    const lockFile = path.join(copy.root, "package-lock.json");
    const lock = fs.readFileSync(lockFile, "utf8");
    fs.writeFileSync(lockFile, lock.replace(/("node_modules\/ml-matrix": \{\s*"version": ")[^"]+"/, '$16.0.0-other"'));
    expect(fs.readFileSync(lockFile, "utf8")).not.toBe(lock);
    expect(toolDigest(copy)).not.toBe(before);
    fs.writeFileSync(lockFile, lock);
    // A package nothing in the audit computation imports (the site generator's templating) leaves it as it was.
    const unrelated = path.join(copy.root, "node_modules", "@11ty");
    fs.rmSync(unrelated);
    expect(toolDigest(copy)).toBe(before);
  });

  it("changes when a module of the tool's own code changes", () => {
    const copy = toolCopy();
    const before = toolDigest(copy);
    fs.appendFileSync(path.join(copy.code, "stats", "rng.ts"), "\n// edited\n");
    expect(toolDigest(copy)).not.toBe(before);
  });
});
