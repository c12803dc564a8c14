import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createRequire } from "node:module";
import { fileURLToPath } from "node:url";
import { buildBrowserBundle } from "../browser/engine/browserBundle.ts";
import { digestOfInputs, privateBundleDir } from "../ingest/reduce/parallelReduce.ts";

/**
 * The scripts of the browser panels, bundled with esbuild when a site is
 * built: `rerun-panel.js` (the small page code of both panels, no framework),
 * `report-render.js` (the report's own view model and Nunjucks templates,
 * loaded only when a reader drops an audit on the index) and the engine's
 * `rerun-worker.js` (the checks, in a Web Worker). Bundled once per content of
 * the sources (kept in this user's private folder, as the reduction's worker
 * bundle is: esbuild takes 5 to 13 s for the three on this machine class) and
 * copied into each site.
 */

const PROJECT_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
const PANEL_DIR = path.join(PROJECT_ROOT, "src", "browser", "panel");
const INCLUDES = path.join(PROJECT_ROOT, "templates", "_includes");
/**
 * Where an installed package keeps the panel scripts prepack built (beside the
 * engine's prebuilt rerun-worker.js): it has no esbuild to bundle them.
 */
export const PREBUILT_PANEL_DIR = path.join(PROJECT_ROOT, "dist", "browser");

export const PANEL_SCRIPT = "rerun-panel.js";
export const RENDER_SCRIPT = "report-render.js";
export const WORKER_SCRIPT = "rerun-worker.js";

const SCRIPTS = [PANEL_SCRIPT, RENDER_SCRIPT, WORKER_SCRIPT] as const;
const CACHE_PREFIX = "transport-audit-panel-assets-";
const STALE_AFTER_MS = 24 * 3600 * 1000;

let bundled: Promise<Map<string, Uint8Array>> | null = null;

/** Write the panels' scripts into the site's assets folder. */
export async function writePanelAssets(assetsDir: string): Promise<void> {
  bundled ??= cachedOrBundled();
  let files: Map<string, Uint8Array>;
  try {
    files = await bundled;
  } catch (err) {
    bundled = null; // a later build tries again (the sources may have been fixed)
    throw err;
  }
  fs.mkdirSync(assetsDir, { recursive: true });
  for (const [name, bytes] of files) fs.writeFileSync(path.join(assetsDir, name), bytes);
}

/** Every file under `dir` (sorted), hidden ones left out. */
function filesUnder(dir: string): string[] {
  return (fs.readdirSync(dir, { recursive: true, withFileTypes: true }) as fs.Dirent[])
    .filter((e) => e.isFile() && !e.name.startsWith("."))
    .map((e) => path.join(e.parentPath, e.name))
    .sort();
}

/**
 * The scripts a process built earlier from the same sources (every file under
 * src/ and templates/_includes, and the lockfile: a safe over-estimate of what
 * the bundles read, hashed in tens of milliseconds), or new ones, then stored
 * under a folder named by that digest, written aside and renamed into place.
 */
async function cachedOrBundled(): Promise<Map<string, Uint8Array>> {
  const cacheDir = privateBundleDir();
  const src = path.join(PROJECT_ROOT, "src");
  if (cacheDir === null || !fs.existsSync(src)) return bundleAll();
  const inputs = [...filesUnder(src), ...filesUnder(INCLUDES), path.join(PROJECT_ROOT, "package-lock.json")].filter((f) => fs.existsSync(f));
  const key = digestOfInputs(inputs).slice(0, 32);
  const dir = path.join(cacheDir, `${CACHE_PREFIX}${key}`);
  try {
    return new Map(SCRIPTS.map((n) => [n, fs.readFileSync(path.join(dir, n))]));
  } catch {
    // Not stored yet (or removed meanwhile by a process that found it a day old): bundled below.
  }
  const files = await bundleAll();
  if (files.size === SCRIPTS.length) {
    try {
      const aside = fs.mkdtempSync(path.join(cacheDir, `.${CACHE_PREFIX}`));
      for (const [n, bytes] of files) fs.writeFileSync(path.join(aside, n), bytes);
      fs.renameSync(aside, dir);
      // Scripts of other sources go once a day old (other clones of the tool share the folder).
      for (const old of fs.readdirSync(cacheDir)) {
        const full = path.join(cacheDir, old);
        if (old.startsWith(CACHE_PREFIX) && full !== dir && Date.now() - fs.statSync(full).mtimeMs > STALE_AFTER_MS) fs.rmSync(full, { recursive: true, force: true });
      }
    } catch {
      // Another process stored the same scripts first, or the folder is full: this build has them anyway.
    }
  }
  return files;
}

/**
 * Every panel script. Where esbuild is absent (an installed package has no
 * development tools), the copies prepack built into dist/browser/ are taken;
 * without those either, the pages keep the panels' text for a browser without
 * script, and the rest of the site is unchanged.
 */
async function bundleAll(): Promise<Map<string, Uint8Array>> {
  const files = new Map<string, Uint8Array>();
  let esbuild: typeof import("esbuild");
  try {
    esbuild = await import("esbuild");
  } catch {
    for (const name of SCRIPTS) {
      const prebuilt = path.join(PREBUILT_PANEL_DIR, name);
      if (fs.existsSync(prebuilt)) files.set(name, fs.readFileSync(prebuilt));
    }
    return files;
  }
  const common = {
    bundle: true,
    format: "esm",
    platform: "browser",
    target: "es2022",
    minify: true,
    write: false,
    legalComments: "none",
    logLevel: "silent",
  } as const;
  const panel = await esbuild.build({ ...common, entryPoints: [path.join(PANEL_DIR, "main.ts")] });
  files.set(PANEL_SCRIPT, panel.outputFiles[0].contents);
  const render = await esbuild.build({ ...common, entryPoints: [path.join(PANEL_DIR, "reportRender.ts")], plugins: [templatesPlugin()] });
  files.set(RENDER_SCRIPT, render.outputFiles[0].contents);
  files.set(WORKER_SCRIPT, await engineWorker());
  return files;
}

/** The engine's worker bundle, written by its own bundler into a scratch folder and read back. */
async function engineWorker(): Promise<Uint8Array> {
  const scratch = fs.mkdtempSync(path.join(os.tmpdir(), "transport-audit-worker-"));
  try {
    const { worker } = await buildBrowserBundle(scratch);
    return fs.readFileSync(worker);
  } finally {
    fs.rmSync(scratch, { recursive: true, force: true });
  }
}

/** The part of nunjucks' API used here (the package ships no types). */
interface NunjucksPrecompiler {
  precompileString(source: string, options: { name: string; wrapper: (templates: { name: string; template: string }[]) => string }): string;
}

/**
 * The module `report-templates`: the site's own Nunjucks templates for a
 * report body (templates/_includes), precompiled to functions, so that the page
 * renders them with nunjucks' slim runtime and never compiles code from text
 * (no eval, which a strict Content-Security-Policy forbids).
 */
function templatesPlugin(): import("esbuild").Plugin {
  return {
    name: "report-templates",
    setup(build) {
      build.onResolve({ filter: /^report-templates$/ }, () => ({ path: "report-templates", namespace: "report-templates" }));
      build.onLoad({ filter: /.*/, namespace: "report-templates" }, () => {
        const require = createRequire(import.meta.url);
        const nunjucks = require("nunjucks") as NunjucksPrecompiler;
        const names = fs.readdirSync(INCLUDES).filter((n) => n.endsWith(".njk")).sort();
        const compiled = names.map((name) =>
          nunjucks.precompileString(fs.readFileSync(path.join(INCLUDES, name), "utf8"), {
            name,
            wrapper: (templates) => templates.map((t) => `templates[${JSON.stringify(t.name)}] = (function() {\n${t.template}\n})();`).join("\n"),
          }),
        );
        return {
          contents: `const templates = {};\n${compiled.join("\n")}\nexport default templates;\n`,
          loader: "js",
          resolveDir: PROJECT_ROOT,
          watchFiles: names.map((n) => path.join(INCLUDES, n)),
        };
      });
    },
  };
}
