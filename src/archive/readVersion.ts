import fs from "node:fs";
import path from "node:path";
import { ArchiveError } from "../errors.ts";
import type { ResultDocument } from "../report/resultDocument.ts";
import { DEFINITION_FILE, MANIFEST_FILE, RESULT_FILE, VERSIONS_DIR, versionDir } from "./layout.ts";
import { chainDigestOf, parseManifest, type VersionManifest } from "./manifest.ts";
import { validateResultDocument } from "./resultSchema.ts";

/** One published version as stored on disk. */
export interface FrozenVersion {
  number: number;
  dir: string;
  manifest: VersionManifest;
  /** The record's chain digest (manifest.ts chainDigestOf): what the next version links to. */
  manifestDigest: string;
  manifestText: string;
  resultText: string;
  result: ResultDocument;
  definitionText: string;
}

/** `versions/3/result.json`, the way messages name files of a version. */
export function versionFileLabel(n: number, file: string): string {
  return path.posix.join(VERSIONS_DIR, String(n), file);
}

/**
 * A file of a version, read only if it is a regular file in the version's own
 * folder: a symbolic link (to a file elsewhere, which anyone could have made
 * look like a record) is refused.
 */
function readText(auditDir: string, n: number, file: string): string {
  const full = path.join(versionDir(auditDir, n), file);
  let stat: fs.Stats;
  try {
    stat = fs.lstatSync(full);
  } catch {
    throw new ArchiveError(`${versionFileLabel(n, file)}: missing; a published version holds ${MANIFEST_FILE}, ${RESULT_FILE} and ${DEFINITION_FILE}`);
  }
  if (stat.isSymbolicLink()) throw new ArchiveError(`${versionFileLabel(n, file)}: is a symbolic link; a published version keeps its own files, so it is not read`);
  if (!stat.isFile()) throw new ArchiveError(`${versionFileLabel(n, file)}: is not a regular file`);
  return fs.readFileSync(full, "utf8");
}

/** Read a published version. Throws ArchiveError when a file is missing, unreadable, or its result document does not match the schema. */
export function readVersion(auditDir: string, n: number): FrozenVersion {
  const manifestText = readText(auditDir, n, MANIFEST_FILE);
  const manifest = parseManifest(manifestText, versionFileLabel(n, MANIFEST_FILE));
  const resultText = readText(auditDir, n, RESULT_FILE);
  let parsed: unknown;
  try {
    parsed = JSON.parse(resultText);
  } catch (err) {
    throw new ArchiveError(`${versionFileLabel(n, RESULT_FILE)}: not valid JSON (${(err as Error).message})`);
  }
  // Validated before any use: its ids become page paths and its numbers are shown as frozen.
  const result: ResultDocument = validateResultDocument(parsed, versionFileLabel(n, RESULT_FILE));
  const definitionText = readText(auditDir, n, DEFINITION_FILE);
  return { number: n, dir: versionDir(auditDir, n), manifest, manifestDigest: chainDigestOf(manifest, manifestText), manifestText, resultText, result, definitionText };
}
