import fs from "node:fs";
import path from "node:path";
import { createHash } from "node:crypto";
import { confinePath } from "../config/confinePath.ts";
import { InputError } from "../errors.ts";
import { listParts, partsDigest } from "../ingest/sources/parts.ts";
import { openDataFile } from "../ingest/sources/openDataFile.ts";
import type { FrozenVersion } from "../archive/readVersion.ts";
import { VERSION_DOWNLOADS } from "./versionView.ts";
import { byteSizeText } from "./format/byteSize.ts";

/**
 * The data of a published version, copied into the site so that a reader's
 * browser can re-run the version (the "re-run here" panel). Each version gets
 * its own copy at `<audit-id>/v<N>/<path in the audit folder>`, so that a page
 * never depends on another version's folder, and a `rerun.json` that tells the
 * panel which files to fetch, or why they are not there.
 */

/** Name of the file beside each version's page that describes its data for the panel. */
export const RERUN_FILE = "rerun.json";
export const RERUN_FORMAT = "transport-audit-rerun/1";
/** Default of `build --data-size-limit`: the data copied for one audit, all its versions together. */
export const DEFAULT_DATA_SIZE_LIMIT = 300_000_000;

/** Whether a version's data are on the site, and if not, why. */
export type RerunDataState = "copied" | "over-limit" | "unavailable";

/** What `rerun.json` holds: written by build, read by the panel in the browser. */
export interface RerunManifest {
  format: typeof RERUN_FORMAT;
  audit: string;
  version: number;
  data: RerunDataState;
  /** Why the data are not on the site (over-limit, unavailable), in a sentence. */
  reason?: string;
  /** Every file the version's datasets read, relative to the audit folder (and to the version's folder on the site). */
  files: { path: string; bytes: number }[];
  /** The data of each input: its parts when `file:` names a folder or a glob, else null. */
  inputs: { id: string; file: string; parts: string[] | null }[];
  /** Total bytes of the files. */
  bytes: number;
  /** The limit the build applied to the audit (bytes). */
  limit: number;
  /** Where a reader can obtain the data when they are not on the site. */
  links: { doi?: string; repository?: string };
}

/** A version's data as planned before the site is written. */
export interface VersionDataPlan {
  auditDir: string;
  /** `<audit-id>/v<N>/`: the version's folder in the site. */
  siteDir: string;
  version: FrozenVersion;
  manifest: RerunManifest;
}

/** First names of site files in a version's folder: a data path starting with one would overwrite it, so such data are not copied. */
const RESERVED = new Set<string>(["index.html", "audit.yaml", RERUN_FILE, ...VERSION_DOWNLOADS.map((d) => d.file)]);

/**
 * Plan the data of every version of one audit. Versions are taken newest first
 * and their data are copied while the audit's total stays within `limit`; an
 * older version's data that would pass it are left out (the newest version is
 * the one a reader most wants to re-run). A version whose files are missing,
 * leave the audit folder or would land on a site file is marked unavailable.
 * Digests are checked when the files are copied (copyVersionData).
 */
export function planVersionData(auditDir: string, auditId: string, versions: readonly FrozenVersion[], limit: number, repository?: string): VersionDataPlan[] {
  let used = 0;
  const plans: VersionDataPlan[] = [];
  for (const version of [...versions].reverse()) {
    const manifest: RerunManifest = {
      format: RERUN_FORMAT,
      audit: auditId,
      version: version.number,
      data: "copied",
      files: [],
      inputs: [],
      bytes: 0,
      limit,
      links: { ...(version.result.doi ? { doi: version.result.doi } : {}), ...(repository ? { repository } : {}) },
    };
    try {
      version.manifest.inputs.forEach((input, i) => {
        const where = `versions/${version.number}/version.json inputs[${i}]`;
        const parts = listParts(auditDir, input.file, where);
        manifest.inputs.push({ id: input.id, file: input.file, parts });
        if (!parts) manifest.inputs[manifest.inputs.length - 1].file = normalFile(auditDir, input.file, where);
        for (const written of parts ?? [input.file]) {
          const full = confinePath(auditDir, written, `${where}.file`);
          // The file's place in the audit folder, in normal form: the same path below the version's folder on the site.
          const p = path.relative(auditDir, full).split(path.sep).join("/");
          // Several datasets may read one file (a trace cut into windows of several lengths): copied once.
          if (manifest.files.some((f) => f.path === p)) continue;
          if (RESERVED.has(p.split("/")[0])) throw new InputError(`${p}: has the name of a file the site keeps beside the version's page, so it is not copied`);
          let bytes: number;
          try {
            bytes = fs.statSync(full).size;
          } catch {
            throw new InputError(`${p} is no longer in the audit folder`);
          }
          manifest.files.push({ path: p, bytes });
          manifest.bytes += bytes;
        }
      });
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      manifest.data = "unavailable";
      manifest.reason = `The data of this version are not in the archive as they were published: ${err.message}.`;
    }
    if (manifest.data === "copied" && used + manifest.bytes > limit) {
      manifest.data = "over-limit";
      manifest.reason = `The data of this version (${byteSizeText(manifest.bytes)}) would take the audit's copies on this site past the build's limit of ${byteSizeText(limit)} (build --data-size-limit), so they are not copied.`;
    }
    if (manifest.data === "copied") used += manifest.bytes;
    plans.push({ auditDir, siteDir: `${auditId}/v${version.number}/`, version, manifest });
  }
  return plans.reverse();
}

/**
 * Copy one version's planned data into the site and write its `rerun.json`.
 * Each file is opened once through openDataFile (a regular file inside the
 * audit folder by its real path at open time) and streamed into a new file
 * (never one that exists) at the place `confined` gives, while its SHA-256 is
 * computed. When the digests do not match the version's record (the data
 * changed after publication), the copies are removed and the version is
 * marked unavailable: the site never offers data a version was not computed on.
 */
export function copyVersionData(plan: VersionDataPlan, confined: (relative: string) => string): RerunManifest {
  const manifest = { ...plan.manifest };
  if (manifest.data === "copied") {
    const written: string[] = [];
    const digests = new Map<string, string>();
    let problem: string | null = null;
    // Every place is checked before anything is written: a path leaving the site is our bug or a forgery, never a state to report.
    const targets = manifest.files.map((f) => confined(`${plan.siteDir}${f.path}`));
    try {
      for (const [i, f] of manifest.files.entries()) {
        const target = targets[i];
        written.push(target);
        digests.set(f.path, copyHashing(path.join(plan.auditDir, ...f.path.split("/")), f.path, plan.auditDir, target));
      }
      const changed = changedInputs(plan, digests);
      if (changed.length > 0) problem = `${changed.join("; ")} differ from the digest the version recorded`;
    } catch (err) {
      // A file replaced since it was planned (a link swapped to leave the audit): refused, not followed.
      if (!(err instanceof InputError)) throw err;
      problem = err.message;
    }
    if (problem !== null) {
      for (const w of written) fs.rmSync(w, { force: true });
      manifest.data = "unavailable";
      manifest.reason = `The data of this version are no longer in the archive as published: ${problem}.`;
    }
  }
  const target = confined(`${plan.siteDir}${RERUN_FILE}`);
  fs.mkdirSync(path.dirname(target), { recursive: true });
  fs.writeFileSync(target, `${JSON.stringify(manifest, null, 2)}\n`, { flag: "wx" });
  return manifest;
}

/** A single file's path relative to the audit folder in normal form ("./data/x.csv" → "data/x.csv"). */
function normalFile(auditDir: string, file: string, where: string): string {
  return path.relative(auditDir, confinePath(auditDir, file, `${where}.file`)).split(path.sep).join("/");
}

/** The inputs whose files, as copied, do not have the digest the version records (a part list's digest for folders and globs). */
function changedInputs(plan: VersionDataPlan, digests: ReadonlyMap<string, string>): string[] {
  const out: string[] = [];
  plan.manifest.inputs.forEach((input, i) => {
    const recorded = plan.version.manifest.inputs[i].sha256;
    const found = input.parts ? partsDigest(input.parts.map((p) => ({ path: p, sha256: digests.get(path.posix.normalize(p))! }))) : digests.get(input.file)!;
    if (found !== recorded) out.push(input.file);
  });
  return out;
}

/** Stream `source` (checked by openDataFile) into a new file `target`, returning the SHA-256 of the bytes copied. */
function copyHashing(source: string, label: string, auditDir: string, target: string): string {
  const opened = openDataFile(source, label, auditDir);
  fs.mkdirSync(path.dirname(target), { recursive: true });
  const hash = createHash("sha256");
  const buffer = Buffer.allocUnsafe(4 * 1024 * 1024);
  let out: number | null = null;
  try {
    out = fs.openSync(target, "wx");
    let position = 0;
    for (;;) {
      const n = fs.readSync(opened.fd, buffer, 0, buffer.length, position);
      if (n === 0) break;
      hash.update(buffer.subarray(0, n));
      fs.writeSync(out, buffer, 0, n);
      position += n;
    }
  } finally {
    fs.closeSync(opened.fd);
    if (out !== null) fs.closeSync(out);
  }
  return hash.digest("hex");
}
