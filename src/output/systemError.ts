import os from "node:os";

/**
 * Errors of the operating system that say something about the user's machine
 * (a full disk, a read-only mount, missing permission), not about our code,
 * with the cause in words a user acts on. Codes and their meaning: POSIX
 * errno.h (IEEE Std 1003.1-2017) and Linux errno(3). Codes that more likely
 * mean a mistake of ours (ENOENT on a file we made, EEXIST, EXDEV) are left
 * out: those still print a stack and ask to be reported.
 */
export const SYSTEM_CAUSES: Readonly<Record<string, string>> = {
  ENOSPC: "no space left on the device",
  EDQUOT: "disk quota exceeded",
  EFBIG: "file too large for the file system",
  EIO: "input/output error (a failing disk or a lost network file system)",
  EROFS: "the file system is read-only",
  EACCES: "permission denied",
  EPERM: "operation not permitted",
  ENOTDIR: "a part of the path is not a folder",
  EISDIR: "is a folder, not a file",
  EBUSY: "busy (in use by another process or a mount point)",
  ELOOP: "too many symbolic links",
  ENAMETOOLONG: "the name is too long",
  EMFILE: "too many open files in this process",
  ENFILE: "too many open files on the system",
  ETXTBSY: "the file is busy",
  ESTALE: "stale network file handle",
};

export interface SystemErrorLike extends Error {
  code: string;
  syscall?: string;
  path?: string;
  dest?: string;
}

/** An error of the operating system we know how to explain, found in `err` or the chain of errors it wraps. */
export function findSystemError(err: unknown, depth = 0): SystemErrorLike | null {
  if (depth > 8 || err === null || typeof err !== "object") return null;
  const e = err as Partial<SystemErrorLike> & { cause?: unknown; originalError?: unknown; errors?: unknown[] };
  if (typeof e.code === "string" && e.code in SYSTEM_CAUSES) return e as SystemErrorLike;
  // Eleventy wraps what its writes throw in `originalError`; others use `cause` or an AggregateError.
  for (const inner of [e.cause, e.originalError, ...(Array.isArray(e.errors) ? e.errors : [])]) {
    const found = findSystemError(inner, depth + 1);
    if (found) return found;
  }
  return null;
}

/** One line a user reads: `/data/site/index.html: no space left on the device (ENOSPC, write)`. */
export function describeSystemError(e: SystemErrorLike): string {
  const where = e.path ? (e.dest ? `${e.path} → ${e.dest}` : e.path) : "(no file named by the system)";
  return `${where}: ${SYSTEM_CAUSES[e.code]} (${e.code}${e.syscall ? `, ${e.syscall}` : ""})`;
}

/** An error shaped as Node's file system functions throw it, for fault injection. */
export function systemError(code: string, syscall: string, file: string): SystemErrorLike {
  const e = new Error(`${code}: ${SYSTEM_CAUSES[code] ?? "system error"}, ${syscall} '${file}'`) as SystemErrorLike & { errno?: number };
  e.code = code;
  e.syscall = syscall;
  e.path = file;
  const n = (os.constants.errno as Record<string, number>)[code];
  if (n !== undefined) e.errno = -n;
  return e;
}
