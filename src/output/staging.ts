import fs from "node:fs";
import os from "node:os";
import path from "node:path";

/**
 * Prefix of the folders written aside and renamed into place when complete
 * (a published version, a built site). The rest of the name records the
 * owner, `.staging-<pid>@<host>-XXXXXX`, so that a later process can tell a
 * folder left by a killed process from one another process is still writing.
 */
export const STAGING_PREFIX = ".staging-";

const OWNED = /^\.staging-(\d+)@(.+)-[A-Za-z0-9]{6}$/;

/** True while a process with this id runs on this host (EPERM: it runs, as another user). */
export function isProcessAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === "EPERM";
  }
}

/** A fresh, empty staging folder in `parent` (created with mode 0700 by mkdtemp), owned by this process. */
export function makeStagingDir(parent: string): string {
  return fs.mkdtempSync(path.join(parent, `${STAGING_PREFIX}${process.pid}@${os.hostname()}-`));
}

/** The process that made a staging folder, from its name; null for any other name. */
export function stagingOwner(name: string): { pid: number; host: string } | null {
  const m = OWNED.exec(name);
  return m ? { pid: Number(m[1]), host: m[2] } : null;
}

/**
 * Remove the staging folders in `parent` whose owner was a process on this
 * host that no longer runs (killed before it could clean up). Folders of
 * running processes, of other hosts (a shared file system) and of unknown
 * owners are left alone. Returns the names removed.
 */
export function removeStaleStaging(parent: string): string[] {
  let names: string[];
  try {
    names = fs.readdirSync(parent);
  } catch {
    return []; // no such folder yet: nothing was left there
  }
  const removed: string[] = [];
  for (const name of names) {
    const owner = stagingOwner(name);
    if (!owner || owner.host !== os.hostname() || owner.pid === process.pid || isProcessAlive(owner.pid)) continue;
    fs.rmSync(path.join(parent, name), { recursive: true, force: true });
    removed.push(name);
  }
  return removed;
}
