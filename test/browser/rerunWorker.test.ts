/**
 * The re-run worker in Chromium: the built bundle (rerun-worker.js) started as
 * a module Web Worker from a page served over HTTP, fed every demo audit's
 * files fetched from the same server, must answer with the bytes of the
 * result document `run` computes in Node (canonical JSON, the frozen
 * result.json form). The reference is the command line's own computation
 * (src/report/runAudit.ts in this process); no tolerance, because a referee's
 * re-run is compared with the frozen document to the last digit, and
 * test/browser/arithmeticParity.test.ts is why the arithmetic allows it.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { buildBrowserBundle } from "../../scripts/build/browserBundle.ts";
import { launchChromium, type LaunchedBrowser } from "../../src/report/pdf/launchChromium.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { auditFiles, DEMO_AUDITS, ROOT } from "../rerun/auditFiles.ts";
import { serveStatic, type StaticServer } from "./staticServer.ts";

let site: string;
let server: StaticServer;
let chromium: LaunchedBrowser;
let page: Page;

beforeAll(async () => {
  site = fs.mkdtempSync(path.join(os.tmpdir(), "rerun-site-"));
  await buildBrowserBundle(site);
  fs.writeFileSync(path.join(site, "index.html"), "<!doctype html><title>re-run worker test</title>");
  fs.symlinkSync(path.join(ROOT, "audits"), path.join(site, "audits"));
  server = await serveStatic(site);
  chromium = await launchChromium();
  page = await chromium.browser.newPage();
  await page.goto(`${server.origin}/index.html`);
});
afterAll(async () => {
  await chromium?.close();
  await server?.close();
  fs.rmSync(site, { recursive: true, force: true });
});

type Reply = { type: string; json?: string; message?: string; kind?: string; phase?: string };

/**
 * In the page: fetch the named files of audits/<id>/ (or take none for names
 * given as null), start the worker, post the run and gather its replies to the
 * last one (result, error or cancelled).
 */
function runInWorker(id: string, names: string[], cancelFirst = false): Promise<Reply[]> {
  return page.evaluate(
    async ({ id, names, cancelFirst }) => {
      const files: [string, ArrayBuffer][] = await Promise.all(
        names.map(async (name): Promise<[string, ArrayBuffer]> => [name, await (await fetch(`audits/${id}/${name}`)).arrayBuffer()]),
      );
      const worker = new Worker("rerun-worker.js", { type: "module" });
      const replies: Reply[] = [];
      try {
        return await new Promise<Reply[]>((resolve, reject) => {
          worker.onerror = (e) => reject(new Error(`worker error: ${e.message}`));
          worker.onmessage = (e: MessageEvent<Reply>) => {
            replies.push(e.data);
            if (e.data.type !== "progress" && !(cancelFirst && e.data.type === "cancelled" && replies.length === 1)) resolve(replies);
          };
          if (cancelFirst) worker.postMessage({ type: "cancel" });
          worker.postMessage({ type: "run", files }, files.map(([, bytes]) => bytes));
        });
      } finally {
        worker.terminate();
      }
    },
    { id, names, cancelFirst },
  );
}

describe.each(DEMO_AUDITS)("demo audit %s in a Chromium worker", (id) => {
  test("gives the result document of run, byte for byte", async () => {
    const dir = path.join(ROOT, "audits", id);
    const expected = canonicalJson((await runAudit(dir)).result);
    const replies = await runInWorker(id, [...auditFiles(dir).keys()]);
    const last = replies.at(-1)!;
    expect(last.type, last.message).toBe("result");
    expect(last.json).toBe(expected);
    expect(replies.some((r) => r.type === "progress" && r.phase === "checks")).toBe(true);
  });
});

test("a missing data file: an error message of its kind, naming the file as audit.yaml does", async () => {
  const replies = await runInWorker("vq3-heat-exchange", ["audit.yaml"]);
  expect(replies.at(-1)).toEqual({ type: "error", kind: "DataError", message: "data/exchange.csv: cannot read the file (does it exist?)" });
});

test("a cancel with nothing running is answered, and the run after it still completes", async () => {
  const replies = await runInWorker("lc60-growth-series", ["audit.yaml", "data/mean-transfer.csv"], true);
  expect(replies[0]).toEqual({ type: "cancelled" });
  expect(replies.at(-1)!.type).toBe("result");
});
