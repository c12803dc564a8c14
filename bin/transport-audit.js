#!/usr/bin/env node
// Launcher. An installed package runs its compiled JavaScript (dist/, built by
// `npm pack`); a clone of the repository, which has the sources, runs them
// through tsx's loader in this same process, so that what runs is always the
// code as it stands (a dist/ left over from an earlier pack is not used there).
import fs from "node:fs";

const sources = new URL("../src/cli/main.ts", import.meta.url);
const compiled = new URL("../dist/cli/main.js", import.meta.url);

/** tsx's loader, when it is installed (a development install); null otherwise. */
async function tsxLoader() {
  try {
    return await import("tsx/esm/api");
  } catch {
    return null;
  }
}

const tsx = fs.existsSync(sources) ? await tsxLoader() : null;
if (tsx) {
  tsx.register();
  await import(sources.href);
} else if (fs.existsSync(compiled)) {
  await import(compiled.href);
} else {
  process.stderr.write("transport-audit: neither dist/cli/main.js nor tsx with src/ is present; run `npm run compile` or `npm install`\n");
  process.exitCode = 3;
}
