import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { runAudit } from "../../src/report/runAudit.ts";
import { writeSamplesParquet } from "../helpers/writeSamplesParquet.ts";
import { commaColumns, formatsAudit } from "../helpers/formatsAudit.ts";

/**
 * One small `samples` dataset (240 realisations, test/ingest/fixtures/formats, written by
 * scripts/fixtures/write_formats.py with NumPy, h5py and the gzip and zstd tools) in every
 * file shape the tool reads must give the same result document as the plain comma file,
 * byte for byte as `run --json` prints it, apart from what names the file itself: its
 * name, its SHA-256, its format, and the fingerprint that covers them. Every value of the
 * dataset is a multiple of 1/4 with an exact binary form, so text, binary16, binary32,
 * binary64 and integers of every width hold the very same doubles: any difference in a
 * verdict or a digit is a reader's fault. The seed is fixed in settings, so that the
 * bootstraps do not draw from the file's digest.
 */

const work = fs.mkdtempSync(path.join(os.tmpdir(), "ta-formats-"));
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

interface Shape {
  name: string;
  /** Fixture file (or folder) copied into the audit's data folder, unless `write` writes it. */
  file: string;
  write?: (target: string) => Promise<void> | void;
  /** Lines added to the dataset in audit.yaml (columns included). */
  keys: string[];
}

const BY_NAME = ["columns: { Q: Q_meV, dN: n }"];
const BY_POSITION = ["columns: { Q: 2, dN: 3 }"];

/** The comma file's rows as three Parquet parts in a hive-style partition folder, as a distributed engine writes them. */
async function writeParquetParts(target: string): Promise<void> {
  const columns = await commaColumns();
  fs.mkdirSync(path.join(target, "seed=20"), { recursive: true });
  for (const [i, [start, end]] of [[0, 80], [80, 160], [160, 240]].entries()) {
    const part = Object.fromEntries(Object.entries(columns).map(([name, values]) => [name, values.slice(start, end)]));
    writeSamplesParquet(path.join(target, "seed=20", `part-000${i}.parquet`), part);
  }
}

const REFERENCE: Shape = { name: "comma-separated text", file: "comma.csv", keys: BY_NAME };

const SHAPES: Shape[] = [
  { name: "tab-separated text", file: "tab.tsv", keys: BY_NAME },
  { name: "semicolons with decimal commas", file: "semicolon-decimal-comma.csv", keys: ["format: semicolon", "decimal: comma", ...BY_NAME] },
  { name: "fixed-width columns (runs of whitespace)", file: "whitespace.dat", keys: ["format: whitespace", ...BY_NAME] },
  { name: "no header, columns by position", file: "no-header.csv", keys: ["header: false", ...BY_POSITION] },
  { name: "an instrument preamble skipped", file: "preamble.txt", keys: ["skip_lines: 3", ...BY_NAME] },
  { name: "gzip (gzip -n)", file: "comma.csv.gz", keys: BY_NAME },
  { name: "Zstandard (zstd)", file: "comma.csv.zst", keys: BY_NAME },
  { name: "three CSV parts in a folder", file: "parts", keys: BY_NAME },
  { name: "three Parquet parts in a hive-style partition folder (hyparquet-writer)", file: "parquet-parts", write: writeParquetParts, keys: BY_NAME },
  { name: "Parquet (hyparquet-writer)", file: "samples.parquet", write: async (target) => writeSamplesParquet(target, await commaColumns()), keys: BY_NAME },
  { name: "HDF5 compound table (h5py; big-endian f8, i2 members, chunked and deflated)", file: "compound.h5", keys: ["dataset: /runs/exchange", ...BY_NAME] },
  { name: "HDF5 one 1-D dataset per column (h5py; f4, big-endian i8)", file: "columns.h5", keys: ["columns: { Q: /runs/Q, dN: /runs/n }"] },
  { name: ".npy structured array (numpy.save; f4, i1 fields)", file: "structured.npy", keys: BY_NAME },
  { name: ".npy format 2.0 (4-byte header length)", file: "structured-v2.npy", keys: BY_NAME },
  { name: ".npy format 3.0 (UTF-8 header: a field named ΔN)", file: "structured-v3.npy", keys: ["columns: { Q: Q_meV, dN: ΔN }"] },
  { name: ".npy 2-D, Fortran order, big-endian f8", file: "matrix-fortran.npy", keys: BY_POSITION },
  { name: ".npy 2-D, C order, binary16", file: "matrix-half.npy", keys: BY_POSITION },
  { name: ".npz stored members (numpy.savez)", file: "stored.npz", keys: BY_NAME },
  { name: ".npz deflated members (numpy.savez_compressed)", file: "deflated.npz", keys: BY_NAME },
];

/** The result document as `run --json` prints it, with what names the file replaced by placeholders. */
async function resultWithoutFileIdentity(shape: Shape): Promise<string> {
  const { result } = await runAudit(await formatsAudit(work, shape.file, shape.keys, shape.write));
  const document = structuredClone(result) as unknown as { fingerprint: string; datasets: Record<string, unknown>[] };
  document.fingerprint = "<fingerprint>";
  for (const d of document.datasets) {
    d.file = "<file>";
    d.sha256 = "<sha256>";
    if ("format" in d) d.format = "<format>";
  }
  return JSON.stringify(document, null, 2).replaceAll(`data/${shape.file}`, "<file>");
}

describe("one samples dataset in every file shape", () => {
  // Run once, by whichever test asks first (tests may be picked out with -t).
  let reference: Promise<string> | null = null;
  const referenceResult = () => (reference ??= resultWithoutFileIdentity(REFERENCE));

  it("the comma-separated reference runs every check on all 240 rows", async () => {
    const parsed = JSON.parse(await referenceResult()) as { datasets: { rows: number }[]; checks: unknown[] };
    expect(parsed.datasets[0].rows).toBe(240);
    expect(parsed.checks.length).toBeGreaterThan(0);
  });

  for (const shape of SHAPES) {
    it(`${shape.name} gives the reference's result document`, async () => {
      expect(await resultWithoutFileIdentity(shape)).toBe(await referenceResult());
    });
  }
});
