// Run by `npm pack` and `npm publish` (prepack): compiles src/ to dist/ and
// ships the lockfile as npm-shrinkwrap.json, so that an installed package
// gets the dependency tree this repository was tested with and the result
// cache can key its entries by that tree (src/report/toolDigest.ts).
// postpack.ts removes the shrinkwrap again: in a clone it would take the
// place of package-lock.json for `npm install`.
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { compile } from "./compile.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");

const started = performance.now();
const count = await compile(path.join(ROOT, "src"), path.join(ROOT, "dist"));
await (await import("./browserBundle.ts")).buildBrowserBundle(path.join(ROOT, "dist", "browser")); // the page's re-run worker, prebuilt: installed copies have no esbuild
await (await import("../../src/report/panelAssets.ts")).writePanelAssets(path.join(ROOT, "dist", "browser")); // the panels' page scripts, prebuilt likewise
fs.copyFileSync(path.join(ROOT, "package-lock.json"), path.join(ROOT, "npm-shrinkwrap.json"));
process.stderr.write(`compiled src/ to ${count} files in dist/ in ${((performance.now() - started) / 1000).toFixed(2)} s; lockfile shipped as npm-shrinkwrap.json\n`);
