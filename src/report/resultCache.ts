import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { loadAuditDefinition } from "../config/loadAudit.ts";
import { datasetDigest } from "../ingest/fileDigest.ts";
import { loadCacheKey, sealOf, userCacheDir, type CacheKey } from "./cacheKey.ts";
import { canonicalJson } from "./canonicalJson.ts";
import type { ResultDocument } from "./resultDocument.ts";
import { fingerprintFromDigests, runAudit, type InputDigest } from "./runAudit.ts";
import { toolDigest, type ToolLayout } from "./toolDigest.ts";

/**
 * Result cache of site builds. An audit whose definition, data bytes and tool
 * are unchanged has the same fingerprint and, by the fingerprint's promise,
 * the same result document: a build may then take the stored document
 * instead of ingesting the data and running the checks again. The lookup
 * needs only the definition and the digests of the data files, so an
 * unchanged audit costs one pass of SHA-256 over its files.
 *
 * Only site builds use it. Publishing and verifying always recompute from the
 * data: a frozen version must never rest on a stored result.
 */

/** Where the cache lives, relative to the archive root (git-ignored). */
export const RESULT_CACHE_FOLDER = path.join(".cache", "transport-audit", "results");

/** Format tag of a cache entry; entries with another tag are ignored. */
const ENTRY_FORMAT = "transport-audit result cache 2";

export function resultCacheDir(root: string): string {
  return path.join(root, RESULT_CACHE_FOLDER);
}

/** `<dir>/<hex of the fingerprint>.json`. */
export function cacheFileOf(cacheDir: string, fingerprint: string): string {
  return path.join(cacheDir, `${fingerprint.replace(/^sha256:/, "")}.json`);
}

/**
 * The fingerprint of an audit folder from its definition and the digests of
 * its data files, without parsing the data. Equals the `fingerprint` of the
 * result document that running the audit gives. Throws the loader's input
 * errors when the definition is invalid or a path leaves the folder, and a
 * file-system error when a data file cannot be read.
 */
export function folderFingerprint(dir: string): string {
  const definition = loadAuditDefinition(dir);
  const inputs: InputDigest[] = definition.datasets.map((d, i) => ({
    id: d.id,
    file: d.file,
    sha256: datasetDigest(dir, d.file, `datasets[${i}].file`),
  }));
  return fingerprintFromDigests(definition, inputs);
}

/** The tool's layout as this module finds it: src/ when run from the sources, dist/ when compiled. */
function ownLayout(): ToolLayout {
  const here = fileURLToPath(import.meta.url);
  const code = path.resolve(path.dirname(here), "..");
  return { root: path.dirname(code), code, entry: path.join(code, "report", `runAudit${path.extname(here)}`) };
}

let implementation: string | null = null;

/**
 * Digest of the tool's own code (every file of src/, or of dist/ in the
 * compiled package, and package.json), the lockfile's resolved dependency
 * versions and integrity hashes, and the installed code of the packages an
 * audit uses (toolDigest.ts). The fingerprint names the tool only by its
 * version, which does not move while someone edits a check or a dependency;
 * an entry written under another digest is therefore not trusted even when
 * the fingerprint matches, so that a build never shows results of code that
 * no longer exists. Taken on first use (about 0.1 s of CPU), once a process.
 */
export function implementationDigest(): string {
  if (implementation === null) {
    try {
      implementation = toolDigest(ownLayout());
    } catch {
      // Code that cannot be read cannot vouch for an entry: this process then trusts only its own.
      implementation = `unread-${randomBytes(16).toString("hex")}`;
    }
  }
  return implementation;
}

const keys = new Map<string, CacheKey | null>();

/** This user's key for sealing entries (cacheKey.ts), read once a process; null when there is no private place for one. */
function currentKey(): CacheKey | null {
  const dir = userCacheDir();
  if (!keys.has(dir)) keys.set(dir, loadCacheKey(dir));
  return keys.get(dir)!;
}

interface CacheEntry {
  format: string;
  fingerprint: string;
  implementation: string;
  /** Id of the key that sealed the entry. */
  key: string;
  /** HMAC of the entry's other fields (sealedText), checked on every read. */
  seal: string;
  result: ResultDocument;
}

/** The text an entry's seal covers: every field but the seal, as canonical JSON. */
function sealedText(entry: Omit<CacheEntry, "seal">): string {
  return canonicalJson({ format: entry.format, fingerprint: entry.fingerprint, implementation: entry.implementation, key: entry.key, result: entry.result });
}

/**
 * What reading an entry gave: the result; nothing to use (no entry, or one
 * written by another tool version, other code or under another user's key,
 * which is no cause for alarm); or an entry that is there for this very code
 * and key but does not match its seal or its name (edited, forged or
 * damaged), which the caller reports.
 */
export type CacheRead = { kind: "hit"; result: ResultDocument } | { kind: "miss" } | { kind: "untrusted"; reason: string };

export function readCacheEntry(cacheDir: string, fingerprint: string, implementationOf = implementationDigest()): CacheRead {
  const key = currentKey();
  if (key === null) return { kind: "miss" };
  let text: string;
  try {
    text = fs.readFileSync(cacheFileOf(cacheDir, fingerprint), "utf8");
  } catch {
    return { kind: "miss" };
  }
  let entry: Partial<CacheEntry>;
  try {
    entry = JSON.parse(text) as Partial<CacheEntry>;
  } catch {
    return { kind: "untrusted", reason: "does not parse as JSON" };
  }
  if (entry === null || typeof entry !== "object") return { kind: "untrusted", reason: "is not a cache entry" };
  if (entry.format !== ENTRY_FORMAT || entry.implementation !== implementationOf || entry.key !== key.id) return { kind: "miss" };
  const { seal, ...sealed } = entry as CacheEntry;
  if (typeof seal !== "string" || seal !== sealOf(key, sealedText(sealed))) return { kind: "untrusted", reason: "does not match its digest (edited or damaged)" };
  const result = entry.result;
  if (entry.fingerprint !== fingerprint || result === null || typeof result !== "object" || result.fingerprint !== fingerprint || !Array.isArray(result.checks)) {
    return { kind: "untrusted", reason: "was written for another audit state" };
  }
  return { kind: "hit", result };
}

/**
 * The stored result document for a fingerprint, or null when there is no
 * usable entry (readCacheEntry). A bad entry is never an error: the caller
 * recomputes and overwrites it.
 */
export function readCachedResult(cacheDir: string, fingerprint: string): ResultDocument | null {
  const read = readCacheEntry(cacheDir, fingerprint);
  return read.kind === "hit" ? read.result : null;
}

/**
 * Store a result document under its fingerprint, sealed with this user's
 * key: canonical JSON written to a temporary file in the same folder and
 * renamed over the entry, so a reader sees either the old entry or the whole
 * new one, never a torn file. Returns false when the entry could not be
 * written (or there is no key to seal it with).
 */
export function writeCachedResult(cacheDir: string, result: ResultDocument, implementationOf = implementationDigest()): boolean {
  const key = currentKey();
  if (key === null) return false;
  const sealed = { format: ENTRY_FORMAT, fingerprint: result.fingerprint, implementation: implementationOf, key: key.id, result };
  const entry: CacheEntry = { ...sealed, seal: sealOf(key, sealedText(sealed)) };
  const target = cacheFileOf(cacheDir, result.fingerprint);
  const temporary = `${target}.${process.pid}.${randomBytes(6).toString("hex")}.tmp`;
  try {
    fs.mkdirSync(cacheDir, { recursive: true });
    fs.writeFileSync(temporary, canonicalJson(entry));
    fs.renameSync(temporary, target);
    return true;
  } catch {
    // A read-only archive or a full disk costs speed on the next build, never the build itself.
    try {
      fs.rmSync(temporary, { force: true });
    } catch {
      // Nothing was created.
    }
    return false;
  }
}

const STALE_TEMPORARY_MS = 60 * 60 * 1000;

/**
 * Remove the entries a build did not use, so the cache holds one entry per
 * audit instead of one per state an audit ever had (each entry is the size of
 * a result document, tens to hundreds of kB). Temporary files are removed only
 * when older than an hour: younger ones may belong to a build running beside
 * this one. Returns the number of files removed; failures are ignored.
 */
export function pruneResultCache(cacheDir: string, used: ReadonlySet<string>, now = Date.now()): number {
  let names: string[];
  try {
    names = fs.readdirSync(cacheDir);
  } catch {
    return 0;
  }
  const keep = new Set([...used].map((f) => path.basename(cacheFileOf(cacheDir, f))));
  let removed = 0;
  for (const name of names) {
    const file = path.join(cacheDir, name);
    try {
      const stale = name.endsWith(".tmp") ? now - fs.statSync(file).mtimeMs > STALE_TEMPORARY_MS : /^[0-9a-f]{64}\.json$/.test(name) && !keep.has(name);
      if (stale) {
        fs.rmSync(file, { force: true });
        removed++;
      }
    } catch {
      // Gone already, or not ours to remove: the next build tries again.
    }
  }
  return removed;
}

/**
 * A result document as its canonical JSON reads back: keys in code-point
 * order, non-finite numbers as null, typed arrays as arrays. A freshly
 * computed document and a stored one are both shown in this form, so a page
 * does not depend on whether its result came from the cache.
 */
export function asStored(result: ResultDocument): ResultDocument {
  return JSON.parse(canonicalJson(result)) as ResultDocument;
}

export interface CacheUse {
  /** Folder of the entries. */
  dir: string;
  /** Take stored results when they match (false: recompute every audit, but still store the results). */
  read: boolean;
  /** implementationDigest() as the thread that made the pool took it, so that worker threads need not take it again. */
  implementation?: string;
}

export interface CachedRun {
  result: ResultDocument;
  fromCache: boolean;
  /** False when a recomputed result could not be stored (read-only archive, full disk). */
  stored: boolean;
}

/**
 * Run an audit folder, or take its stored result when the cache holds one
 * for the folder's current fingerprint. Input errors surface from the full
 * run exactly as without a cache; only successful results are stored.
 */
export async function runAuditCached(dir: string, cache: CacheUse): Promise<CachedRun> {
  const implementationOf = cache.implementation ?? implementationDigest();
  if (cache.read) {
    let fingerprint: string | null = null;
    try {
      fingerprint = folderFingerprint(dir);
    } catch {
      // An unreadable definition or data file: the full run below reports it with its proper message.
    }
    if (fingerprint !== null) {
      const read = readCacheEntry(cache.dir, fingerprint, implementationOf);
      if (read.kind === "hit") return { result: read.result, fromCache: true, stored: true };
      if (read.kind === "untrusted") {
        process.stderr.write(`warning: the cached result of ${dir} (${cacheFileOf(cache.dir, fingerprint)}) ${read.reason}; running the audit again\n`);
      }
    }
  }
  const { result } = await runAudit(dir);
  const written = writeCachedResult(cache.dir, result, implementationOf);
  return { result: asStored(result), fromCache: false, stored: written };
}
