// The result cache of site builds. The reference throughout is the uncached
// computation itself: a stored result is only correct if it is exactly what
// running the audit again gives (the fingerprint's promise), and a page only
// if it is byte for byte the page an uncached build writes.
import { createHash } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it, vi } from "vitest";
import { publishAudit } from "../../src/archive/publish.ts";
import { verifyVersion } from "../../src/archive/verify.ts";
import { main } from "../../src/cli/program.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { buildSite } from "../../src/report/buildSite.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { sha256HexOfFile, sha256HexOfFileAsync } from "../../src/ingest/fileDigest.ts";
import {
  asStored,
  cacheFileOf,
  folderFingerprint,
  pruneResultCache,
  readCachedResult,
  resultCacheDir,
  runAuditCached,
  writeCachedResult,
} from "../../src/report/resultCache.ts";
import { fingerprintOf, runAudit } from "../../src/report/runAudit.ts";
import { TOOL } from "../../src/version.ts";
import { auditYaml, fixedClock, makeTempArchive, TEST_AUDIT_ID, type TempArchive } from "../archive/tempArchive.ts";

const REPO = path.resolve(import.meta.dirname, "..", "..");

/** Every file under a folder, relative path → bytes. */
function filesUnder(dir: string): Map<string, Buffer> {
  const out = new Map<string, Buffer>();
  for (const e of fs.readdirSync(dir, { recursive: true, withFileTypes: true })) {
    if (!e.isFile()) continue;
    const full = path.join(e.parentPath, e.name);
    out.set(path.relative(dir, full), fs.readFileSync(full));
  }
  return out;
}

/** Change one character of line `line` (1-based, header is line 1) of a CSV: its last digit, 1 ↔ 2 or else → 1. */
function changeOneByte(file: string, line: number): void {
  const bytes = fs.readFileSync(file);
  let at = 0;
  for (let l = 1; l < line; l++) at = bytes.indexOf(0x0a, at) + 1;
  const end = bytes.indexOf(0x0a, at);
  let i = end - 1;
  while (bytes[i] < 0x30 || bytes[i] > 0x39) i--;
  bytes[i] = bytes[i] === 0x31 ? 0x32 : 0x31;
  fs.writeFileSync(file, bytes);
}

/** A second audit beside the test archive's, with its own id and data. */
function addSecondAudit(a: TempArchive, id: string): string {
  const dir = path.join(a.root, "audits", id);
  fs.mkdirSync(path.join(dir, "data"), { recursive: true });
  fs.writeFileSync(path.join(dir, "audit.yaml"), auditYaml().replace(`id: ${TEST_AUDIT_ID}`, `id: ${id}`).replace("device: T-1", "device: T-2"));
  const lines = fs.readFileSync(a.dataFile, "utf8").split("\n");
  // Same law, other realisations: the rows in reverse order give another file with the same statistics.
  fs.writeFileSync(path.join(dir, "data", "exchange.csv"), [lines[0], ...lines.slice(1, -1).reverse(), ""].join("\n"));
  return dir;
}

describe("the fingerprint without parsing the data", () => {
  it("streams a file's SHA-256 exactly as a one-shot digest does (in this thread and asynchronously)", async () => {
    // Reference: FIPS 180-4 test vector, SHA-256("abc").
    const a = makeTempArchive();
    const file = path.join(a.root, "abc.txt");
    fs.writeFileSync(file, "abc");
    expect(sha256HexOfFile(file)).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    expect(await sha256HexOfFileAsync(file)).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    // Longer than one 1 MiB read: 3 MiB of a repeating pattern, against node's one-shot digest of the whole buffer.
    const big = Buffer.alloc(3 * 1024 * 1024 + 17, "0123456789abcdef");
    fs.writeFileSync(file, big);
    expect(sha256HexOfFile(file)).toBe(createHash("sha256").update(big).digest("hex"));
    expect(await sha256HexOfFileAsync(file)).toBe(createHash("sha256").update(big).digest("hex"));
  });

  it("equals the fingerprint of the ingested audit for the smaller demo audits (every kind of dataset)", async () => {
    // Audits whose data stay under 400 kB, so that the test stays fast; they hold samples (raw and
    // histogram), coefficients and cumulants datasets.
    const small = (id: string) => {
      const dir = path.join(REPO, "audits", id, "data");
      return fs.existsSync(dir) && fs.readdirSync(dir).reduce((s, f) => s + fs.statSync(path.join(dir, f)).size, 0) < 400_000;
    };
    const audits = fs.readdirSync(path.join(REPO, "audits")).filter((d) => fs.existsSync(path.join(REPO, "audits", d, "audit.yaml")) && small(d));
    const kinds = new Set<string>();
    for (const id of audits) for (const d of (await ingestAudit(path.join(REPO, "audits", id))).datasets) kinds.add(d.kind);
    expect([...kinds].sort()).toEqual(["coefficients", "cumulants", "samples"]);
    for (const id of audits) {
      const dir = path.join(REPO, "audits", id);
      expect(folderFingerprint(dir), id).toBe(fingerprintOf(await ingestAudit(dir)));
    }
  });
});

describe("a build with the cache", () => {
  let a: TempArchive;
  let uncached: Awaited<ReturnType<typeof buildSite>>;
  let cached: Awaited<ReturnType<typeof buildSite>>;
  let outUncached: string;
  let outCached: string;
  beforeAll(async () => {
    a = makeTempArchive();
    // One audit with a published version and unpublished changes (a version page and a draft page),
    // one with nothing published (a draft landing page).
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-02T10:00:00Z") });
    a.writeData(400, 1, "changed since version 1");
    addSecondAudit(a, "dot-lab-second");
    outUncached = path.join(a.root, "site-uncached");
    outCached = path.join(a.root, "site-cached");
    uncached = await buildSite({ root: a.root, out: outUncached, cache: "refresh" });
    cached = await buildSite({ root: a.root, out: outCached });
  });

  it("takes every result from the cache the second time", () => {
    expect(uncached.cache).toEqual({ reused: 0, recomputed: 2, unstored: 0 });
    expect(cached.cache).toEqual({ reused: 2, recomputed: 0, unstored: 0 });
  });

  it("writes the same site, byte for byte", () => {
    const one = filesUnder(outUncached);
    const two = filesUnder(outCached);
    expect([...two.keys()].sort()).toEqual([...one.keys()].sort());
    expect([...one.keys()]).toContain(path.join(TEST_AUDIT_ID, "draft", "index.html"));
    expect([...one.keys()]).toContain(path.join(TEST_AUDIT_ID, "v1", "index.html"));
    expect([...one.keys()]).toContain(path.join("dot-lab-second", "index.html"));
    for (const [file, bytes] of one) expect(two.get(file)?.equals(bytes), file).toBe(true);
  });

  it("gives the result documents of a fresh run, to the last digit", async () => {
    for (const dir of [a.auditDir, path.join(a.root, "audits", "dot-lab-second")]) {
      const fresh = canonicalJson((await runAudit(dir)).result);
      const id = path.basename(dir);
      const page = (o: typeof cached) => [...o.audits, ...o.draftPages].find((p) => p.id === id && p.versioning?.kind === "draft")!;
      expect(canonicalJson(page(cached).result), id).toBe(fresh);
      expect(canonicalJson(page(uncached).result), id).toBe(fresh);
      expect(canonicalJson(readCachedResult(resultCacheDir(a.root), folderFingerprint(dir))), id).toBe(fresh);
    }
  });

  it("keeps only whole entries named by the fingerprint (no temporary files left)", () => {
    const names = fs.readdirSync(resultCacheDir(a.root)).sort();
    expect(names).toHaveLength(2);
    for (const n of names) expect(n).toMatch(/^[0-9a-f]{64}\.json$/);
  });
});

describe("what misses the cache", () => {
  const cacheOf = (a: TempArchive) => ({ dir: resultCacheDir(a.root), read: true });

  it("one changed byte of a data file misses; restoring it hits the old entry again", async () => {
    const a = makeTempArchive();
    const first = await runAuditCached(a.auditDir, cacheOf(a));
    expect(first.fromCache).toBe(false);
    expect((await runAuditCached(a.auditDir, cacheOf(a))).fromCache).toBe(true);
    const original = fs.readFileSync(a.dataFile);
    changeOneByte(a.dataFile, 3);
    expect(Buffer.compare(fs.readFileSync(a.dataFile), original)).not.toBe(0);
    const changed = await runAuditCached(a.auditDir, cacheOf(a));
    expect(changed.fromCache).toBe(false);
    expect(changed.result.fingerprint).not.toBe(first.result.fingerprint);
    expect(changed.result.datasets[0].sha256).toBe(sha256HexOfFile(a.dataFile));
    fs.writeFileSync(a.dataFile, original);
    const back = await runAuditCached(a.auditDir, cacheOf(a));
    expect(back.fromCache).toBe(true);
    expect(canonicalJson(back.result)).toBe(canonicalJson(first.result));
  });

  it("a changed setting in audit.yaml misses; a changed comment does not (the definition is hashed after parsing)", async () => {
    const a = makeTempArchive();
    const yamlFile = path.join(a.auditDir, "audit.yaml");
    const first = await runAuditCached(a.auditDir, cacheOf(a));
    fs.writeFileSync(yamlFile, `# a note that changes nothing\n${fs.readFileSync(yamlFile, "utf8")}`);
    expect((await runAuditCached(a.auditDir, cacheOf(a))).fromCache).toBe(true);
    fs.writeFileSync(yamlFile, fs.readFileSync(yamlFile, "utf8").replace("alpha: 0.01", "alpha: 0.02"));
    const changed = await runAuditCached(a.auditDir, cacheOf(a));
    expect(changed.fromCache).toBe(false);
    expect(changed.result.fingerprint).not.toBe(first.result.fingerprint);
    expect(changed.result.settings.alpha).toBe(0.02);
  });

  it("another tool version misses, and its result names that version", async () => {
    const a = makeTempArchive();
    const ours = await runAuditCached(a.auditDir, cacheOf(a));
    vi.resetModules();
    vi.doMock("../../src/version.ts", () => ({ TOOL: Object.freeze({ name: TOOL.name, version: `${TOOL.version}-next` }) }));
    try {
      const other = (await import("../../src/report/resultCache.ts")) as typeof import("../../src/report/resultCache.ts");
      const run = await other.runAuditCached(a.auditDir, cacheOf(a));
      expect(run.fromCache).toBe(false);
      expect(run.result.tool.version).toBe(`${TOOL.version}-next`);
      expect(run.result.fingerprint).not.toBe(ours.result.fingerprint);
      expect((await other.runAuditCached(a.auditDir, cacheOf(a))).fromCache).toBe(true);
    } finally {
      vi.doUnmock("../../src/version.ts");
      vi.resetModules();
    }
    // Both entries stand side by side; our version still finds its own.
    expect(fs.readdirSync(resultCacheDir(a.root))).toHaveLength(2);
    expect((await runAuditCached(a.auditDir, cacheOf(a))).fromCache).toBe(true);
  });

  it("an entry stored under another fingerprint's name is not trusted", async () => {
    const a = makeTempArchive();
    const first = await runAuditCached(a.auditDir, cacheOf(a));
    changeOneByte(a.dataFile, 5);
    const fingerprint = folderFingerprint(a.auditDir);
    fs.copyFileSync(cacheFileOf(resultCacheDir(a.root), first.result.fingerprint), cacheFileOf(resultCacheDir(a.root), fingerprint));
    expect(readCachedResult(resultCacheDir(a.root), fingerprint)).toBeNull();
    const run = await runAuditCached(a.auditDir, cacheOf(a));
    expect(run.fromCache).toBe(false);
    expect(run.result.fingerprint).toBe(fingerprint);
  });
});

describe("the size of the cache", () => {
  it("a build keeps only the entries it used", async () => {
    const a = makeTempArchive();
    const out = path.join(a.root, "site");
    const dir = resultCacheDir(a.root);
    await buildSite({ root: a.root, out });
    const before = folderFingerprint(a.auditDir);
    a.writeData(400, 1, "another run");
    const after = folderFingerprint(a.auditDir);
    expect(after).not.toBe(before);
    const outcome = await buildSite({ root: a.root, out });
    expect(outcome.cache).toEqual({ reused: 0, recomputed: 1, unstored: 0 });
    expect(fs.readdirSync(dir)).toEqual([path.basename(cacheFileOf(dir, after))]);
  });

  it("removes temporary files older than an hour and leaves younger ones to the build that writes them", () => {
    const a = makeTempArchive();
    const dir = resultCacheDir(a.root);
    fs.mkdirSync(dir, { recursive: true });
    const kept = cacheFileOf(dir, `sha256:${"a".repeat(64)}`);
    const unused = cacheFileOf(dir, `sha256:${"b".repeat(64)}`);
    const young = `${kept}.1.aa.tmp`;
    const old = `${kept}.2.bb.tmp`;
    const foreign = path.join(dir, "notes.txt");
    for (const f of [kept, unused, young, old, foreign]) fs.writeFileSync(f, "{}");
    const now = Date.parse("2026-12-01T12:00:00Z");
    fs.utimesSync(young, new Date(now - 59 * 60 * 1000), new Date(now - 59 * 60 * 1000));
    fs.utimesSync(old, new Date(now - 61 * 60 * 1000), new Date(now - 61 * 60 * 1000));
    expect(pruneResultCache(dir, new Set([`sha256:${"a".repeat(64)}`]), now)).toBe(2);
    expect(fs.readdirSync(dir).sort()).toEqual([kept, young, foreign].map((f) => path.basename(f)).sort());
  });
});

describe("damaged or unwritable cache", () => {
  it("ignores a corrupt entry, recomputes and rewrites it", async () => {
    const a = makeTempArchive();
    const cache = { dir: resultCacheDir(a.root), read: true };
    const first = await runAuditCached(a.auditDir, cache);
    const file = cacheFileOf(cache.dir, first.result.fingerprint);
    const whole = fs.readFileSync(file, "utf8");
    const damaged = [
      whole.slice(0, Math.floor(whole.length / 2)), // torn write
      "", // empty file
      "null",
      whole.replace('"transport-audit result cache 1"', '"transport-audit result cache 0"'), // other format
      whole.replace(/"implementation":"[0-9a-f]+"/, `"implementation":"${"0".repeat(64)}"`), // other code
      whole.replace(/"checks":\[/, '"checks":7,"was":['), // parses, but not a result document
    ];
    for (const text of damaged) {
      fs.writeFileSync(file, text);
      expect(readCachedResult(cache.dir, first.result.fingerprint)).toBeNull();
      const run = await runAuditCached(a.auditDir, cache);
      expect(run.fromCache).toBe(false);
      expect(canonicalJson(run.result)).toBe(canonicalJson(first.result));
      expect(fs.readFileSync(file, "utf8")).toBe(whole);
    }
  });

  it("builds without storing when the cache folder cannot be created", async () => {
    const a = makeTempArchive();
    // A plain file where the cache folder's parent should be: mkdir fails.
    fs.writeFileSync(path.join(a.root, ".cache"), "not a folder");
    const run = await runAuditCached(a.auditDir, { dir: resultCacheDir(a.root), read: true });
    expect(run).toMatchObject({ fromCache: false, stored: false });
    expect(writeCachedResult(resultCacheDir(a.root), run.result)).toBe(false);
    expect(canonicalJson(run.result)).toBe(canonicalJson(asStored((await runAudit(a.auditDir)).result)));
  });

  it("surfaces input errors exactly as an uncached run does", async () => {
    const a = makeTempArchive();
    fs.rmSync(a.dataFile);
    const expected = await runAudit(a.auditDir).then(
      () => "no error",
      (e: Error) => e.message,
    );
    expect(expected).toBe("data/exchange.csv: cannot read the file (does it exist?)");
    await expect(runAuditCached(a.auditDir, { dir: resultCacheDir(a.root), read: true })).rejects.toThrow(expected);
  });
});

describe("build --no-cache", () => {
  it("recomputes every audit and rewrites its entry; without the option the entry is reused untouched", async () => {
    const a = makeTempArchive();
    const out = path.join(a.root, "site");
    const quiet = vi.spyOn(process.stderr, "write").mockImplementation(() => true);
    const quietOut = vi.spyOn(process.stdout, "write").mockImplementation(() => true);
    try {
      expect(await main(["build", "--root", a.root, "--out", out])).toBe(0);
      const fingerprint = folderFingerprint(a.auditDir);
      const entry = cacheFileOf(resultCacheDir(a.root), fingerprint);
      const longAgo = new Date("2001-01-01T00:00:00Z");
      fs.utimesSync(entry, longAgo, longAgo);
      expect(await main(["build", "--root", a.root, "--out", out])).toBe(0);
      expect(fs.statSync(entry).mtime.getTime()).toBe(longAgo.getTime());
      expect(await main(["build", "--no-cache", "--root", a.root, "--out", out])).toBe(0);
      expect(fs.statSync(entry).mtime.getTime()).toBeGreaterThan(longAgo.getTime());
      const messages = quiet.mock.calls.map((c) => String(c[0]));
      expect(messages).toEqual(
        expect.arrayContaining([
          "built 1 audit report(s): 0 failed\n",
          "built 1 audit report(s): 0 failed; 1 unchanged audit(s) taken from the result cache\n",
        ]),
      );
    } finally {
      quiet.mockRestore();
      quietOut.mockRestore();
    }
  });
});

describe("publishing and verifying", () => {
  it("never read the cache: a doctored entry reaches a build's draft but neither a version nor its verification", async () => {
    const a = makeTempArchive();
    const dir = resultCacheDir(a.root);
    const honest = (await runAuditCached(a.auditDir, { dir, read: true })).result;
    // An entry that passes every test of trust but does not say what the data say.
    const doctored = { ...honest, checks: honest.checks.map((c) => ({ ...c, summary: "doctored in the cache" })) };
    expect(writeCachedResult(dir, doctored)).toBe(true);
    expect((await runAuditCached(a.auditDir, { dir, read: true })).result.checks[0].summary).toBe("doctored in the cache");
    const published = await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    expect(canonicalJson(published.result)).toBe(canonicalJson(honest));
    const report = await verifyVersion(a.auditDir);
    expect(report).toMatchObject({ reproduced: true, result: [], data: [], chain: [] });
  });
});
