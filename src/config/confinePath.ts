import fs from "node:fs";
import path from "node:path";
import { PathError } from "../errors.ts";

/**
 * Resolve a path given in audit.yaml against the audit folder and refuse any
 * that leaves it: absolute paths, `..` that climbs out, or a symbolic link whose
 * target lies outside (the contract: an audit is self-contained).
 */
export function confinePath(auditDir: string, relative: string, keyPath: string): string {
  const where = `audit.yaml ${keyPath}`;
  if (path.isAbsolute(relative) || /^[A-Za-z]:[\\/]/.test(relative)) {
    throw new PathError(`${where}: must be a path inside the audit folder, found the absolute path ${JSON.stringify(relative)}`);
  }
  const root = path.resolve(auditDir);
  const resolved = path.resolve(root, relative);
  if (resolved !== root && !resolved.startsWith(root + path.sep)) {
    throw new PathError(`${where}: must stay inside the audit folder, found ${JSON.stringify(relative)}`);
  }
  if (fs.existsSync(resolved)) {
    const realRoot = fs.realpathSync(root);
    const real = fs.realpathSync(resolved);
    if (real !== realRoot && !real.startsWith(realRoot + path.sep)) {
      throw new PathError(`${where}: ${JSON.stringify(relative)} is a link to ${real}, outside the audit folder`);
    }
  }
  return resolved;
}
