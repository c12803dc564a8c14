/**
 * Every data format the command line reads, read by the browser bundle: the
 * fixtures of test/ingest/fixtures/formats (written by
 * scripts/fixtures/write_formats.py with NumPy, h5py and the gzip and zstd
 * programs) and a Parquet file written by hyparquet-writer, each as the one
 * dataset of an audit, run by `run`'s code in Node (the reference) and by the
 * bundle on its in-memory volume with the browser stand-ins for node:fs,
 * node:zlib (fflate), node:crypto (@noble/hashes) and node:stream. The
 * documents must be the same bytes. HDF5 is refused in the browser build, with
 * a message that says so.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import zlib from "node:zlib";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { buildBrowserBundle } from "../../scripts/build/browserBundle.ts";
import { runAuditFromFiles } from "../../src/browser/engine/engine.ts";
import { readNumericCsv } from "../../src/ingest/readCsv.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { FORMAT_FIXTURES, formatsAudit } from "../helpers/formatsAudit.ts";
import { writeSamplesParquet } from "../helpers/writeSamplesParquet.ts";
import { writeChecksummedParquet } from "../helpers/writeChecksummedParquet.ts";
import { auditFiles } from "./auditFiles.ts";

const work = fs.mkdtempSync(path.join(os.tmpdir(), "rerun-formats-"));
let bundle: { runAuditFromFiles: typeof runAuditFromFiles };

beforeAll(async () => {
  const { worker } = await buildBrowserBundle(path.join(work, "bundle"));
  bundle = await import(pathToFileURL(worker).href);
});
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

const NAMED = ["columns: { Q: Q_meV, dN: n }"];
const PLACED = ["columns: { Q: 2, dN: 3 }"];

/** Fixture file (or folder) → the dataset's layout keys in audit.yaml. */
const FIXTURES: [string, string[]][] = [
  ["comma.csv", NAMED],
  ["tab.tsv", NAMED],
  ["semicolon-decimal-comma.csv", ["format: semicolon", "decimal: comma", ...NAMED]],
  ["whitespace.dat", ["format: whitespace", ...NAMED]],
  ["no-header.csv", ["header: false", ...PLACED]],
  ["preamble.txt", ["skip_lines: 3", ...NAMED]],
  ["comma.csv.gz", NAMED],
  ["comma.csv.zst", NAMED],
  ["parts", NAMED],
  ["structured.npy", NAMED],
  ["structured-v3.npy", ["columns: { Q: Q_meV, dN: ΔN }"]],
  ["matrix-fortran.npy", PLACED],
  ["matrix-half.npy", PLACED],
  ["stored.npz", NAMED],
  ["deflated.npz", NAMED],
];

describe.each(FIXTURES)("%s", (file, keys) => {
  test("the bundle gives run's result document, byte for byte", async () => {
    const dir = await formatsAudit(work, file, keys);
    const expected = canonicalJson((await runAudit(dir)).result);
    expect((await bundle.runAuditFromFiles(auditFiles(dir))).json).toBe(expected);
  });
});

test("Parquet (hyparquet-writer): the bundle gives run's result document, byte for byte", async () => {
  const table = await readNumericCsv(path.join(FORMAT_FIXTURES, "comma.csv"), "comma.csv", [
    { role: "Q", column: "Q_meV" },
    { role: "dN", column: "n" },
  ]);
  const columns = { Q_meV: table.columns.get("Q_meV")!, n: table.columns.get("n")! };
  const dir = await formatsAudit(work, "samples.parquet", NAMED, (target) => writeSamplesParquet(target, columns));
  const expected = canonicalJson((await runAudit(dir)).result);
  expect((await bundle.runAuditFromFiles(auditFiles(dir))).json).toBe(expected);
});

test("Parquet with page CRC-32s (verified on read through zlib.crc32, the shim's in the bundle): the bundle gives run's document", async () => {
  const table = await readNumericCsv(path.join(FORMAT_FIXTURES, "comma.csv"), "comma.csv", [
    { role: "Q", column: "Q_meV" },
    { role: "dN", column: "n" },
  ]);
  const columns = { Q_meV: table.columns.get("Q_meV")!, n: table.columns.get("n")! };
  const dir = await formatsAudit(work, "checksummed.parquet", NAMED, (target) => {
    writeChecksummedParquet(target, columns, { rowGroupRows: 64, pageRows: 16, offsetIndex: false });
  });
  const expected = canonicalJson((await runAudit(dir)).result);
  expect((await bundle.runAuditFromFiles(auditFiles(dir))).json).toBe(expected);
});

test("gzip of two members (RFC 1952 §2.2: concatenated members are one text): the bundle gives run's document", async () => {
  const text = fs.readFileSync(path.join(FORMAT_FIXTURES, "comma.csv"));
  const cut = text.indexOf(10, text.length >> 1) + 1;
  const dir = await formatsAudit(work, "two-members.csv.gz", NAMED, (target) =>
    fs.writeFileSync(target, Buffer.concat([zlib.gzipSync(text.subarray(0, cut)), zlib.gzipSync(text.subarray(cut))])),
  );
  const expected = canonicalJson((await runAudit(dir)).result);
  expect((await bundle.runAuditFromFiles(auditFiles(dir))).json).toBe(expected);
});

test.each([
  ["compound.h5", ["dataset: /runs/exchange", ...NAMED]],
  ["columns.h5", ["columns: { Q: /runs/Q, dN: /runs/n }"]],
])("HDF5 (%s) is refused in the browser build with a message naming the file; engine.ts in Node reads it as run does", async (file, keys) => {
  const dir = await formatsAudit(work, file, keys);
  const err = (await bundle.runAuditFromFiles(auditFiles(dir)).catch((e: unknown) => e)) as Error;
  expect(err.name).toBe("DataError");
  expect(err.message).toBe(`data/${file}: HDF5 files are not read in the browser (the HDF5 library is not part of this page's re-run); re-run this audit with the command line: transport-audit run <folder>`);
  expect((await runAuditFromFiles(auditFiles(dir))).json).toBe(canonicalJson((await runAudit(dir)).result));
});

test("a gzip file with one byte of its data changed: the message run gives", async () => {
  const dir = await formatsAudit(work, "comma.csv.gz", NAMED);
  const file = path.join(dir, "data", "comma.csv.gz");
  const bytes = fs.readFileSync(file);
  bytes[bytes.length - 5] ^= 0xff; // inside the trailer's CRC-32 (RFC 1952 §2.3.1): the data no longer match it
  fs.writeFileSync(file, bytes);
  const expected = (await runAudit(dir).catch((e: unknown) => e)) as Error;
  const got = (await bundle.runAuditFromFiles(auditFiles(dir)).catch((e: unknown) => e)) as Error;
  expect(expected.name).toBe("DataError");
  expect(got.name).toBe("DataError");
  expect(got.message).toBe(expected.message);
});

test("a gzip file cut short: the message run gives", async () => {
  const dir = await formatsAudit(work, "comma.csv.gz", NAMED);
  const file = path.join(dir, "data", "comma.csv.gz");
  fs.writeFileSync(file, fs.readFileSync(file).subarray(0, 400));
  const expected = (await runAudit(dir).catch((e: unknown) => e)) as Error;
  const got = (await bundle.runAuditFromFiles(auditFiles(dir)).catch((e: unknown) => e)) as Error;
  expect(expected.name).toBe("DataError");
  expect(got.message).toBe(expected.message);
});
