import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { createHash } from "node:crypto";
import { threadId, Worker } from "node:worker_threads";
import type { ScanLayout } from "../fast/scanLines.ts";
import { RUNNING_COMPILED, startTsWorker } from "../../threads/tsWorker.ts";
import { reduceFileRange, type SamplesPartSummary, type SamplesReductionSpec } from "./samplesSink.ts";

/** One thread's share of a file. */
export interface RangeJob {
  /** The descriptor the audit opened and checked (src/ingest/sources/openDataFile.ts): worker threads share the process's descriptors, so nothing re-opens the path. */
  fd: number;
  start: number;
  end: number;
  layout: ScanLayout;
  spec: SamplesReductionSpec;
}

/**
 * The file is cut into this many parts whatever the machine: the parts' sums
 * are added in part order, so a fixed split keeps results bit-identical from
 * one machine to the next (a published version must reproduce exactly).
 */
export const PARTS = 2;

/** Each worker entry's bundle, once per process (keyed by the entry's path). */
const bundled = new Map<string, Promise<string | null>>();

/** esbuild's loader for each kind of module the worker may import. */
const LOADERS: Record<string, "ts" | "js" | "json"> = { ".ts": "ts", ".mts": "ts", ".cts": "ts", ".js": "js", ".mjs": "js", ".cjs": "js", ".json": "json" };

/** The worker's entry module. */
const WORKER_ENTRY = fileURLToPath(new URL("./worker.ts", import.meta.url));

/**
 * The folder for worker bundles and their index: `transport-audit-<uid>` in
 * the system's temporary folder, created readable and writable by this user
 * only. The temporary folder itself is writable by every user of a shared
 * machine (a cluster's login node), and a bundle someone else put there would
 * run as our code; so the folder is used only when it is a real directory
 * (lstat: a symbolic link is not followed) owned by this user and writable by
 * nobody else. Null otherwise, and workers then start through tsx on the
 * sources: slower, never someone else's code.
 */
export function privateBundleDir(base = os.tmpdir()): string | null {
  const uid = typeof process.getuid === "function" ? process.getuid() : null;
  const dir = path.join(base, `transport-audit-${uid ?? "user"}`);
  try {
    fs.mkdirSync(dir, { mode: 0o700 });
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== "EEXIST") return null;
  }
  try {
    const stat = fs.lstatSync(dir);
    if (!stat.isDirectory()) return null;
    // Ownership and permission bits mean nothing on Windows, where the temporary folder is the user's own.
    if (uid !== null && (stat.uid !== uid || (stat.mode & 0o022) !== 0)) return null;
    return dir;
  } catch {
    return null;
  }
}

/**
 * Where the bundle's inputs are recorded (one file per install, named by the
 * entry's path): the bundle's file and the digest of every module that went
 * into it, so that a later process can start workers on the bundle at once,
 * without waiting for esbuild, when none of those modules changed. Null
 * without a private folder.
 */
function bundleIndexFile(dir = privateBundleDir(), entry = WORKER_ENTRY, name = "reduce-worker", variant = ""): string | null {
  if (dir === null) return null;
  // The way it is bundled is part of the name: a bundle made another way is another file.
  const id = createHash("sha256").update(entry + variant).digest("hex").slice(0, 16);
  return path.join(dir, `transport-audit-${name}-index-${id}.json`);
}

export interface BundleIndex {
  bundle: string;
  inputs: string[];
  digest: string;
}

/** Digest of files' contents, each named with its length (no two file sets give one stream). */
function digestOfContents(files: { path: string; bytes: Uint8Array }[]): string {
  const hash = createHash("sha256");
  for (const file of files) {
    hash.update(`${file.path}\0${file.bytes.length}\0`);
    hash.update(file.bytes);
  }
  return hash.digest("hex");
}

/** Digest of the files at `paths` as they are now, in the form the index records. */
export function digestOfInputs(paths: string[]): string {
  return digestOfContents(paths.map((p) => ({ path: p, bytes: fs.readFileSync(p) })));
}

/**
 * The bundle an earlier process wrote, when every module it was built from
 * still has the same content (about a millisecond: some twenty small files are
 * read and hashed); null otherwise.
 */
export function cachedWorkerBundle(indexFile = bundleIndexFile()): string | null {
  if (indexFile === null) return null;
  try {
    const index = JSON.parse(fs.readFileSync(indexFile, "utf8")) as BundleIndex;
    if (!fs.existsSync(index.bundle) || digestOfInputs(index.inputs) !== index.digest) return null;
    return index.bundle;
  } catch {
    return null; // no index yet, or one of its modules is gone
  }
}

/**
 * worker.ts and what it imports, bundled into one plain JavaScript file by
 * esbuild (the transpiler tsx itself uses), written once per content into
 * this user's private folder (privateBundleDir). A worker started on it is
 * ready in tens of milliseconds; one that registers tsx and transpiles on
 * start takes over a second on this machine class, which would cost more than
 * the parallel reading saves. The bundle an earlier process wrote is taken as
 * it is when none of its modules changed (cachedWorkerBundle), sparing the
 * 70–110 ms esbuild takes. Null when bundling is not possible (then tsx is used).
 */
export function workerBundle(entry = WORKER_ENTRY, name = "reduce-worker", options: { packagesOutside?: boolean } = {}): Promise<string | null> {
  if (RUNNING_COMPILED) return Promise.resolve(null); // the compiled worker.js starts as fast as a bundle
  const known = bundled.get(entry);
  if (known) return known;
  const variant = options.packagesOutside ? "\0packages-outside" : "";
  const cached = cachedWorkerBundle(bundleIndexFile(undefined, entry, name, variant));
  const made: Promise<string | null> = cached !== null ? Promise.resolve(cached) : (async () => {
    try {
      const esbuild = await import("esbuild");
      // Every module is read here, so that the index records the digest of the very bytes bundled.
      const read: { path: string; bytes: Uint8Array }[] = [];
      const recordInputs = {
        name: "record-inputs",
        setup(build: import("esbuild").PluginBuild) {
          // Every file esbuild loads, whatever its kind, so that none escapes the digest.
          build.onLoad({ filter: /.*/ }, (args) => {
            const bytes = fs.readFileSync(args.path);
            read.push({ path: args.path, bytes });
            return { contents: bytes, loader: LOADERS[path.extname(args.path)] ?? "default" };
          });
        },
      };
      // Installed packages imported by the file URL this process resolves them to (the bundle lies
      // outside the package, where a bare name would not resolve): the bundle stays our code alone, and
      // a format's reader loads, as from the sources, only when a file of its format is opened.
      const packagesByPath = {
        name: "packages-by-path",
        setup(build: import("esbuild").PluginBuild) {
          build.onResolve({ filter: /^[^./]/ }, (args) => {
            if (args.path.startsWith("node:") || args.importer.split(path.sep).includes("node_modules")) return undefined;
            return { path: import.meta.resolve(args.path), external: true };
          });
        },
      };
      // With packages outside, code split at each import(): a format's reader, and the packages it
      // imports, then load only when a file of that format is opened (an esbuild bundle of one file
      // would import them all on start; h5wasm alone takes a third of a second). The bundle is then a
      // folder: its entry and the chunks it imports.
      const split = options.packagesOutside === true;
      const virtualOut = path.join(os.tmpdir(), "transport-audit-bundle-out");
      const out = await esbuild.build({
        entryPoints: [entry],
        plugins: split ? [packagesByPath, recordInputs] : [recordInputs],
        bundle: true,
        platform: "node",
        format: "esm",
        target: "node20",
        write: false,
        logLevel: "silent",
        ...(split ? { splitting: true, outdir: virtualOut, entryNames: "entry", chunkNames: "chunk-[hash]", outExtension: { ".js": ".mjs" } } : {}),
      });
      const dir = privateBundleDir();
      if (dir === null) return null;
      const outputs = out.outputFiles
        .map((f) => ({ path: split ? path.relative(virtualOut, f.path) : "", bytes: f.contents }))
        .sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
      const digest = digestOfContents(outputs).slice(0, 16);
      // A temporary name of this process and thread: build workers may bundle at the same time.
      const temp = `.${process.pid}.${threadId}.tmp`;
      let file = path.join(dir, `transport-audit-${name}-${digest}.mjs`);
      if (split) {
        const folder = path.join(dir, `transport-audit-${name}-${digest}`);
        file = path.join(folder, "entry.mjs");
        if (!fs.existsSync(file)) {
          fs.mkdirSync(folder + temp, { recursive: true, mode: 0o700 });
          for (const o of outputs) fs.writeFileSync(path.join(folder + temp, o.path), o.bytes);
          try {
            fs.renameSync(folder + temp, folder);
          } catch {
            fs.rmSync(folder + temp, { recursive: true, force: true }); // another process put the same bundle there first
          }
          removeStaleBundles(path.basename(folder), dir, name);
        }
      } else if (!fs.existsSync(file)) {
        fs.writeFileSync(file + temp, outputs[0].bytes);
        fs.renameSync(file + temp, file);
        removeStaleBundles(path.basename(file), dir, name);
      }
      read.sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
      const index: BundleIndex = { bundle: file, inputs: read.map((r) => r.path), digest: digestOfContents(read) };
      const indexFile = bundleIndexFile(dir, entry, name, variant)!;
      fs.writeFileSync(indexFile + temp, JSON.stringify(index));
      fs.renameSync(indexFile + temp, indexFile);
      return file;
    } catch {
      return null;
    }
  })();
  bundled.set(entry, made);
  return made;
}

/** Bundles of other code versions untouched for this long are removed when a new one is written. */
const STALE_BUNDLE_MS = 7 * 24 * 3600 * 1000;

/**
 * Remove the bundles earlier versions of the tool left in the bundle folder
 * (one per version of the worker's code), except `keep` and any used in the
 * last week: a process of an older version may still be starting workers on its own.
 */
export function removeStaleBundles(keep: string, dir: string, name = "reduce-worker"): void {
  try {
    const now = Date.now();
    // A bundle is a file, or a folder of an entry and its chunks (packagesOutside).
    const ofThisWorker = new RegExp(`^transport-audit-${name}-[0-9a-f]{16}(\\.mjs)?$`);
    for (const entry of fs.readdirSync(dir)) {
      if (entry === keep || !ofThisWorker.test(entry)) continue;
      const file = path.join(dir, entry);
      const stat = fs.statSync(file);
      if (now - Math.max(stat.atimeMs, stat.mtimeMs) > STALE_BUNDLE_MS) fs.rmSync(file, { recursive: true, force: true });
    }
  } catch {
    // Tidying only: a folder that cannot be listed or a file another process removed is no error.
  }
}

/** Start a worker on the bundle, or through tsx's loader when there is none (plain Node cannot load .ts files). */
async function startWorker(job: RangeJob): Promise<Worker> {
  const bundle = await workerBundle();
  if (bundle) return new Worker(bundle, { workerData: job });
  return startTsWorker(new URL("./worker.ts", import.meta.url), job);
}

/** Byte offsets that cut [from, to) into `parts` ranges, each beginning at a line start. */
export function lineAlignedCuts(fd: number, from: number, to: number, parts: number): number[] {
  const cuts = [from];
  const probe = Buffer.allocUnsafe(64 * 1024);
  for (let k = 1; k < parts; k++) {
    let at = Math.max(cuts[cuts.length - 1], from + Math.floor(((to - from) * k) / parts));
    // Move forward to the byte after the next newline.
    let found = -1;
    while (at < to && found < 0) {
      const got = fs.readSync(fd, probe, 0, Math.min(probe.length, to - at), at);
      if (got === 0) break;
      const nl = probe.subarray(0, got).indexOf(10);
      if (nl >= 0) found = at + nl + 1;
      else at += got;
    }
    cuts.push(found < 0 ? to : found);
  }
  cuts.push(to);
  return cuts;
}

/**
 * Reduce the data lines [from, to) of a file in PARTS ranges, on worker threads
 * (or all in this thread with `threads: false`, same result), while this
 * thread computes the file's digest.
 */
export async function reduceInParts(
  fd: number,
  from: number,
  to: number,
  layout: ScanLayout,
  spec: SamplesReductionSpec,
  digest: () => Promise<string>,
  options: { threads?: boolean; onBytes?: (bytes: number) => void } = {},
): Promise<{ parts: SamplesPartSummary[]; sha256: string }> {
  const cuts = lineAlignedCuts(fd, from, to, PARTS);
  const jobs: RangeJob[] = [];
  for (let k = 0; k < PARTS; k++) jobs.push({ fd, start: cuts[k], end: cuts[k + 1], layout, spec });
  // No threads where Worker is absent (the browser bundle maps node:worker_threads to nothing): the same parts, in order, here.
  if (options.threads === false || typeof Worker !== "function") {
    const parts = jobs.map((j) => reduceFileRange(j.fd, j.start, j.end, j.layout, j.spec, options.onBytes));
    return { parts, sha256: await digest() };
  }
  const workers = await Promise.all(jobs.map(startWorker));
  const parts = Promise.all(workers.map((worker) => resultOf(worker, options.onBytes)));
  parts.catch(() => {}); // a worker's failure is rethrown by the await below, not reported as unhandled meanwhile
  const sha256 = await digest(); // in this thread, while the workers scan
  return { parts: await parts, sha256 };
}

/** The summary a started worker sends back (its listeners attached at once, so no message is missed). */
function resultOf(worker: Worker, onBytes?: (bytes: number) => void): Promise<SamplesPartSummary> {
  return new Promise((resolve, reject) => {
    let settled = false;
    worker.on("message", (msg: { type: string; bytes?: number; summary?: SamplesPartSummary; message?: string }) => {
      if (msg.type === "bytes") onBytes?.(msg.bytes!);
      else if (msg.type === "done") {
        settled = true;
        resolve(msg.summary!);
        void worker.terminate();
      } else if (msg.type === "error") {
        settled = true;
        reject(new Error(`reduction worker failed: ${msg.message}`));
        void worker.terminate();
      }
    });
    worker.on("error", (err) => {
      if (!settled) reject(err);
    });
    worker.on("exit", (code) => {
      if (!settled) reject(new Error(`reduction worker stopped with exit code ${code}`));
    });
  });
}
