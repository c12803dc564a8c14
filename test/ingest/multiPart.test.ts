// Multi-part datasets: `file:` a folder or a glob of parts (hive-style partition folders included). The
// parts must give what the same rows in one file give, the digest must be the one `sha256sum` and `sort`
// (GNU coreutils) compute over the parts, and bad parts are named.
import fs from "node:fs";
import path from "node:path";
import { execSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { ConfigError, DataError } from "../../src/errors.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { loadSamples } from "../../src/ingest/samples.ts";
import { loadAuditDefinition } from "../../src/config/loadAudit.ts";
import { datasetDigest } from "../../src/ingest/fileDigest.ts";
import type { SamplesDataset } from "../../src/ingest/types.ts";
import type { SamplesDatasetConfig } from "../../src/config/types.ts";
import { rejectedWith } from "../helpers/thrown.ts";
import { auditWith, VALID_YAML } from "../robustness/harness.ts";

/** Rows of heat (meV) and particles from a fixed linear congruential sequence (Numerical Recipes constants). */
function rows(n: number, seed: number): string[] {
  let s = seed >>> 0;
  const next = () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296;
  return Array.from({ length: n }, () => `${(next() * 2 - 0.7).toFixed(6)},${Math.floor(next() * 5) - 2}`);
}

const PART_ROWS = [rows(400, 1), rows(250, 2), rows(350, 3)];
const PART_FILES = ["data/runs/seed=1/part-0000.csv", "data/runs/seed=2/part-0000.csv", "data/runs/seed=3/part-0000.csv"];

/** An audit whose dataset is `file` and whose folder holds the three parts (and the same rows as one file). */
function partsAudit(file: string, parts: Record<string, string> = {}): string {
  const files: Record<string, string> = { "data/all.csv": `q,n\n${PART_ROWS.flat().join("\n")}\n` };
  PART_FILES.forEach((p, k) => (files[p] = `q,n\n${PART_ROWS[k].join("\n")}\n`));
  return auditWith(VALID_YAML.replace("file: data/run.csv", `file: "${file}"`), { ...files, ...parts });
}

async function samplesOf(dir: string): Promise<SamplesDataset> {
  return (await ingestAudit(dir)).datasets[0] as SamplesDataset;
}

/** The digest of the parts as coreutils computes it: `sha256sum` of each part, sorted by path, hashed again. */
function coreutilsDigest(dir: string, parts: string[]): string {
  return execSync(`sha256sum ${parts.join(" ")} | LC_ALL=C sort -k2 | sha256sum`, { cwd: dir, encoding: "utf8" }).split(" ")[0];
}

describe("a dataset in parts", () => {
  it("reads a folder of hive-style partitions as the same rows as one file, in sorted part order", async () => {
    const dir = partsAudit("data/runs");
    const parts = await samplesOf(dir);
    const whole = (await ingestAudit(auditWith(VALID_YAML.replace("file: data/run.csv", "file: data/all.csv"), { "data/all.csv": fs.readFileSync(path.join(dir, "data/all.csv"), "utf8") }))).datasets[0] as SamplesDataset;
    expect(parts.rows).toBe(1000);
    expect(Array.from(parts.Q)).toEqual(Array.from(whole.Q));
    expect(Array.from(parts.dN)).toEqual(Array.from(whole.dN));
    expect(Array.from(parts.sigma)).toEqual(Array.from(whole.sigma));
    expect(parts.format).toBe("3 part(s) of comma-separated text (detected)");
  });

  it("takes a glob, and records the digest sha256sum and sort give over the parts", async () => {
    const dir = partsAudit("data/runs/seed=*/part-*.csv");
    const d = await samplesOf(dir);
    expect(d.rows).toBe(1000);
    expect(d.sha256).toBe(coreutilsDigest(dir, PART_FILES));
    expect(datasetDigest(dir, "data/runs/seed=*/part-*.csv", "datasets[0].file")).toBe(d.sha256);
  });

  it("summarises large parts with one grid and merges their cells: the realisations and column totals of the raw rows", async () => {
    const dir = partsAudit("data/runs");
    const config = loadAuditDefinition(dir).datasets[0] as SamplesDatasetConfig;
    const options = { auditDir: dir, reduceAboveBytes: 0, threads: false };
    const summarised = await loadSamples(config, path.join(dir, "data/runs"), "datasets[0]", options);
    const raw = await samplesOf(dir);
    expect(summarised.reduction).not.toBeNull();
    expect(summarised.realisations).toBe(1000);
    const total = (d: SamplesDataset, x: Float64Array) => x.reduce((a, v, i) => a + v * (d.weight ? d.weight[i] : 1), 0);
    // Sums taken in another order: equal up to the rounding of 1000 additions (relative 1e-12 is generous).
    expect(Math.abs(total(summarised, summarised.Q) - total(raw, raw.Q))).toBeLessThan(1e-12 * raw.Q.reduce((a, v) => a + Math.abs(v), 0));
    expect(total(summarised, summarised.dN)).toBe(total(raw, raw.dN));
    expect(summarised.sha256).toBe(raw.sha256);
  });

  it("refuses a part with other columns, naming it and both sets of columns", async () => {
    const dir = partsAudit("data/runs", { "data/runs/seed=2/part-0000.csv": "q,n,extra\n1,2,3\n" });
    expect((await rejectedWith(DataError, () => ingestAudit(dir))).message).toBe(
      'data/runs/seed=2/part-0000.csv: its columns ("q", "n", "extra") differ from those of data/runs/seed=1/part-0000.csv ("q", "n"); every part of a multi-part dataset needs the same columns',
    );
  });

  it("names the part, line and column of a bad cell", async () => {
    const dir = partsAudit("data/runs", { "data/runs/seed=3/part-0000.csv": "q,n\n0.5,1\n0.25,two\n" });
    expect((await rejectedWith(DataError, () => ingestAudit(dir))).message).toBe('data/runs/seed=3/part-0000.csv:3, column "n": expected a number, found "two"');
  });

  it("refuses a glob that matches nothing, naming the key", async () => {
    const dir = partsAudit("data/runs/seed=*/*.parquet");
    expect((await rejectedWith(ConfigError, () => ingestAudit(dir))).message).toBe('audit.yaml datasets[0].file: no file matches "data/runs/seed=*/*.parquet"');
  });
});
