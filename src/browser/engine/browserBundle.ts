import fs from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { fileURLToPath } from "node:url";

/*
 * The re-run worker for the browser: src/browser/engine/worker.ts and every
 * module `run` uses, bundled by esbuild into one ES module for a module Web
 * Worker. Node's built-in modules are mapped onto browser stand-ins
 * (./shims/): fs onto an in-memory volume (memfs), path onto path-browserify,
 * crypto onto @noble/hashes, zlib onto fflate, Buffer onto the buffer
 * package; worker threads are absent, so large files are summarised in the
 * one thread (the same parts in the same order: the same numbers).
 * HDF5 files are refused with a message: h5wasm's Node build reads the
 * host's files in place and has no place in a page.
 *
 * In a clone esbuild (a development dependency) builds it; the installed
 * package has no esbuild and copies the bundle `prepack` built into
 * dist/browser/ (PREBUILT).
 */

export const BUNDLE_FILE = "rerun-worker.js";

const HERE = path.dirname(fileURLToPath(import.meta.url));
const ROOT = path.resolve(HERE, "..", "..", "..");
const SHIMS = path.join(HERE, "shims");
const ENTRY = path.join(HERE, "worker.ts");
/** Where the installed package keeps the bundle prepack built (dist/browser/rerun-worker.js beside dist/browser/engine/). */
const PREBUILT = path.resolve(HERE, "..", BUNDLE_FILE);

/** Node's modules (with or without `node:`) and the stand-in each resolves to in the bundle. */
const SHIM_FILES: Record<string, string> = {
  fs: "fs.ts",
  "fs/promises": "fsPromises.ts",
  crypto: "crypto.ts",
  zlib: "zlib.ts",
  stream: "stream.ts",
  os: "os.ts",
  url: "url.ts",
};

/** Packages standing in for Node's modules (a trailing "/" names the package, not the built-in). */
const PACKAGES: Record<string, string> = { path: "path-browserify", buffer: "buffer/", events: "events/" };

/** Modules with nothing to stand on in a page: their contents in the bundle. */
function virtualModules(): Record<string, string> {
  const pkg = JSON.parse(fs.readFileSync(path.join(ROOT, "package.json"), "utf8")) as { name: string; version: string };
  const dataError = JSON.stringify(path.join(ROOT, "src", "errors.ts"));
  return {
    // src/version.ts reads package.json through createRequire: the name and version, fixed at build time.
    module: `const pkg = ${JSON.stringify({ name: pkg.name, version: pkg.version })};
export function createRequire() { return (id) => { if (/package\\.json$/.test(id)) return pkg; throw new Error("no require() in the browser: " + id); }; }`,
    // No threads: Worker is absent, and the reduction then runs its parts in this thread.
    worker_threads: "export const Worker = undefined; export const threadId = 0; export const isMainThread = true; export const parentPort = null; export const workerData = undefined;",
    esbuild: 'export function build() { throw new Error("esbuild is not available in the browser"); }',
    "h5wasm/node": `import { DataError } from ${dataError};
const refuse = () => { throw new DataError("HDF5 files cannot be read in the browser yet (the HDF5 library is not part of this page's re-run); re-run this audit with the command line: transport-audit run <folder>"); };
const h5wasm = { get ready() { return Promise.resolve().then(refuse); } };
export default h5wasm;
export const Module = new Proxy({}, { get: refuse });
export class File { constructor() { refuse(); } }
export class Dataset { constructor() { refuse(); } }`,
  };
}

interface EsbuildModule {
  build(options: Record<string, unknown>): Promise<{ outputFiles?: { contents: Uint8Array }[] }>;
}

/** The esbuild options for the bundle (also used by the bench, which measures its size). */
export function bundleOptions(): Record<string, unknown> {
  const virtual = virtualModules();
  const plugin = {
    name: "browser-stand-ins",
    setup(build: {
      onResolve(o: { filter: RegExp }, f: (a: { path: string }) => { path: string; namespace?: string } | undefined): void;
      onLoad(o: { filter: RegExp; namespace: string }, f: (a: { path: string }) => { contents: string; loader: string; resolveDir: string }): void;
    }) {
      build.onResolve({ filter: /^(node:)?(fs|fs\/promises|crypto|zlib|stream|os|url|path|buffer|events|module|worker_threads)$|^esbuild$|^h5wasm\/node$/ }, (args) => {
        const name = args.path.replace(/^node:/, "");
        if (name in SHIM_FILES) return { path: path.join(SHIMS, SHIM_FILES[name]) };
        if (name in PACKAGES) return { path: createRequire(import.meta.url).resolve(PACKAGES[name]) };
        if (name in virtual) return { path: name, namespace: "virtual" };
        return undefined;
      });
      build.onLoad({ filter: /.*/, namespace: "virtual" }, (args) => ({ contents: virtual[args.path], loader: "js", resolveDir: ROOT }));
    },
  };
  return {
    entryPoints: [ENTRY],
    bundle: true,
    platform: "browser",
    format: "esm",
    target: ["es2022"],
    minify: true,
    legalComments: "eof",
    inject: [path.join(SHIMS, "process.ts"), path.join(SHIMS, "buffer.ts")],
    define: { global: "globalThis", __TRANSPORT_AUDIT_BROWSER__: "true" },
    plugins: [plugin],
    write: false,
    logLevel: "silent",
  };
}

/** esbuild, or null where it is not installed (the published package). */
async function loadEsbuild(): Promise<EsbuildModule | null> {
  try {
    return (await import("esbuild")) as unknown as EsbuildModule;
  } catch {
    return null;
  }
}

/**
 * Write `<outDir>/rerun-worker.js`: bundled by esbuild where it is installed,
 * else copied from the package's prebuilt bundle. Its path and size in bytes.
 */
export async function buildBrowserBundle(outDir: string): Promise<{ worker: string; bytes: number }> {
  const worker = path.join(outDir, BUNDLE_FILE);
  fs.mkdirSync(outDir, { recursive: true });
  const esbuild = fs.existsSync(ENTRY) ? await loadEsbuild() : null;
  if (esbuild) {
    const out = await esbuild.build(bundleOptions());
    const code = out.outputFiles![0].contents;
    fs.writeFileSync(worker, code);
    return { worker, bytes: code.length };
  }
  if (!fs.existsSync(PREBUILT)) {
    throw new Error(`the browser re-run bundle cannot be made: esbuild is not installed and ${PREBUILT} (built by prepack) is missing`);
  }
  if (path.resolve(worker) !== PREBUILT) fs.copyFileSync(PREBUILT, worker);
  return { worker, bytes: fs.statSync(worker).size };
}
