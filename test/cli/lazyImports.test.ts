// What a command loads before it does anything: the packages its module reaches through `import`
// statements alone, read from esbuild's record of the module graph (its metafile, with every
// package left external; type-only imports do not appear in it). A package reached only through an
// `import()` is loaded when that code runs: a format's reader when a file of that format is opened
// (src/ingest/sources/index.ts), Eleventy when `build` renders. Start-up time itself is measured by
// `npm run bench -- startup`, never here; this holds the structure that those figures depend on.
import path from "node:path";
import * as esbuild from "esbuild";
import { describe, expect, it } from "vitest";

const REPO = path.resolve(import.meta.dirname, "..", "..");

interface ModuleGraph {
  /** Packages each of our modules imports, by the kind of import. */
  statically: Set<string>;
  /** Every package reached when dynamic imports are followed too. */
  all: Set<string>;
}

/** The packages `entry` reaches, through import statements only and through every import. */
async function packagesReached(entry: string): Promise<ModuleGraph> {
  const result = await esbuild.build({
    entryPoints: [path.join(REPO, entry)],
    absWorkingDir: REPO,
    bundle: true,
    write: false,
    metafile: true,
    packages: "external",
    platform: "node",
    format: "esm",
    logLevel: "silent",
  });
  const inputs = result.metafile.inputs;
  const walk = (followDynamic: boolean): Set<string> => {
    const packages = new Set<string>();
    const seen = new Set<string>();
    const queue = [entry];
    while (queue.length > 0) {
      const file = queue.pop()!;
      if (seen.has(file)) continue;
      seen.add(file);
      for (const imported of inputs[file]?.imports ?? []) {
        if (imported.kind === "dynamic-import" && !followDynamic) continue;
        if (imported.external) {
          if (!imported.path.startsWith("node:")) packages.add(packageName(imported.path));
        } else queue.push(imported.path);
      }
    }
    return packages;
  };
  return { statically: walk(false), all: walk(true) };
}

/** `hyparquet-compressors` for itself, `h5wasm` for `h5wasm/node`, `@11ty/eleventy` for a scoped name. */
function packageName(specifier: string): string {
  const parts = specifier.split("/");
  return specifier.startsWith("@") ? parts.slice(0, 2).join("/") : parts[0];
}

/** Readers of the binary and compressed formats: none is needed to read a plain text file. */
const FORMAT_READERS = ["hyparquet", "hyparquet-compressors", "h5wasm", "fflate", "fzstd"];
/** What only other commands use: the site and its rendering (`build`, `pdf`), the progress bar (`build`, `synth`). */
const OTHER_COMMANDS = ["@11ty/eleventy", "playwright-core", "katex", "d3", "markdown-it", "cli-progress"];

describe("packages loaded before a command runs", () => {
  it("run loads no format reader, and nothing that only other commands use, until it needs them", async () => {
    const graph = await packagesReached("src/cli/commands/run.ts");
    for (const name of [...FORMAT_READERS, ...OTHER_COMMANDS]) expect(graph.statically, name).not.toContain(name);
    // The same walk through the import() calls does reach every reader: the readers are
    // still part of the command, loaded when a file of their format is opened.
    for (const name of FORMAT_READERS) expect(graph.all, name).toContain(name);
    // What every audit needs is loaded at once (the walk does see import statements).
    for (const name of ["yaml", "zod"]) expect(graph.statically, name).toContain(name);
  }, 60_000);

  it("--version and --help load no command and so none of their packages", async () => {
    const graph = await packagesReached("src/cli/main.ts");
    // The argument parser, and the colours of error messages (src/cli/exit.ts).
    expect([...graph.statically].sort()).toEqual(["commander", "picocolors"]);
    for (const name of ["yaml", "zod", ...FORMAT_READERS, ...OTHER_COMMANDS]) expect(graph.all, name).toContain(name);
  }, 60_000);
});
