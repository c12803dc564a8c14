// Compiles src/ to dist/ for the published package, as bundles: each entry module (the command line,
// each command, each worker thread's module, the audit computation the result cache digests) becomes
// one JavaScript file at its own path under dist/, and code that several of them share goes into
// chunks under dist/chunks/. The packages on every command's start-up path are bundled in with our
// code; the rest stay imports of the installed packages. A process then reads a few files instead of
// some 150 modules and the hundred-odd files of yaml (measured in DEVELOPERS.md, "Start-up"). Entries
// are found in the sources at each build, so a worker someone adds is compiled without anyone listing
// it. Run by `npm pack` (prepack) and by hand with `npm run compile`; development runs the sources
// through tsx.
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import * as esbuild from "esbuild";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");

/** Every TypeScript module under `dir` (declaration files excluded: they hold no code). */
export function typeScriptModules(dir: string): string[] {
  return fs
    .readdirSync(dir, { withFileTypes: true })
    .flatMap((e) => {
      const file = path.join(dir, e.name);
      if (e.isDirectory()) return typeScriptModules(file);
      return e.isFile() && e.name.endsWith(".ts") && !e.name.endsWith(".d.ts") ? [file] : [];
    })
    .sort();
}

/**
 * Pure JavaScript packages that every command loads on start (the argument
 * parser, the colours of messages, the audit definition's parser and schema,
 * the CSV reader, the linear algebra of the checks), with the packages they
 * import. Bundled, they cost a fraction of loading them file by file. The
 * others stay imports: format readers that load only with a file of their
 * format (h5wasm ships a WebAssembly file beside its code), and what only
 * `build`, `pdf` or `synth` use (Eleventy loads templates by path, KaTeX's
 * styles and fonts are copied from its folder).
 */
export const BUNDLED_PACKAGES: ReadonlySet<string> = new Set(["commander", "picocolors", "yaml", "zod", "csv-parse", "ml-matrix"]);

/** The package a bare specifier names (`csv-parse/sync` → `csv-parse`, `@scope/name/x` → `@scope/name`). */
function packageOf(specifier: string): string {
  const parts = specifier.split("/");
  return specifier.startsWith("@") ? parts.slice(0, 2).join("/") : parts[0];
}

/**
 * The modules that must be files of their own at their source's path:
 * the command line, the command modules, the browser bundle's copier, the audit computation (the result
 * cache digests the code reached from dist/report/runAudit.js), and every
 * module started as a worker thread (`new URL("./worker.ts", import.meta.url)`
 * in a module of src/; src/threads/tsWorker.ts starts the `.js` beside it).
 */
export function entryModules(srcDir: string): string[] {
  const entries = new Set([
    path.join(srcDir, "cli", "main.ts"),
    path.join(srcDir, "report", "runAudit.ts"),
    // The site build's copier of the prebuilt browser bundle, importable on its own (test/rerun/bundleInstalled.test.ts).
    path.join(srcDir, "browser", "engine", "browserBundle.ts"),
  ]);
  for (const file of typeScriptModules(path.join(srcDir, "cli", "commands"))) entries.add(file);
  for (const file of typeScriptModules(srcDir)) {
    for (const m of fs.readFileSync(file, "utf8").matchAll(/new URL\(\s*["'](\.{1,2}\/[^"']+\.ts)["']\s*,\s*import\.meta\.url\s*\)/g)) {
      const worker = path.resolve(path.dirname(file), m[1]);
      if (fs.existsSync(worker)) entries.add(worker); // (not an example in a comment)
    }
  }
  return [...entries].sort();
}

/** Marks each module's `import.meta.url` in the bundle until the output files' places are known. */
const MODULE_URL = "__transportAuditModuleUrl";

/**
 * Bundled code keeps each module's own address: `import.meta.url` in a
 * module of src/ is written as the URL its compiled file would have had
 * on its own (dist/report/buildSite.js for src/report/buildSite.ts), so that
 * paths computed from it (package.json, templates/, a worker's module, the
 * code the result cache digests) hold wherever esbuild put the code. Packages
 * go in or stay out as BUNDLED_PACKAGES says; a bundled package's own imports
 * go in with it.
 */
function ownLayoutPlugin(srcDir: string): esbuild.Plugin {
  return {
    name: "own-layout",
    setup(build) {
      build.onResolve({ filter: /^[^./]/ }, (args) => {
        if (args.kind === "entry-point" || args.path.startsWith("node:")) return undefined;
        const fromPackage = args.importer.split(path.sep).includes("node_modules");
        if (fromPackage || BUNDLED_PACKAGES.has(packageOf(args.path))) return undefined;
        return { path: args.path, external: true };
      });
      build.onLoad({ filter: /\.ts$/ }, (args) => {
        if (!args.path.startsWith(srcDir + path.sep)) return undefined;
        const compiled = path.relative(srcDir, args.path).replace(/\.ts$/, ".js").split(path.sep).join("/");
        const text = fs.readFileSync(args.path, "utf8").replaceAll("import.meta.url", `${MODULE_URL}(${JSON.stringify(compiled)})`);
        return { contents: text, loader: "ts" };
      });
    },
  };
}

/** An output file's text with each marked module URL written relative to the file itself. */
function placeModuleUrls(text: string, outFile: string, outDir: string): string {
  const marker = new RegExp(`${MODULE_URL}\\(("[^"]+")\\)`, "g");
  return text.replace(marker, (_, quoted: string) => {
    const target = path.join(outDir, JSON.parse(quoted) as string);
    let relative = path.relative(path.dirname(outFile), target).split(path.sep).join("/");
    if (!relative.startsWith(".")) relative = `./${relative}`;
    return `new URL(${JSON.stringify(relative)}, import.meta.url).href`;
  });
}

/** Compile `srcDir` into `outDir` (replaced whole); returns the number of files written. */
export async function compile(srcDir: string, outDir: string): Promise<number> {
  const staging = `${outDir}.staging-${process.pid}`;
  fs.rmSync(staging, { recursive: true, force: true });
  const result = await esbuild.build({
    entryPoints: entryModules(srcDir),
    outbase: srcDir,
    outdir: staging,
    bundle: true,
    splitting: true,
    chunkNames: "chunks/[name]-[hash]",
    plugins: [ownLayoutPlugin(srcDir)],
    platform: "node",
    format: "esm",
    target: "node20",
    // Bundled CommonJS packages (yaml, commander) call require() for Node's own modules.
    banner: { js: 'import { createRequire as __transportAuditRequire } from "node:module"; const require = __transportAuditRequire(import.meta.url);' },
    write: false,
    logLevel: "warning",
  });
  for (const file of result.outputFiles) {
    const text = placeModuleUrls(file.text, file.path, staging);
    if (text.includes(MODULE_URL)) throw new Error(`${file.path}: a module URL was left unplaced`);
    fs.mkdirSync(path.dirname(file.path), { recursive: true });
    fs.writeFileSync(file.path, text);
  }
  fs.rmSync(outDir, { recursive: true, force: true });
  fs.renameSync(staging, outDir);
  return result.outputFiles.length;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const started = performance.now();
  const count = await compile(path.join(ROOT, "src"), path.join(ROOT, "dist"));
  process.stderr.write(`compiled src/ to ${count} files in dist/ in ${((performance.now() - started) / 1000).toFixed(2)} s\n`);
}
