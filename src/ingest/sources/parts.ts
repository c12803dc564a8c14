import fs from "node:fs";
import path from "node:path";
import { createHash } from "node:crypto";
import { ConfigError, PathError } from "../../errors.ts";

/**
 * Multi-part datasets: `file:` names a folder, or a glob of parts of one
 * format (`runs/*.csv`, `runs/**\/part-*.parquet`, hive-style partition
 * folders `seed=17/part-0003.parquet` included), as parallel simulation runs,
 * array jobs and distributed engines write them.
 */

/** Whether a `file:` value is a glob pattern. */
export function isGlob(file: string): boolean {
  return /[*?[]/.test(file);
}

/** A glob as a regular expression over "/"-separated paths: `**` any folders, `*` and `?` within one name, `[...]` a class. */
function globRegex(glob: string): RegExp {
  let re = "";
  for (let i = 0; i < glob.length; i++) {
    const c = glob[i];
    if (c === "*" && glob[i + 1] === "*") {
      re += glob[i + 2] === "/" ? "(?:[^/]+/)*" : ".*";
      i += glob[i + 2] === "/" ? 2 : 1;
    } else if (c === "*") re += "[^/]*";
    else if (c === "?") re += "[^/]";
    else if (c === "[") {
      const end = glob.indexOf("]", i);
      if (end < 0) re += "\\[";
      else {
        re += `[${glob.slice(i + 1, end).replace(/^!/, "^").replace(/\\/g, "\\\\")}]`;
        i = end;
      }
    } else re += c.replace(/[.+^${}()|\\]/g, "\\$&");
  }
  return new RegExp(`^${re}$`);
}

/** Every regular file under `dir` (relative, "/"-separated, sorted), hidden names (".…") left out. */
function filesUnder(dir: string, prefix = ""): string[] {
  const out: string[] = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    if (entry.name.startsWith(".")) continue;
    const rel = prefix ? `${prefix}/${entry.name}` : entry.name;
    if (entry.isDirectory()) out.push(...filesUnder(path.join(dir, entry.name), rel));
    else if (entry.isFile() || entry.isSymbolicLink()) out.push(rel);
  }
  return out;
}

/**
 * The parts a `file:` value names, as paths relative to the audit folder
 * ("/"-separated, sorted by code point: the order rows are read in), or null
 * when it names one file. A folder gives every file under it; a glob the
 * files it matches. Refuses a pattern that matches nothing.
 */
export function listParts(auditDir: string, file: string, keyPath: string): string[] | null {
  const where = `audit.yaml ${keyPath}.file`;
  if (!isGlob(file)) {
    const full = path.resolve(auditDir, file);
    if (!fs.existsSync(full) || !fs.statSync(full).isDirectory()) return null;
    const parts = filesUnder(full).map((p) => path.posix.join(file.replace(/\/+$/, ""), p));
    if (parts.length === 0) throw new ConfigError(`${where}: the folder ${JSON.stringify(file)} holds no files; a multi-part dataset needs at least one part`);
    return parts.sort(byCodePoint);
  }
  // The folder before the first pattern character is where the search starts.
  const fixed = file.slice(0, file.search(/[*?[]/));
  const base = fixed.includes("/") ? fixed.slice(0, fixed.lastIndexOf("/")) : ".";
  const root = path.resolve(auditDir, base);
  if (!path.resolve(root).startsWith(path.resolve(auditDir))) throw new PathError(`${where}: must stay inside the audit folder, found ${JSON.stringify(file)}`);
  if (!fs.existsSync(root) || !fs.statSync(root).isDirectory()) throw new ConfigError(`${where}: no folder ${JSON.stringify(base)} to search for ${JSON.stringify(file)}`);
  const pattern = globRegex(file);
  const parts = filesUnder(root)
    .map((p) => (base === "." ? p : `${base}/${p}`))
    .filter((p) => pattern.test(p));
  if (parts.length === 0) throw new ConfigError(`${where}: no file matches ${JSON.stringify(file)}`);
  return parts.sort(byCodePoint);
}

function byCodePoint(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * The digest of a multi-part dataset: SHA-256 over the sorted list of its
 * parts, one line a part in the form `sha256sum` prints
 * (`<hex SHA-256>  <path relative to the audit folder>\n`), so that anyone can
 * recompute it with standard tools: `sha256sum <parts> | sort -k2 | sha256sum`
 * (in the C locale).
 */
export function partsDigest(parts: { path: string; sha256: string }[]): string {
  const sorted = [...parts].sort((a, b) => byCodePoint(a.path, b.path));
  return createHash("sha256")
    .update(sorted.map((p) => `${p.sha256}  ${p.path}\n`).join(""))
    .digest("hex");
}
