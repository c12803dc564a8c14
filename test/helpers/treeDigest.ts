import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";

/** Every file below `dir` (path relative to it → SHA-256 of its bytes): equal snapshots mean nothing was changed, added or removed. */
export function treeDigest(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  if (!fs.existsSync(dir)) return out;
  for (const entry of fs.readdirSync(dir, { recursive: true, withFileTypes: true })) {
    if (!entry.isFile()) continue;
    const full = path.join(entry.parentPath, entry.name);
    out[path.relative(dir, full)] = crypto.createHash("sha256").update(fs.readFileSync(full)).digest("hex");
  }
  return out;
}

/** Names in `dir` that start with `.staging-` (folders written aside and not yet renamed into place). */
export function stagingFolders(dir: string): string[] {
  return fs.existsSync(dir) ? fs.readdirSync(dir).filter((n) => n.startsWith(".staging-")) : [];
}
