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
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { auditFiles, DEMO_AUDITS, ROOT } from "../rerun/auditFiles.ts";
import { openRerunPage, type RerunPage, type Reply } from "./rerunPage.ts";

let page: RerunPage;

beforeAll(async () => {
  page = await openRerunPage();
});
afterAll(async () => {
  await page?.close();
});

const runInWorker = async (id: string, names: string[], cancelFirst = false): Promise<Reply[]> => (await page.run(id, names, cancelFirst)).replies;

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
