import { createHash, createHmac, randomBytes } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

/**
 * The secret that seals result-cache entries. A cache entry lives in the
 * archive (`.cache/` under the root), where anyone who can edit the archive can
 * edit it; a plain digest stored beside the result would be recomputed by
 * whoever forges the result. The entry's digest is therefore an HMAC-SHA-256
 * (RFC 2104) under a key that lives outside the archive, in this user's own
 * cache folder, created readable by this user only. An entry sealed under
 * another key (another user, another machine, a removed key file) is simply
 * not trusted: the audit runs again and the entry is rewritten.
 */

export interface CacheKey {
  /** The secret itself (32 random bytes). */
  secret: Buffer;
  /** A public name of the key (first 16 hex digits of its SHA-256), stored in each entry to tell "other key" from "forged". */
  id: string;
}

/** `$XDG_CACHE_HOME/transport-audit`, or `~/.cache/transport-audit` (the XDG Base Directory convention). */
export function userCacheDir(env: NodeJS.ProcessEnv = process.env): string {
  const base = env.XDG_CACHE_HOME && path.isAbsolute(env.XDG_CACHE_HOME) ? env.XDG_CACHE_HOME : path.join(os.homedir(), ".cache");
  return path.join(base, "transport-audit");
}

const KEY_FILE = "result-cache.key";

/** True when `stat` is owned by this user and no one else may write it (or read it, with `privateRead`). */
function ownedAndPrivate(stat: fs.Stats, privateRead: boolean): boolean {
  const uid = typeof process.getuid === "function" ? process.getuid() : null;
  // Ownership and permission bits mean nothing on Windows, where the profile folder is the user's own.
  if (uid === null) return true;
  return stat.uid === uid && (stat.mode & (privateRead ? 0o077 : 0o022)) === 0;
}

/**
 * This user's cache key, created on first use. Null when no private place
 * for it can be had (the folder is a link, someone else's, writable by
 * others, or cannot be created): then no entry can be trusted.
 */
export function loadCacheKey(dir = userCacheDir()): CacheKey | null {
  try {
    fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
    const folder = fs.lstatSync(dir);
    if (!folder.isDirectory() || !ownedAndPrivate(folder, false)) return null;
    const file = path.join(dir, KEY_FILE);
    if (!fs.existsSync(file)) createKeyFile(file);
    const stat = fs.lstatSync(file);
    if (!stat.isFile() || !ownedAndPrivate(stat, true)) return null;
    const secret = Buffer.from(fs.readFileSync(file, "utf8").trim(), "hex");
    if (secret.length !== 32) return null;
    return { secret, id: createHash("sha256").update(secret).digest("hex").slice(0, 16) };
  } catch {
    return null;
  }
}

/**
 * Write a new key: the whole file is written under a temporary name, then
 * linked to its place, which fails if another process got there first (whose
 * key is then used): a reader never sees a half-written key.
 */
function createKeyFile(file: string): void {
  const temporary = `${file}.${process.pid}.${randomBytes(6).toString("hex")}.tmp`;
  fs.writeFileSync(temporary, `${randomBytes(32).toString("hex")}\n`, { mode: 0o600, flag: "wx" });
  try {
    fs.linkSync(temporary, file);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== "EEXIST") throw err;
  } finally {
    fs.rmSync(temporary, { force: true });
  }
}

/** The seal of a text under a key: `hmac-sha256:<hex>`. */
export function sealOf(key: CacheKey, text: string): string {
  return `hmac-sha256:${createHmac("sha256", key.secret).update(text).digest("hex")}`;
}
