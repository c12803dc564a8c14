import fs from "node:fs";
import path from "node:path";
import { ArchiveError } from "../errors.ts";
import { STAGING_PREFIX, removeStaleStaging } from "../output/staging.ts";

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
export { STAGING_PREFIX };

export function versionsDir(auditDir: string): string {
  return path.join(auditDir, VERSIONS_DIR);
}

export function versionDir(auditDir: string, n: number): string {
  return path.join(auditDir, VERSIONS_DIR, String(n));
}

/**
 * Refuse a `versions` entry that is a symbolic link: published versions live
 * in the audit folder itself, and a link would make publish write, and verify
 * and build trust, records kept anywhere else.
 */
export function refuseLinkedVersions(auditDir: string): void {
  const dir = versionsDir(auditDir);
  let stat: fs.Stats;
  try {
    stat = fs.lstatSync(dir);
  } catch {
    return; // no versions yet
  }
  if (stat.isSymbolicLink()) {
    throw new ArchiveError(
      `${dir}: is a symbolic link (to ${fs.readlinkSync(dir)}); published versions must be kept in the audit folder itself, not elsewhere. Replace the link by the folder it points to`,
    );
  }
  if (!stat.isDirectory()) throw new ArchiveError(`${dir}: is a file; published versions are kept in a folder ${VERSIONS_DIR}/ of the audit folder`);
}

/**
 * Numbers of the published versions, ascending. Only folders named by a
 * positive integer without leading zeros count; staging folders and stray
 * files are ignored. Throws ArchiveError for a linked `versions` folder.
 */
export function listVersionNumbers(auditDir: string): number[] {
  refuseLinkedVersions(auditDir);
  const dir = versionsDir(auditDir);
  if (!fs.existsSync(dir)) return [];
  return fs
    .readdirSync(dir, { withFileTypes: true })
    .filter((e) => e.isDirectory() && /^[1-9]\d*$/.test(e.name))
    .map((e) => Number(e.name))
    .sort((a, b) => a - b);
}

/**
 * Remove the staging folders a killed publish left in `versions/` (their
 * owning process is gone); nothing when `versions` is missing or a link.
 */
export function removeStaleVersionStaging(auditDir: string): string[] {
  try {
    if (!fs.lstatSync(versionsDir(auditDir)).isDirectory()) return [];
  } catch {
    return [];
  }
  return removeStaleStaging(versionsDir(auditDir));
}
