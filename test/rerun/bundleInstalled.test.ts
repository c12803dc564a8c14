/**
 * The installed package has no esbuild (a development dependency) and no
 * src/: `build` there copies the bundle that prepack built into
 * dist/browser/. This compiles src/ as prepack does (scripts/build/compile.ts),
 * puts the bundle where prepack puts it, and asks the compiled
 * buildBrowserBundle, run by plain Node in a folder with no node_modules, for
 * a site's copy: it must be the same bytes.
 */
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { expect, test } from "vitest";
import { compile } from "../../scripts/build/compile.ts";
import { buildBrowserBundle } from "../../scripts/build/browserBundle.ts";
import { ROOT } from "./auditFiles.ts";

test("the compiled buildBrowserBundle copies the prebuilt bundle where esbuild is absent", async () => {
  const work = fs.mkdtempSync(path.join(os.tmpdir(), "rerun-installed-"));
  try {
    const dist = path.join(work, "dist");
    await compile(path.join(ROOT, "src"), dist);
    const prebuilt = await buildBrowserBundle(path.join(dist, "browser"));
    expect(prebuilt.worker).toBe(path.join(dist, "browser", "rerun-worker.js"));
    const site = path.join(work, "site");
    const script = `const m = await import(${JSON.stringify(path.join(dist, "browser", "engine", "browserBundle.js"))}); process.stdout.write(JSON.stringify(await m.buildBrowserBundle(${JSON.stringify(site)})));`;
    const copied = JSON.parse(execFileSync(process.execPath, ["--input-type=module", "-e", script], { cwd: work, encoding: "utf8" })) as { worker: string; bytes: number };
    expect(copied).toEqual({ worker: path.join(site, "rerun-worker.js"), bytes: prebuilt.bytes });
    expect(Buffer.compare(fs.readFileSync(copied.worker), fs.readFileSync(prebuilt.worker))).toBe(0);
  } finally {
    fs.rmSync(work, { recursive: true, force: true });
  }
});
