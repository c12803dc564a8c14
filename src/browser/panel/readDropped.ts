/// <reference lib="dom" />
/// <reference lib="dom.iterable" />
import { unzip } from "fflate";

/**
 * What a reader hands the page: files chosen one by one, a folder (its files
 * carry their path inside it), a drop of files and folders, or a .zip archive.
 * All become a map from the path inside the audit folder ("audit.yaml",
 * "data/x.csv") to the file's bytes.
 */

/** A file with its path relative to what was dropped or chosen ("my-audit/data/x.csv"). */
export interface PathedFile {
  path: string;
  file: File;
}

export class DropError extends Error {}

/** Files of a drop, folders walked. */
export async function droppedFiles(transfer: DataTransfer): Promise<PathedFile[]> {
  const entries = [...transfer.items].map((item) => item.webkitGetAsEntry()).filter((e): e is FileSystemEntry => e !== null);
  if (entries.length === 0) return [...transfer.files].map((file) => ({ path: file.name, file }));
  const out: PathedFile[] = [];
  for (const e of entries) await walk(e, "", out);
  return out;
}

/** A dropped entry's files (the DataTransfer entry API of Chromium, Firefox and Safari), folders walked. */
async function walk(entry: FileSystemEntry, prefix: string, out: PathedFile[]): Promise<void> {
  const here = prefix ? `${prefix}/${entry.name}` : entry.name;
  if (entry.isFile) {
    const fileEntry = entry as FileSystemFileEntry;
    out.push({ path: here, file: await new Promise<File>((ok, fail) => fileEntry.file(ok, fail)) });
  } else if (entry.isDirectory) {
    const reader = (entry as FileSystemDirectoryEntry).createReader();
    // readEntries hands out a folder's entries in batches until an empty one.
    for (;;) {
      const batch = await new Promise<FileSystemEntry[]>((ok, fail) => reader.readEntries(ok, fail));
      if (batch.length === 0) break;
      for (const child of batch) await walk(child, here, out);
    }
  }
}

/** Files chosen with a file input: a folder input gives each file's path inside the folder. */
export function chosenFiles(list: FileList | null): PathedFile[] {
  return [...(list ?? [])].map((file) => ({ path: (file as File & { webkitRelativePath?: string }).webkitRelativePath || file.name, file }));
}

/** The members of a .zip archive (fflate's inflater, off the main thread where the browser allows). */
function unzipped(bytes: Uint8Array, name: string): Promise<Map<string, Uint8Array>> {
  return new Promise((ok, fail) =>
    unzip(bytes, (err, members) => {
      if (err) fail(new DropError(`${name}: not a readable .zip archive (${err.message})`));
      else ok(new Map(Object.entries(members).filter(([p]) => !p.endsWith("/"))));
    }),
  );
}

/** Paths that are not part of an audit: folders' own entries and the clutter file managers add. */
function isClutter(p: string): boolean {
  return p.split("/").some((s) => s === "__MACOSX" || s === ".DS_Store" || s === "Thumbs.db");
}

/**
 * The audit folder in what was given: the `audit.yaml` nearest the top, and
 * every file under its folder, by path relative to it. A .zip is opened. Files
 * given loose, without their folders, are placed where audit.yaml's `file:`
 * entries expect them when their names match (a convenience: the engine
 * reads audit.yaml itself and names any file still missing).
 */
export async function auditFiles(given: readonly PathedFile[]): Promise<Map<string, Uint8Array>> {
  const all = new Map<string, Uint8Array>();
  for (const { path, file } of given) {
    const bytes = new Uint8Array(await file.arrayBuffer());
    if (/\.zip$/i.test(path)) for (const [p, b] of await unzipped(bytes, path)) all.set(p, b);
    else all.set(path, bytes);
  }
  const candidates = [...all.keys()].filter((p) => !isClutter(p) && (p === "audit.yaml" || p.endsWith("/audit.yaml")));
  if (candidates.length === 0) throw new DropError("no audit.yaml among the files given; an audit folder holds audit.yaml and the data files it names");
  candidates.sort((a, b) => a.split("/").length - b.split("/").length || (a < b ? -1 : 1));
  const prefix = candidates[0].slice(0, -"audit.yaml".length);
  const out = new Map<string, Uint8Array>();
  for (const [p, b] of all) if (p.startsWith(prefix) && !isClutter(p)) out.set(p.slice(prefix.length), b);
  placeLooseFiles(out);
  return out;
}

/** `file: data/x.csv` in audit.yaml while only `x.csv` was given: put it where the definition expects it. */
function placeLooseFiles(files: Map<string, Uint8Array>): void {
  const definition = new TextDecoder().decode(files.get("audit.yaml"));
  for (const m of definition.matchAll(/^\s*(?:-\s*)?file:\s*["']?([^"'#\s]+)["']?/gm)) {
    const wanted = m[1];
    if (files.has(wanted) || /[*?[]/.test(wanted)) continue;
    const name = wanted.split("/").pop()!;
    if (!files.has(name)) continue;
    files.set(wanted, files.get(name)!);
    files.delete(name);
  }
}
