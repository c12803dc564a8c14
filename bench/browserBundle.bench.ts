// The browser's re-run (issue 21): the size of rerun-worker.js (bytes, and gzip bytes as a static host
// would send it compressed), and the time to re-run the largest demo audit (by data bytes) three ways:
// the command line's code in this process (runAudit), the bundle imported into Node (in-memory files,
// browser stand-ins), and the bundle in a Chromium module worker (worker start included; skipped when
// there is no Chromium). Each run's document is compared with the command line's: a figure for a run
// that gives other bytes would be meaningless. BENCH_RERUN_REPEATS sets the repetitions (median;
// default 3). BENCH_RERUN_LARGE_ROWS=3.4e6 adds a samples audit above the 64 MB reduction threshold
// (bench/largeSamples.ts), summarised in one thread by the bundle, with the process's peak memory.
import fs from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";
import zlib from "node:zlib";
import { buildBrowserBundle } from "../scripts/build/browserBundle.ts";
import type { runAuditFromFiles } from "../src/browser/engine/engine.ts";
import { canonicalJson } from "../src/report/canonicalJson.ts";
import { runAudit } from "../src/report/runAudit.ts";
import { auditFiles, DEMO_AUDITS, ROOT } from "../test/rerun/auditFiles.ts";
import { ensureLargeSamplesAudit } from "./largeSamples.ts";

const HERE = path.resolve(".bench", "browserBundle");
const REPEATS = Number(process.env.BENCH_RERUN_REPEATS ?? 3);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

async function timed(label: string, expected: string, once: () => Promise<string>): Promise<number> {
  const times: number[] = [];
  for (let i = 0; i < REPEATS; i++) {
    const t0 = performance.now();
    const json = await once();
    times.push(performance.now() - t0);
    if (json !== expected) throw new Error(`${label}: the result document differs from the command line's`);
  }
  const ms = median(times);
  process.stdout.write(`   ${label.padEnd(44)} ${(ms / 1000).toFixed(2)} s (median of ${REPEATS})\n`);
  return ms;
}

function dataBytes(id: string): number {
  return [...auditFiles(path.join(ROOT, "audits", id)).values()].reduce((sum, b) => sum + b.length, 0);
}

export async function run(): Promise<Record<string, unknown>> {
  fs.mkdirSync(HERE, { recursive: true });
  const t0 = performance.now();
  const { worker, bytes } = await buildBrowserBundle(HERE);
  const buildMs = performance.now() - t0;
  const gzipBytes = zlib.gzipSync(fs.readFileSync(worker), { level: 9 }).length;
  process.stdout.write(`   rerun-worker.js: ${bytes.toLocaleString("en")} bytes, ${gzipBytes.toLocaleString("en")} gzip bytes (built in ${(buildMs / 1000).toFixed(2)} s)\n`);
  const bundle = (await import(pathToFileURL(worker).href)) as { runAuditFromFiles: typeof runAuditFromFiles };

  const largest = [...DEMO_AUDITS].sort((a, b) => dataBytes(b) - dataBytes(a))[0];
  const dir = path.join(ROOT, "audits", largest);
  const files = auditFiles(dir);
  process.stdout.write(`   largest demo audit: ${largest} (${dataBytes(largest).toLocaleString("en")} bytes)\n`);
  const expected = canonicalJson((await runAudit(dir)).result);
  const cliMs = await timed("command line's code (runAudit, in process)", expected, async () => canonicalJson((await runAudit(dir)).result));
  const nodeMs = await timed("bundle in Node", expected, async () => (await bundle.runAuditFromFiles(files)).json);

  let chromiumMs: number | null = null;
  if (fs.existsSync(process.env.TRANSPORT_AUDIT_CHROMIUM ?? "/usr/bin/chromium")) {
    const { openRerunPage } = await import("../test/browser/rerunPage.ts");
    const page = await openRerunPage();
    try {
      chromiumMs = await timed("bundle in a Chromium worker", expected, async () => {
        const last = (await page.run(largest, [...files.keys()])).replies.at(-1)!;
        return last.json ?? `no result: ${last.message}`;
      });
    } finally {
      await page.close();
    }
  } else process.stdout.write("   no Chromium: the browser's time is not measured\n");

  let large: Record<string, unknown> | null = null;
  const rows = Number(process.env.BENCH_RERUN_LARGE_ROWS ?? 0);
  if (rows > 0) {
    const largeDir = path.join(HERE, "large");
    const { bytes: csvBytes } = ensureLargeSamplesAudit(largeDir, rows);
    const want = canonicalJson((await runAudit(largeDir)).result);
    const t1 = performance.now();
    const got = (await bundle.runAuditFromFiles(auditFiles(largeDir))).json;
    const ms = performance.now() - t1;
    if (got !== want) throw new Error("large samples audit: the bundle's result document differs from the command line's");
    const peak = process.resourceUsage().maxRSS * 1024;
    process.stdout.write(`   large samples audit (${csvBytes.toLocaleString("en")} bytes, summarised in one thread) in Node through the bundle: ${(ms / 1000).toFixed(2)} s, peak RSS ${(peak / 1e6).toFixed(0)} MB\n`);
    large = { rows, bytes: csvBytes, ms, peakRssBytes: peak };
  }
  return { bundleBytes: bytes, gzipBytes, buildMs, largest, cliMs, nodeMs, chromiumMs, large };
}
