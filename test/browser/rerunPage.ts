import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { Page } from "playwright-core";
import { buildBrowserBundle } from "../../scripts/build/browserBundle.ts";
import { launchChromium, type LaunchedBrowser } from "../../src/report/pdf/launchChromium.ts";
import { ROOT } from "../rerun/auditFiles.ts";
import { serveStatic, type StaticServer } from "./staticServer.ts";

/** A reply of the re-run worker (src/browser/engine/worker.ts). */
export type Reply = { type: string; json?: string; message?: string; kind?: string; phase?: string };

/**
 * Runs in the page (source text: the project's types have no DOM): fetch the
 * named files of audits/<id>/, start the worker, post the run (after a cancel
 * when asked) and gather its replies to the last one (result, error or cancelled).
 */
const PAGE_RUN = `async ({ id, names, cancelFirst }) => {
  const files = await Promise.all(names.map(async (name) => [name, await (await fetch("audits/" + id + "/" + name)).arrayBuffer()]));
  const worker = new Worker("rerun-worker.js", { type: "module" });
  const replies = [];
  const started = performance.now();
  try {
    return await new Promise((resolve, reject) => {
      worker.onerror = (e) => reject(new Error("worker error: " + e.message));
      worker.onmessage = (e) => {
        replies.push(e.data);
        const answeredCancel = cancelFirst && e.data.type === "cancelled" && replies.length === 1;
        if (e.data.type !== "progress" && !answeredCancel) resolve({ replies, ms: performance.now() - started });
      };
      if (cancelFirst) worker.postMessage({ type: "cancel" });
      worker.postMessage({ type: "run", files }, files.map(([, bytes]) => bytes));
    });
  } finally {
    worker.terminate();
  }
}`;

export interface RerunPage {
  /** The worker's replies to a run of the named files of audits/<id>/, to the last one; `ms`: from the files fetched to the last reply (the worker's start included). */
  run(id: string, names: string[], cancelFirst?: boolean): Promise<{ replies: Reply[]; ms: number }>;
  /** The bundle's size in bytes. */
  bytes: number;
  close(): Promise<void>;
}

/**
 * A blank page served over HTTP from a temporary folder holding the freshly
 * built rerun-worker.js and the repository's demo audits (audits/, linked),
 * open in headless Chromium.
 */
export async function openRerunPage(): Promise<RerunPage> {
  const site = fs.mkdtempSync(path.join(os.tmpdir(), "rerun-site-"));
  const { bytes } = await buildBrowserBundle(site);
  fs.writeFileSync(path.join(site, "index.html"), "<!doctype html><title>re-run worker</title>");
  fs.symlinkSync(path.join(ROOT, "audits"), path.join(site, "audits"));
  const server: StaticServer = await serveStatic(site);
  const chromium: LaunchedBrowser = await launchChromium();
  const page: Page = await chromium.browser.newPage();
  await page.goto(`${server.origin}/index.html`);
  return {
    bytes,
    run: (id, names, cancelFirst = false) => page.evaluate(`(${PAGE_RUN})(${JSON.stringify({ id, names, cancelFirst })})`) as Promise<{ replies: Reply[]; ms: number }>,
    close: async () => {
      await chromium.close();
      await server.close();
      fs.rmSync(site, { recursive: true, force: true });
    },
  };
}
