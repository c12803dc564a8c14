import fs from "node:fs";
import path from "node:path";

/**
 * The real path of `p` even when it does not exist yet: the nearest existing
 * ancestor is resolved through its symbolic links and the rest appended. Two
 * names for one folder (a link, `..`, a relative path) then compare equal.
 */
export function realPathOf(p: string): string {
  const absolute = path.resolve(p);
  const missing: string[] = [];
  let existing = absolute;
  for (;;) {
    try {
      return path.join(fs.realpathSync(existing), ...missing.reverse());
    } catch {
      const parent = path.dirname(existing);
      if (parent === existing) return absolute;
      missing.push(path.basename(existing));
      existing = parent;
    }
  }
}

/** True when `inner` is `outer` itself or lies below it (both absolute, already real). */
export function isWithin(inner: string, outer: string): boolean {
  const rel = path.relative(outer, inner);
  return rel === "" || (rel.split(path.sep)[0] !== ".." && !path.isAbsolute(rel));
}
