// One quoted cell must not send a large file down a slow or memory-hungry path (issue 22, item 10): the
// large-samples file (bench/largeSamples.ts) is read as it is and with one quoted cell in its first data
// row, each in a child process (reading only), and the two rates and peak memories are compared.
// BENCH_QUOTED_ROWS sets the size (default 4·10^6 realisations, ~84 MB: above the 64 MB summary threshold).
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { ensureLargeSamplesAudit } from "./largeSamples.ts";

interface ReadFigures {
  read_seconds: number;
  peak_rss_mib: number;
  rows: number;
  summarised: boolean;
}

function readInChild(dir: string): ReadFigures {
  const child = spawnSync(process.execPath, ["--import", "tsx", path.join("bench", "readChild.ts"), dir], { encoding: "utf8" });
  if (child.status !== 0) throw new Error(`read child exited with ${child.status}: ${child.stderr}`);
  return JSON.parse(child.stdout.trim().split("\n").pop()!) as ReadFigures;
}

/** A copy of the audit folder whose data file has its first data row's first cell in quotes. */
function quotedCopy(dir: string, csv: string): string {
  const out = `${dir}-quoted`;
  const target = path.join(out, path.relative(dir, csv));
  if (fs.existsSync(target) && fs.statSync(target).size === fs.statSync(csv).size + 2) return out;
  fs.mkdirSync(path.dirname(target), { recursive: true });
  fs.copyFileSync(path.join(dir, "audit.yaml"), path.join(out, "audit.yaml"));
  const fd = fs.openSync(csv, "r");
  const head = Buffer.alloc(1 << 16);
  const got = fs.readSync(fd, head, 0, head.length, 0);
  fs.closeSync(fd);
  const text = head.subarray(0, got).toString("latin1");
  const rowStart = text.indexOf("\n") + 1;
  const cellEnd = text.indexOf(",", rowStart);
  const prefix = `${text.slice(0, rowStart)}"${text.slice(rowStart, cellEnd)}"`;
  fs.writeFileSync(target, prefix);
  const sink = fs.openSync(target, "a");
  for (const chunk of blocksFrom(csv, cellEnd)) fs.writeSync(sink, chunk);
  fs.closeSync(sink);
  return out;
}

/** The bytes of a file from `start` on, in 4 MiB blocks. */
function* blocksFrom(file: string, start: number): Generator<Buffer> {
  const fd = fs.openSync(file, "r");
  const buffer = Buffer.allocUnsafe(4 << 20);
  let at = start;
  for (;;) {
    const got = fs.readSync(fd, buffer, 0, buffer.length, at);
    if (got === 0) break;
    at += got;
    yield buffer.subarray(0, got);
  }
  fs.closeSync(fd);
}

export async function run(): Promise<Record<string, unknown>> {
  const rows = Number(process.env.BENCH_QUOTED_ROWS ?? 4e6);
  const dir = path.resolve(".bench", `large-samples-${rows.toExponential(0).replace("+", "")}`);
  const data = ensureLargeSamplesAudit(dir, rows);
  const quoted = quotedCopy(dir, data.csv);
  const mb = data.bytes / 1e6;
  const plain = readInChild(dir);
  const withQuote = readInChild(quoted);
  const line = (label: string, value: string) => process.stdout.write(`   ${label.padEnd(34)} ${value}\n`);
  line("file", `${mb.toFixed(0)} MB, ${rows.toLocaleString("en-US")} realisations${plain.summarised ? ", summarised" : ""}`);
  line("plain", `${plain.read_seconds.toFixed(2)} s (${(mb / plain.read_seconds).toFixed(0)} MB/s), peak ${plain.peak_rss_mib.toFixed(0)} MiB`);
  line("one quoted cell", `${withQuote.read_seconds.toFixed(2)} s (${(mb / withQuote.read_seconds).toFixed(0)} MB/s), peak ${withQuote.peak_rss_mib.toFixed(0)} MiB`);
  line("time ratio (quoted / plain)", (withQuote.read_seconds / plain.read_seconds).toFixed(2));
  return { rows, megabytes: mb, plain, quoted: withQuote };
}
