import { createHash, randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { loadAuditDefinition } from "../config/loadAudit.ts";
import { datasetDigest } from "../ingest/fileDigest.ts";
import { canonicalJson } from "./canonicalJson.ts";
import type { ResultDocument } from "./resultDocument.ts";
import { fingerprintFromDigests, runAudit, type InputDigest } from "./runAudit.ts";

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
const ENTRY_FORMAT = "transport-audit result cache 1";

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

function sourceFiles(dir: string): string[] {
  return fs
    .readdirSync(dir, { withFileTypes: true })
    .flatMap((e) => (e.isDirectory() ? sourceFiles(path.join(dir, e.name)) : e.isFile() ? [path.join(dir, e.name)] : []));
}

function digestOfSources(): string {
  const src = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
  try {
    const files = [...sourceFiles(src), path.join(src, "..", "package.json")].sort();
    const hash = createHash("sha256");
    for (const file of files) {
      const bytes = fs.readFileSync(file);
      // Name and length before the bytes, so that no two file sets give the same stream.
      hash.update(`${path.relative(src, file)}\0${bytes.length}\0`);
      hash.update(bytes);
    }
    return hash.digest("hex");
  } catch {
    // Sources that cannot be read cannot vouch for an entry: this process then trusts only its own.
    return `unread-${randomBytes(16).toString("hex")}`;
  }
}

/**
 * Digest of the tool's own code (every file under src/, whatever its kind,
 * and package.json), taken once when this module loads, right after the code
 * itself was read. The fingerprint names the tool only by its version, which
 * does not move while someone edits a check; an entry written by other code
 * is therefore not trusted even when the fingerprint matches, so that a
 * build never shows results of code that no longer exists.
 */
const IMPLEMENTATION = digestOfSources();

export function implementationDigest(): string {
  return IMPLEMENTATION;
}

interface CacheEntry {
  format: string;
  fingerprint: string;
  implementation: string;
  result: ResultDocument;
}

/**
 * The stored result document for a fingerprint, or null when there is no
 * entry, it does not parse, or it was written for another fingerprint, by
 * other code or in another format. A bad entry is never an error: the caller
 * recomputes and overwrites it.
 */
export function readCachedResult(cacheDir: string, fingerprint: string): ResultDocument | null {
  let text: string;
  try {
    text = fs.readFileSync(cacheFileOf(cacheDir, fingerprint), "utf8");
  } catch {
    return null;
  }
  let entry: Partial<CacheEntry>;
  try {
    entry = JSON.parse(text) as Partial<CacheEntry>;
  } catch {
    return null;
  }
  if (entry === null || typeof entry !== "object") return null;
  if (entry.format !== ENTRY_FORMAT || entry.fingerprint !== fingerprint || entry.implementation !== implementationDigest()) return null;
  const result = entry.result;
  if (result === null || typeof result !== "object" || result.fingerprint !== fingerprint || !Array.isArray(result.checks)) return null;
  return result;
}

/**
 * Store a result document under its fingerprint: canonical JSON written to a
 * temporary file in the same folder and renamed over the entry, so a reader
 * sees either the old entry or the whole new one, never a torn file. Returns
 * false when the entry could not be written.
 */
export function writeCachedResult(cacheDir: string, result: ResultDocument): boolean {
  const entry: CacheEntry = { format: ENTRY_FORMAT, fingerprint: result.fingerprint, implementation: implementationDigest(), result };
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
  if (cache.read) {
    let fingerprint: string | null = null;
    try {
      fingerprint = folderFingerprint(dir);
    } catch {
      // An unreadable definition or data file: the full run below reports it with its proper message.
    }
    const stored = fingerprint === null ? null : readCachedResult(cache.dir, fingerprint);
    if (stored) return { result: stored, fromCache: true, stored: true };
  }
  const { result } = await runAudit(dir);
  const written = writeCachedResult(cache.dir, result);
  return { result: asStored(result), fromCache: false, stored: written };
}
