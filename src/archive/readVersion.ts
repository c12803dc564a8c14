import fs from "node:fs";
import path from "node:path";
import { ArchiveError } from "../errors.ts";
import type { ResultDocument } from "../report/resultDocument.ts";
import { DEFINITION_FILE, MANIFEST_FILE, RESULT_FILE, VERSIONS_DIR, versionDir } from "./layout.ts";
import { chainDigestOf, parseManifest, type VersionManifest } from "./manifest.ts";

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

function readText(auditDir: string, n: number, file: string): string {
  const full = path.join(versionDir(auditDir, n), file);
  if (!fs.existsSync(full)) throw new ArchiveError(`${versionFileLabel(n, file)}: missing; a published version holds ${MANIFEST_FILE}, ${RESULT_FILE} and ${DEFINITION_FILE}`);
  return fs.readFileSync(full, "utf8");
}

/** Read a published version. Throws ArchiveError when a file is missing or unreadable. */
export function readVersion(auditDir: string, n: number): FrozenVersion {
  const manifestText = readText(auditDir, n, MANIFEST_FILE);
  const manifest = parseManifest(manifestText, versionFileLabel(n, MANIFEST_FILE));
  const resultText = readText(auditDir, n, RESULT_FILE);
  let result: ResultDocument;
  try {
    result = JSON.parse(resultText) as ResultDocument;
  } catch (err) {
    throw new ArchiveError(`${versionFileLabel(n, RESULT_FILE)}: not valid JSON (${(err as Error).message})`);
  }
  const definitionText = readText(auditDir, n, DEFINITION_FILE);
  return { number: n, dir: versionDir(auditDir, n), manifest, manifestDigest: chainDigestOf(manifest, manifestText), manifestText, resultText, result, definitionText };
}
