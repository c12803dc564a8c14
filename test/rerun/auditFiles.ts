import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

/** The repository's root and its demo audits (audits/<id>), by id. */
export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
export const DEMO_AUDITS = fs
  .readdirSync(path.join(ROOT, "audits"), { withFileTypes: true })
  .filter((e) => e.isDirectory() && fs.existsSync(path.join(ROOT, "audits", e.name, "audit.yaml")))
  .map((e) => e.name)
  .sort();

/**
 * An audit folder as the browser's re-run receives it: audit.yaml and every
 * file under data/, keyed by the path relative to the folder with "/" (the
 * folder's published versions are not part of a run).
 */
export function auditFiles(dir: string): Map<string, Uint8Array> {
  const files = new Map<string, Uint8Array>([["audit.yaml", fs.readFileSync(path.join(dir, "audit.yaml"))]]);
  const walk = (relative: string): void => {
    for (const entry of fs.readdirSync(path.join(dir, relative), { withFileTypes: true })) {
      const name = `${relative}/${entry.name}`;
      if (entry.isDirectory()) walk(name);
      else files.set(name, fs.readFileSync(path.join(dir, name)));
    }
  };
  if (fs.existsSync(path.join(dir, "data"))) walk("data");
  return files;
}
