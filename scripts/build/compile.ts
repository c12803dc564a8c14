// Compiles src/ to dist/ for the published package: every TypeScript module
// under src/ becomes one JavaScript module at the same relative path, its
// relative `.ts` imports rewritten to `.js`, packages left as imports. The
// file list is read from the folder at each build, so a module someone adds
// is compiled without anyone listing it. Run by `npm pack` (prepack) and by
// hand with `npm run compile`; development runs the sources through tsx.
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
 * Each module is compiled alone: every import is left to Node at run time
 * (external), a relative one pointing at the compiled `.js` sibling.
 */
const importsStayImports: esbuild.Plugin = {
  name: "imports-stay-imports",
  setup(build) {
    build.onResolve({ filter: /.*/ }, (args) => {
      if (args.kind === "entry-point") return undefined;
      const relative = args.path.startsWith("./") || args.path.startsWith("../");
      return { path: relative ? args.path.replace(/\.ts$/, ".js") : args.path, external: true };
    });
  },
};

/** Compile `srcDir` into `outDir` (replaced whole); returns the number of modules written. */
export async function compile(srcDir: string, outDir: string): Promise<number> {
  const entryPoints = typeScriptModules(srcDir);
  const staging = `${outDir}.staging-${process.pid}`;
  fs.rmSync(staging, { recursive: true, force: true });
  await esbuild.build({
    entryPoints,
    outbase: srcDir,
    outdir: staging,
    bundle: true,
    plugins: [importsStayImports],
    platform: "node",
    format: "esm",
    target: "node20",
    logLevel: "warning",
  });
  fs.rmSync(outDir, { recursive: true, force: true });
  fs.renameSync(staging, outDir);
  return entryPoints.length;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const started = performance.now();
  const count = await compile(path.join(ROOT, "src"), path.join(ROOT, "dist"));
  process.stderr.write(`compiled ${count} modules from src/ to dist/ in ${((performance.now() - started) / 1000).toFixed(2)} s\n`);
}
