import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { CHECKS } from "../../checks/index.ts";
import { DataError, PathError } from "../../errors.ts";
import { ingestDefinition } from "../../ingest/loadAudit.ts";
import { chooseSource } from "../../ingest/sources/index.ts";
import { loadAuditDefinition } from "../../config/loadAudit.ts";
import type { AuditDefinition } from "../../config/types.ts";
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

/** Refuse a path of the audit folder as given ("data/x.csv") that could leave it or names no file. */
function checkRelativePath(name: string): void {
  const parts = name.split("/");
  if (name === "" || name.startsWith("/") || name.includes("\\") || parts.some((p) => p === "" || p === "." || p === "..") || name.includes("\0")) {
    throw new PathError(`${JSON.stringify(name)}: expected a path inside the audit folder with "/" between names (like "data/run-1.csv"), without "..", "." or empty names`);
  }
}

/** Write the files (their names checked already) into the folder `dir`. */
function writeAuditFolder(dir: string, files: ReadonlyMap<string, Uint8Array>): void {
  for (const [name, bytes] of files) {
    const target = path.join(dir, ...name.split("/"));
    fs.mkdirSync(path.dirname(target), { recursive: true });
    fs.writeFileSync(target, bytes);
  }
}

/** The error with the private folder's path taken out of its message: messages name files as the audit folder holds them. */
function withoutFolder(err: unknown, dir: string): unknown {
  if (err instanceof Error && err.message.includes(dir)) {
    err.message = err.message.split(`${dir}/`).join("").split(dir).join("<audit folder>");
  }
  return err;
}

/**
 * True in the browser bundle, where the HDF5 library is absent (its Node
 * build reads the host's files in place); scripts/build/browserBundle.ts
 * defines it. In Node every format is read.
 */
declare const __TRANSPORT_AUDIT_BROWSER__: boolean | undefined;
const BROWSER_BUILD = typeof __TRANSPORT_AUDIT_BROWSER__ !== "undefined" && __TRANSPORT_AUDIT_BROWSER__;

/** Refuse, naming the dataset's file, an audit with an HDF5 dataset (its format as the reader would choose it). */
function refuseHdf5(definition: AuditDefinition): void {
  for (const [i, config] of definition.datasets.entries()) {
    let format: string;
    try {
      ({ format } = chooseSource(config.file, (config as { format?: string }).format, `datasets[${i}]`));
    } catch {
      continue; // a folder or glob of parts, or no known extension: the reader decides, and words any refusal
    }
    if (format === "hdf5") {
      throw new DataError(`${config.file}: HDF5 files are not read in the browser (the HDF5 library is not part of this page's re-run); re-run this audit with the command line: transport-audit run <folder>`);
    }
  }
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
  for (const name of files.keys()) checkRelativePath(name);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "transport-audit-rerun-"));
  try {
    writeAuditFolder(dir, files);
    // Reading: bytes of each data file as its reader reports them (large files), between a start and an end over all files given.
    const bytes = [...files.values()].reduce((sum, b) => sum + b.length, 0);
    onProgress?.({ phase: "ingest", done: 0, total: bytes });
    const definition = loadAuditDefinition(dir);
    if (BROWSER_BUILD) refuseHdf5(definition);
    const audit = await ingestDefinition(dir, definition, { onProgress: onProgress && ((file, done, total) => onProgress({ phase: "ingest", done, total, label: file })) });
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

// The comparison has no Node dependencies: a page may bundle ./compare.ts alone.
export { compareResultJson, type ResultJsonComparison } from "./compare.ts";
