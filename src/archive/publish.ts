import fs from "node:fs";
import path from "node:path";
import { AUDIT_FILE, parseAuditDefinition } from "../config/loadAudit.ts";
import { ArchiveError, ConfigError } from "../errors.ts";
import { ingestDefinition } from "../ingest/loadAudit.ts";
import { canonicalJson } from "../report/canonicalJson.ts";
import type { ResultDocument } from "../report/resultDocument.ts";
import { resultDocumentOf, runChecks } from "../report/runAudit.ts";
import { validateResultDocument } from "./resultSchema.ts";
import { sha256Of } from "./digest.ts";
import { checkArchive } from "./integrity.ts";
import { DEFINITION_FILE, LOCK_FILE, MANIFEST_FILE, RESULT_FILE, VERSIONS_DIR, refuseLinkedVersions, removeStaleVersionStaging, versionDir, versionsDir } from "./layout.ts";
import { acquireLock } from "./lock.ts";
import { makeStagingDir } from "../output/staging.ts";
import { faultPoint } from "../output/faults.ts";
import { onInterrupt } from "../interrupt/cancellation.ts";
import { MANIFEST_FORMAT, manifestText, sealManifest, type VersionManifest } from "./manifest.ts";

/** Points in a publish at which a test can inject a failure. */
export type PublishStep = "staged-result" | "staged-definition" | "staged-manifest" | "before-rename" | "after-rename";

/**
 * Naming a step in this environment variable makes publish kill its own
 * process with SIGKILL at that step: no clean-up code runs, as when a machine
 * loses power. Used by the tests of atomicity.
 */
export const KILL_AT_ENV = "TRANSPORT_AUDIT_KILL_AT";

export interface PublishOptions {
  /** The clock; publication time is the only clock reading in the tool. */
  now?: () => Date;
  /** Called at each step; a test throws from it to simulate a failure half-way. */
  fault?: (step: PublishStep) => void | Promise<void>;
}

export interface PublishOutcome {
  version: number;
  dir: string;
  manifest: VersionManifest;
  result: ResultDocument;
}

/** `2026-12-01T22:30:00Z`: UTC, whole seconds. */
export function utcTimestamp(d: Date): string {
  return `${d.toISOString().slice(0, 19)}Z`;
}

function writeDurable(file: string, text: string): void {
  const fd = fs.openSync(file, "wx", 0o644); // never overwrite
  try {
    fs.writeSync(fd, text);
    fs.fsyncSync(fd);
  } finally {
    fs.closeSync(fd);
  }
}

function syncDir(dir: string): void {
  const fd = fs.openSync(dir, "r");
  try {
    fs.fsyncSync(fd);
  } finally {
    fs.closeSync(fd);
  }
}

/**
 * Run the audit and freeze its result as the next version under
 * `versions/<N>/`. The version is written aside in a staging folder inside
 * `versions/` (same file system) and renamed into place in one step, so the
 * archive holds either the old versions or the old ones plus the complete new
 * one. An existing version is never rewritten: files are created with O_EXCL,
 * and rename(2) refuses to replace a non-empty folder. Ctrl-C or SIGTERM
 * before the rename removes the staging folder and releases the lock (see
 * interrupt/cancellation.ts); staging folders of killed publishes are removed
 * by the next one. A `versions` folder that is a symbolic link is refused.
 */
export async function publishAudit(auditDir: string, options: PublishOptions = {}): Promise<PublishOutcome> {
  const now = options.now ?? (() => new Date());
  const step = async (s: PublishStep, file: string) => {
    if (process.env[KILL_AT_ENV] === s) process.kill(process.pid, "SIGKILL");
    await options.fault?.(s);
    await faultPoint(`publish:${s}`, file);
  };
  const definitionPath = path.join(auditDir, AUDIT_FILE);
  if (!fs.existsSync(definitionPath)) {
    throw new ConfigError(`${definitionPath}: not found; an audit folder must contain ${AUDIT_FILE} (create one with: transport-audit init ${auditDir})`);
  }
  // Freeze exactly the definition text that is run.
  const definitionText = fs.readFileSync(definitionPath, "utf8");
  const audit = await ingestDefinition(auditDir, parseAuditDefinition(definitionText));
  const result = resultDocumentOf(audit, runChecks(audit));
  const resultText = canonicalJson(result);
  // What build and verify will demand of the frozen document, demanded before it is frozen: a version
  // that could never verify is not published.
  validateResultDocument(JSON.parse(resultText), "the result to publish");

  const publishedAt = now(); // the one clock reading: the publication date
  refuseLinkedVersions(auditDir);
  fs.mkdirSync(versionsDir(auditDir), { recursive: true });
  const release = acquireLock(path.join(versionsDir(auditDir), LOCK_FILE), path.join(auditDir, VERSIONS_DIR), publishedAt);
  let staging: string | null = null;
  const forget = onInterrupt(() => {
    if (staging) fs.rmSync(staging, { recursive: true, force: true });
    release();
    forget();
  });
  try {
    removeStaleVersionStaging(auditDir);
    const state = checkArchive(auditDir);
    if (state.problems.length > 0) {
      throw new ArchiveError(
        `${path.join(auditDir, VERSIONS_DIR)}: the published versions are damaged, so no version is added on top of them:\n` +
          state.problems.map((p) => `  ${p.file}: ${p.message}`).join("\n"),
      );
    }
    const latest = state.versions[state.versions.length - 1];
    if (latest && latest.manifest.fingerprint === result.fingerprint) {
      throw new ArchiveError(
        `${auditDir}: nothing changed since version ${latest.number} (fingerprint ${result.fingerprint}): ` +
          `the audit definition, every data file and the tool version are the same, so a new version would repeat it. ` +
          `Change the data or audit.yaml before publishing again.`,
      );
    }
    const number = latest ? latest.number + 1 : 1;
    const manifest: VersionManifest = sealManifest({
      format: MANIFEST_FORMAT,
      audit: result.audit,
      version: number,
      published: utcTimestamp(publishedAt),
      tool: { name: result.tool.name, version: result.tool.version },
      fingerprint: result.fingerprint,
      stamp: result.stamp,
      inputs: result.datasets.map((d) => ({ id: d.id, file: d.file, sha256: d.sha256, rows: d.rows })),
      files: { "result.json": sha256Of(resultText), "audit.yaml": sha256Of(definitionText) },
      previous: latest ? { version: latest.number, digest: latest.manifestDigest } : null,
    });
    staging = makeStagingDir(versionsDir(auditDir));
    fs.chmodSync(staging, 0o755); // mkdtemp makes it private; a published version is for everyone to read
    writeDurable(path.join(staging, RESULT_FILE), resultText);
    await step("staged-result", path.join(staging, RESULT_FILE));
    writeDurable(path.join(staging, DEFINITION_FILE), definitionText);
    await step("staged-definition", path.join(staging, DEFINITION_FILE));
    writeDurable(path.join(staging, MANIFEST_FILE), manifestText(manifest));
    await step("staged-manifest", path.join(staging, MANIFEST_FILE));
    syncDir(staging);
    const target = versionDir(auditDir, number);
    await step("before-rename", target);
    try {
      fs.renameSync(staging, target);
    } catch (err) {
      const code = (err as NodeJS.ErrnoException).code;
      if (code === "ENOTEMPTY" || code === "EEXIST") {
        throw new ArchiveError(`${target}: version ${number} was published by another process at the same moment; run publish again`);
      }
      throw err;
    }
    staging = null;
    syncDir(versionsDir(auditDir));
    await step("after-rename", target);
    return { version: number, dir: target, manifest, result };
  } finally {
    if (staging) fs.rmSync(staging, { recursive: true, force: true });
    release();
    forget();
  }
}
