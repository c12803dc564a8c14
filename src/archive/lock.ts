import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { ArchiveError } from "../errors.ts";
import { isProcessAlive } from "../output/staging.ts";

interface LockRecord {
  pid: number;
  host: string;
  since: string;
}


function readLock(file: string): LockRecord | null {
  try {
    return JSON.parse(fs.readFileSync(file, "utf8")) as LockRecord;
  } catch {
    return null;
  }
}

/**
 * Take an exclusive lock by creating `file` with O_EXCL: of two processes that
 * try at once, exactly one succeeds (POSIX open(2), O_CREAT|O_EXCL). A lock
 * left by a process on this host that no longer runs (a killed publish) is
 * taken over. `now` (the publish's clock reading) is recorded for the message
 * another process shows. Returns the function that releases the lock.
 */
export function acquireLock(file: string, label: string, now: Date): () => void {
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      const fd = fs.openSync(file, fs.constants.O_CREAT | fs.constants.O_EXCL | fs.constants.O_WRONLY, 0o644);
      const record: LockRecord = { pid: process.pid, host: os.hostname(), since: now.toISOString() };
      fs.writeSync(fd, JSON.stringify(record));
      fs.closeSync(fd);
      return () => {
        const now = readLock(file);
        if (now && now.pid === record.pid && now.host === record.host) fs.rmSync(file, { force: true });
      };
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== "EEXIST") throw err;
      const holder = readLock(file);
      if (attempt === 0 && holder && holder.host === os.hostname() && !isProcessAlive(holder.pid)) {
        fs.rmSync(file, { force: true });
        continue;
      }
      const who = holder ? `process ${holder.pid} on ${holder.host} since ${holder.since}` : "another process";
      throw new ArchiveError(
        `${label}: another publish of this audit is running (${who}); wait for it to finish. If no publish is running, delete ${path.basename(file)} and try again.`,
      );
    }
  }
  throw new ArchiveError(`${label}: could not take the publish lock; try again`);
}
