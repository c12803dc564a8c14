import fs from "node:fs";
import path from "node:path";
import { PathError } from "../errors.ts";
import { TOOL } from "../version.ts";
import { isWithin, realPathOf } from "./paths.ts";
import { makeStagingDir } from "./staging.ts";

/**
 * The file by which `build` marks a folder as its own output. Only a folder
 * holding it (or an empty one) is replaced without `--force`: whatever else a
 * user keeps there is never removed by accident.
 */
export const SITE_STAMP_FILE = ".transport-audit-site";

/** The folders of an archive that no site may replace or sit in. */
export interface ArchivePlaces {
  root: string;
  auditsDir: string;
  auditFolders: readonly string[];
}

/**
 * Refuse an output folder that would destroy or pollute the archive: one that
 * is or holds the archive root, the audits folder or an audit folder, or lies
 * inside the audits folder. Paths are compared by their real paths, so a
 * symbolic link or `..` does not slip past.
 */
export function refuseOutInArchive(out: string, places: ArchivePlaces): void {
  const target = realPathOf(out);
  const root = realPathOf(places.root);
  const audits = realPathOf(places.auditsDir);
  const said = `--out ${out}`;
  if (isWithin(root, target)) {
    throw new PathError(`${said}: ${target === root ? "is" : "contains"} the archive root ${places.root}; the site is written into a folder of its own (for example ${path.join(places.root, "site")}), which build replaces whole`);
  }
  if (isWithin(audits, target)) {
    throw new PathError(`${said}: ${target === audits ? "is" : "contains"} the audits folder ${places.auditsDir}; the site is written into a folder of its own (for example ${path.join(places.root, "site")}), which build replaces whole`);
  }
  if (isWithin(target, audits)) {
    throw new PathError(`${said}: lies inside the audits folder ${places.auditsDir}; the site must be written outside the audits (for example ${path.join(places.root, "site")})`);
  }
  for (const folder of places.auditFolders) {
    const real = realPathOf(folder);
    if (isWithin(real, target) || isWithin(target, real)) {
      throw new PathError(`${said}: ${isWithin(real, target) ? "contains" : "lies inside"} the audit folder ${folder}; the site must be written outside the audits (for example ${path.join(places.root, "site")})`);
    }
  }
}

/**
 * Refuse to replace what build did not write: a file, a symbolic link, or a
 * non-empty folder without the stamp (unless forced). A missing or empty
 * folder, or one a previous build stamped, may be replaced.
 */
export function refuseForeignOut(out: string, force: boolean): void {
  let stat: fs.Stats;
  try {
    stat = fs.lstatSync(out);
  } catch {
    return; // nothing there yet
  }
  const said = `--out ${out}`;
  if (stat.isSymbolicLink()) throw new PathError(`${said}: is a symbolic link (to ${fs.readlinkSync(out)}); build replaces the output folder whole, so name the folder itself`);
  if (!stat.isDirectory()) throw new PathError(`${said}: is a file, not a folder; build writes a folder of pages, so name a new or empty folder`);
  if (force || fs.existsSync(path.join(out, SITE_STAMP_FILE)) || isUnstampedSite(out)) return;
  if (fs.readdirSync(out).length === 0) return;
  throw new PathError(
    `${said}: holds files that transport-audit build did not write (no ${SITE_STAMP_FILE} in it), and build replaces the whole folder. ` +
      `Name a new or empty folder, or pass --force to replace this one and everything in it`,
  );
}

/**
 * A site written before build stamped its output: its index page names this
 * tool as its generator (templates/_includes/base.njk), so replacing it loses
 * nothing the user wrote there that a stamped site would keep.
 */
function isUnstampedSite(out: string): boolean {
  let head: string;
  try {
    const fd = fs.openSync(path.join(out, "index.html"), "r");
    try {
      const buffer = Buffer.alloc(4096);
      head = buffer.toString("utf8", 0, fs.readSync(fd, buffer, 0, buffer.length, 0));
    } finally {
      fs.closeSync(fd);
    }
  } catch {
    return false;
  }
  return head.includes(`<meta name="generator" content="${TOOL.name} `);
}

/** A fresh staging folder beside `out`, on the same file system, so that the finished site can be renamed into place. */
export function stageBeside(out: string): string {
  fs.mkdirSync(path.dirname(out), { recursive: true });
  const staging = makeStagingDir(path.dirname(out));
  fs.chmodSync(staging, 0o755); // mkdtemp makes it private; a site is for everyone to read
  return staging;
}

/** Mark a finished site as build's own output. */
export function stampSite(dir: string): void {
  fs.writeFileSync(
    path.join(dir, SITE_STAMP_FILE),
    `${JSON.stringify({ written_by: `${TOOL.name} build`, tool_version: TOOL.version, note: "the next build replaces this folder whole" }, null, 2)}\n`,
  );
}

/**
 * Put the finished `staging` folder in the place of `out`. A missing or empty
 * `out` is replaced by one rename(2), atomically; an existing site is first
 * renamed aside (a staging name, so a killed process's leftovers are swept
 * later), the new one renamed in, and the old one removed. If the second
 * rename fails, the old site is put back.
 */
export function swapIntoPlace(staging: string, out: string): void {
  try {
    fs.renameSync(staging, out);
    return;
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code !== "ENOTEMPTY" && code !== "EEXIST") throw err;
  }
  const old = makeStagingDir(path.dirname(out));
  fs.renameSync(out, old); // onto an empty folder: allowed by rename(2)
  try {
    fs.renameSync(staging, out);
  } catch (err) {
    fs.renameSync(old, out);
    throw err;
  }
  fs.rmSync(old, { recursive: true, force: true });
}
