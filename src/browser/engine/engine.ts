import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { compareResultTexts, type ResultProblem } from "../../archive/resultDifferences.ts";
import { CHECKS } from "../../checks/index.ts";
import { PathError } from "../../errors.ts";
import { ingestAudit } from "../../ingest/loadAudit.ts";
import { canonicalJson } from "../../report/canonicalJson.ts";
import type { ResultDocument } from "../../report/resultDocument.ts";
import { resultDocumentOf, runChecks } from "../../report/runAudit.ts";

/*
 * The re-run engine: an audit folder given as bytes → the result document,
 * through the very modules `transport-audit run` uses (config, ingest, checks,
 * result document). The browser bundle (scripts/build/browserBundle.ts) maps
 * node:fs onto an in-memory volume, so the files are written there and read
 * back by the same readers; in Node (tests, bench) they go to a private
 * temporary folder. Either way the folder is removed afterwards.
 */

export interface RerunProgress {
  /**
   * ingest: bytes read, of all files given (first and last event) or of the data file `label`
   * (while a file above the reduction threshold, 64 MB, is summarised); checks: checks finished (`label` the last one's id); done: finished.
   */
  phase: "ingest" | "checks" | "done";
  done: number;
  total: number;
  label?: string;
}

export interface RerunOptions {
  /** Aborting stops the run at the next step it can stop at (before reading, between checks); the error thrown is the signal's reason. */
  signal?: AbortSignal;
  onProgress?: (p: RerunProgress) => void;
}

export interface RerunResult {
  /**
   * The result document as canonical JSON (src/report/canonicalJson.ts), no
   * trailing newline: byte for byte what `publish` freezes as
   * versions/<N>/result.json. (`run --json` prints the same document
   * indented, JSON.stringify(document, null, 2) with a newline; its
   * canonical JSON is this text.)
   */
  json: string;
  document: ResultDocument;
}

/** A path of the audit folder as given ("data/x.csv"), checked to stay inside it. */
function checkedRelativePath(name: string): string {
  const parts = name.split("/");
  if (name === "" || name.startsWith("/") || name.includes("\\") || parts.some((p) => p === "" || p === "." || p === "..") || name.includes("\0")) {
    throw new PathError(`${JSON.stringify(name)}: expected a path inside the audit folder with "/" between names (like "data/run-1.csv"), without "..", "." or empty names`);
  }
  return name;
}

/** Write the files into a new private folder; the folder's path. */
function writeAuditFolder(files: ReadonlyMap<string, Uint8Array>): string {
  const names = [...files.keys()].map(checkedRelativePath);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "transport-audit-rerun-"));
  for (const name of names) {
    const target = path.join(dir, ...name.split("/"));
    fs.mkdirSync(path.dirname(target), { recursive: true });
    fs.writeFileSync(target, files.get(name)!);
  }
  return dir;
}

/** The error with the private folder's path taken out of its message: messages name files as the audit folder holds them. */
function withoutFolder(err: unknown, dir: string): unknown {
  if (err instanceof Error && err.message.includes(dir)) {
    err.message = err.message.split(`${dir}/`).join("").split(dir).join("<audit folder>");
  }
  return err;
}

/**
 * Run an audit given as its files (keys: paths relative to the audit folder,
 * "audit.yaml", "data/x.csv") and return its result document. Errors are the
 * project's typed errors (ConfigError, DataError, …) with the messages the
 * command line prints, files named relative to the audit folder.
 */
export async function runAuditFromFiles(files: ReadonlyMap<string, Uint8Array>, options: RerunOptions = {}): Promise<RerunResult> {
  const { signal, onProgress } = options;
  signal?.throwIfAborted();
  const dir = writeAuditFolder(files);
  try {
    // Reading: bytes of each data file as its reader reports them (large files), between a start and an end over all files given.
    const bytes = [...files.values()].reduce((sum, b) => sum + b.length, 0);
    onProgress?.({ phase: "ingest", done: 0, total: bytes });
    const audit = await ingestAudit(dir, { onProgress: onProgress && ((file, done, total) => onProgress({ phase: "ingest", done, total, label: file })) });
    onProgress?.({ phase: "ingest", done: bytes, total: bytes });
    signal?.throwIfAborted();
    const checks = runChecks(audit, CHECKS, (done, total, check) => {
      onProgress?.({ phase: "checks", done, total, label: check });
      signal?.throwIfAborted();
    });
    const document = resultDocumentOf(audit, checks);
    const json = canonicalJson(document);
    onProgress?.({ phase: "done", done: 1, total: 1 });
    return { json, document };
  } catch (err) {
    throw withoutFolder(err, dir);
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

export interface ResultJsonComparison {
  reproduced: boolean;
  differences: ResultProblem[];
  more: number;
}

/**
 * A frozen result document's text against a re-run's (`json` above): the
 * comparison `verify` makes (src/archive/resultDifferences.ts), every
 * difference named by check and value, at most `maxDifferences` (default 40) listed.
 */
export function compareResultJson(frozenJson: string, freshJson: string, maxDifferences?: number): ResultJsonComparison {
  return compareResultTexts(frozenJson, freshJson, { maxDifferences });
}
