import fs from "node:fs";
import path from "node:path";

/** Where published versions live inside an audit folder (contract: `versions/<N>/`). */
export const VERSIONS_DIR = "versions";
/** The frozen result document, canonical JSON. */
export const RESULT_FILE = "result.json";
/** The audit definition exactly as it was when the version was published. */
export const DEFINITION_FILE = "audit.yaml";
/** Publication record: date, tool, inputs, fingerprint, file digests and the link to the previous version. */
export const MANIFEST_FILE = "version.json";
/** Lock file that serialises publishes of one audit. */
export const LOCK_FILE = ".publish.lock";
/** Prefix of the folders a publish writes aside before renaming them into place. */
export const STAGING_PREFIX = ".staging-";

export function versionsDir(auditDir: string): string {
  return path.join(auditDir, VERSIONS_DIR);
}

export function versionDir(auditDir: string, n: number): string {
  return path.join(auditDir, VERSIONS_DIR, String(n));
}

/**
 * Numbers of the published versions, ascending. Only folders named by a
 * positive integer without leading zeros count; staging folders and stray
 * files are ignored.
 */
export function listVersionNumbers(auditDir: string): number[] {
  const dir = versionsDir(auditDir);
  if (!fs.existsSync(dir)) return [];
  return fs
    .readdirSync(dir, { withFileTypes: true })
    .filter((e) => e.isDirectory() && /^[1-9]\d*$/.test(e.name))
    .map((e) => Number(e.name))
    .sort((a, b) => a - b);
}
