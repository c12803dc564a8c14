import fs from "node:fs";
import path from "node:path";
import { DataError } from "../../errors.ts";

/** A data file opened once; everything about it is read from this descriptor. */
export interface OpenedFile {
  fd: number;
  size: number;
}

/**
 * Open a data file for reading and check what was opened, not what the path
 * named a moment earlier: the descriptor must be a regular file whose real
 * path (as the kernel resolved it at open time, /proc/self/fd on Linux) lies
 * inside the audit folder. A symbolic link swapped between the configuration's
 * path check and this open is thus caught, and nothing later re-opens the
 * path. Where /proc is absent, the real path resolved just before opening must
 * name the same file (device and inode) as the descriptor.
 */
export function openDataFile(filePath: string, label: string, auditDir: string): OpenedFile {
  let before: string | null = null;
  try {
    before = fs.realpathSync(filePath);
  } catch {
    throw new DataError(`${label}: cannot read the file (does it exist?)`);
  }
  let fd: number;
  try {
    fd = fs.openSync(filePath, "r");
  } catch (err) {
    throw new DataError(`${label}: cannot read the file (${(err as NodeJS.ErrnoException).code ?? "open failed"})`);
  }
  try {
    const stat = fs.fstatSync(fd);
    if (stat.isDirectory()) throw new DataError(`${label}: is a folder; expected a data file`);
    if (!stat.isFile()) throw new DataError(`${label}: is not a regular file; expected a data file`);
    const real = openedPath(fd) ?? sameFileOrNull(before, stat);
    const root = fs.realpathSync(auditDir);
    if (real === null || (real !== root && !real.startsWith(root + path.sep))) {
      throw new DataError(`${label}: the file opened is not inside the audit folder (${real ?? "it was replaced while being opened"}); data files must stay inside the audit`);
    }
    return { fd, size: stat.size };
  } catch (err) {
    fs.closeSync(fd);
    throw err;
  }
}

/** The path the kernel resolved for an open descriptor (Linux), or null. */
function openedPath(fd: number): string | null {
  try {
    return fs.readlinkSync(`/proc/self/fd/${fd}`);
  } catch {
    return null;
  }
}

/** `real` when it still names the opened file (same device and inode), else null. */
function sameFileOrNull(real: string, opened: fs.Stats): string | null {
  try {
    const now = fs.statSync(real);
    return now.dev === opened.dev && now.ino === opened.ino ? real : null;
  } catch {
    return null;
  }
}
