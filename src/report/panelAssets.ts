import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createRequire } from "node:module";
import { fileURLToPath } from "node:url";
import { buildBrowserBundle } from "../browser/engine/browserBundle.ts";

/**
 * The scripts of the browser panels, bundled with esbuild when a site is
 * built: `rerun-panel.js` (the small page code of both panels, no framework),
 * `report-render.js` (the report's own view model and Nunjucks templates,
 * loaded only when a reader drops an audit on the index) and the engine's
 * `rerun-worker.js` (the checks, in a Web Worker). Bundled once per process
 * and copied into each site.
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

let bundled: Promise<Map<string, Uint8Array>> | null = null;

/** Write the panels' scripts into the site's assets folder. */
export async function writePanelAssets(assetsDir: string): Promise<void> {
  bundled ??= bundleAll();
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
    for (const name of [PANEL_SCRIPT, RENDER_SCRIPT, WORKER_SCRIPT]) {
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
