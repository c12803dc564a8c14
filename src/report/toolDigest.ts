import { createHash, type Hash } from "node:crypto";
import fs from "node:fs";
import path from "node:path";

/**
 * Digest of everything that computes a result document: the tool's own code,
 * the lockfile's resolved dependency versions and integrity hashes, and the
 * installed code of every package the audit computation imports (with the
 * packages those import in turn). A cached result is trusted only when it was
 * written under the same digest, so that editing a check, upgrading a
 * dependency or editing a dependency's installed files re-runs the audits.
 *
 * Nothing here is listed by hand: the packages are found by following the
 * imports of the code itself from the module that runs an audit, so a
 * dependency someone adds to a check is covered without anyone remembering to.
 */

/** Where the tool lives: its package root and the folder of its code (src/ when run from source, dist/ when compiled). */
export interface ToolLayout {
  root: string;
  code: string;
  /** The module that computes a result document, inside `code`. */
  entry: string;
}

/** Every regular file under `dir`, sorted, skipping the folders `skip` names. */
export function filesUnder(dir: string, skip: ReadonlySet<string> = new Set()): string[] {
  return fs
    .readdirSync(dir, { withFileTypes: true })
    .flatMap((e) => {
      const file = path.join(dir, e.name);
      if (e.isDirectory()) return skip.has(e.name) ? [] : filesUnder(file, skip);
      return e.isFile() ? [file] : [];
    })
    .sort();
}

/** Feed files to a hash, each as its path relative to `base`, its length and its bytes (no two file sets give one stream). */
function hashFiles(hash: Hash, base: string, files: readonly string[]): void {
  for (const file of files) {
    const bytes = fs.readFileSync(file);
    hash.update(`${path.relative(base, file)}\0${bytes.length}\0`);
    hash.update(bytes);
  }
}

/** Specifiers of `import … from "x"`, `export … from "x"`, `import "x"` and `import("x")` in a module's text. */
export function importSpecifiers(text: string): string[] {
  const found: string[] = [];
  for (const m of text.matchAll(/(?:\bfrom\s*|\bimport\s*\(\s*|\bimport\s+)["']([@\w./:-][^"'\s]*)["']/g)) found.push(m[1]);
  return found;
}

/** The package a bare specifier names (`@scope/name/sub` → `@scope/name`), or null for relative paths and Node's builtins. */
export function packageOf(specifier: string): string | null {
  if (specifier.startsWith(".") || specifier.startsWith("/") || specifier.startsWith("node:")) return null;
  const parts = specifier.split("/");
  return specifier.startsWith("@") ? parts.slice(0, 2).join("/") : parts[0];
}

/**
 * The packages imported by `entry` and every module of ours it reaches
 * through relative imports (`.ts` specifiers map to `.js` files in the
 * compiled code, where the build rewrote them; both are tried).
 */
export function packagesImportedFrom(entry: string): Set<string> {
  const packages = new Set<string>();
  const seen = new Set<string>();
  const queue = [entry];
  while (queue.length > 0) {
    const file = queue.pop()!;
    if (seen.has(file)) continue;
    seen.add(file);
    for (const spec of importSpecifiers(fs.readFileSync(file, "utf8"))) {
      const pkg = packageOf(spec);
      if (pkg !== null) {
        if (!isBuiltin(pkg)) packages.add(pkg);
        continue;
      }
      if (!spec.startsWith(".")) continue;
      const target = path.resolve(path.dirname(file), spec);
      const candidates = [target, target.replace(/\.ts$/, ".js"), target.replace(/\.js$/, ".ts")];
      const hit = candidates.find((c) => fs.existsSync(c) && fs.statSync(c).isFile());
      if (hit) queue.push(hit);
    }
  }
  return packages;
}

const BUILTINS = new Set(["fs", "path", "os", "url", "crypto", "util", "events", "stream", "worker_threads", "child_process", "module", "zlib", "buffer", "assert", "readline", "process", "perf_hooks", "tty", "string_decoder"]);

function isBuiltin(name: string): boolean {
  return BUILTINS.has(name);
}

/** The folder of package `name` as Node finds it from `from`: the nearest `node_modules/<name>` up the tree, or null. */
export function packageFolder(name: string, from: string): string | null {
  for (let dir = from; ; dir = path.dirname(dir)) {
    const candidate = path.join(dir, "node_modules", name);
    if (fs.existsSync(path.join(candidate, "package.json"))) return fs.realpathSync(candidate);
    if (path.dirname(dir) === dir) return null;
  }
}

/**
 * The installed folders of `names` and of every package they depend on
 * (dependencies and optional dependencies that are installed), each found as
 * Node would find it from the package that needs it.
 */
export function dependencyClosure(names: Iterable<string>, from: string): string[] {
  const folders = new Set<string>();
  const queue: { name: string; from: string }[] = [...names].map((name) => ({ name, from }));
  while (queue.length > 0) {
    const { name, from: at } = queue.pop()!;
    const folder = packageFolder(name, at);
    if (folder === null || folders.has(folder)) continue;
    folders.add(folder);
    const manifest = JSON.parse(fs.readFileSync(path.join(folder, "package.json"), "utf8")) as { dependencies?: Record<string, string>; optionalDependencies?: Record<string, string> };
    for (const dep of Object.keys({ ...manifest.dependencies, ...manifest.optionalDependencies })) queue.push({ name: dep, from: folder });
  }
  return [...folders].sort();
}

/** The lockfile beside the package: package-lock.json in a clone, npm-shrinkwrap.json in the published package. */
export function lockfileOf(root: string): string | null {
  for (const name of ["package-lock.json", "npm-shrinkwrap.json"]) {
    const file = path.join(root, name);
    if (fs.existsSync(file)) return file;
  }
  return null;
}

/**
 * The lockfile's resolved dependency tree, one line per installed package:
 * its place in the tree, version and integrity hash, in key order (the parts
 * that name code; the rest of the file, such as `dev` flags, does not change
 * what runs).
 */
export function lockedVersions(lockfile: string): string {
  const lock = JSON.parse(fs.readFileSync(lockfile, "utf8")) as { packages?: Record<string, { version?: string; integrity?: string; resolved?: string }> };
  return Object.entries(lock.packages ?? {})
    .filter(([key]) => key !== "")
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
    .map(([key, p]) => `${key} ${p.version ?? ""} ${p.integrity ?? p.resolved ?? ""}`)
    .join("\n");
}

/**
 * The packages the audit computation imports that the tool declares as
 * run-time dependencies. Development tools it may load from the sources (esbuild
 * bundling a worker when run through tsx) are left out: they are absent from
 * the installed package, and hashing their native binaries would cost seconds.
 */
export function runtimeImports(layout: ToolLayout): string[] {
  const manifest = JSON.parse(fs.readFileSync(path.join(layout.root, "package.json"), "utf8")) as { dependencies?: Record<string, string> };
  const declared = new Set(Object.keys(manifest.dependencies ?? {}));
  return [...packagesImportedFrom(layout.entry)].filter((p) => declared.has(p)).sort();
}

/** The digest (hex SHA-256) of the tool's code, its locked dependency tree and the installed code of the packages an audit uses. */
export function toolDigest(layout: ToolLayout): string {
  const hash = createHash("sha256");
  hash.update("code\0");
  hashFiles(hash, layout.code, [...filesUnder(layout.code), path.join(layout.root, "package.json")]);
  const lockfile = lockfileOf(layout.root);
  hash.update(`\0lockfile\0${lockfile === null ? "none" : lockedVersions(lockfile)}\0`);
  for (const folder of dependencyClosure(runtimeImports(layout), layout.root)) {
    hash.update(`\0package\0${path.basename(folder)}\0`);
    // A package's own node_modules holds other packages, which the closure visits by themselves.
    hashFiles(hash, folder, filesUnder(folder, new Set(["node_modules"])));
  }
  return hash.digest("hex");
}
