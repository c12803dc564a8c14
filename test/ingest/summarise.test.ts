// `transport-audit summarise` writes the cell summary of one part of a large samples dataset, and an audit
// may name summaries instead of raw parts. The claim tested: merging the summaries of the parts gives
// exactly (to the last bit) the realisations, column totals, cells and check results of reading the raw
// parts, because both summarise each part on the grid the configuration alone gives and merge the same
// tables in the same order. The raw rows themselves are the outside reference for the totals: the number
// of realisations is the number of rows, and ΔN's total is an exact integer sum.
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { DataError } from "../../src/errors.ts";
import { loadAuditDefinition } from "../../src/config/loadAudit.ts";
import type { SamplesDatasetConfig } from "../../src/config/types.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { loadSamples } from "../../src/ingest/samples.ts";
import { summarisePart } from "../../src/ingest/sources/summary/summarisePart.ts";
import type { SamplesDataset } from "../../src/ingest/types.ts";
import { runChecks } from "../../src/report/runAudit.ts";
import { sampleTilted } from "../../src/synth/tiltedFamily.ts";
import { betaPerMeV } from "../../src/synth/units.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { datasetDigest } from "../../src/ingest/fileDigest.ts";
import { TOOL } from "../../src/version.ts";
import { cli } from "../helpers/cliInProcess.ts";
import { rejectedWith } from "../helpers/thrown.ts";
import { tempAudit } from "../helpers/tempAudit.ts";

const PARTS = ["data/runs/part-0.csv", "data/runs/part-1.csv", "data/runs/part-2.csv"];

/** audit.yaml of one samples dataset over `file`, heat and work in `unit`, a fixed seed (so random streams do not depend on the files' digests). */
function yaml(file: string, unit = "meV"): string {
  return `id: summaries
title: Summaries of parts
authors: [{ name: "Test Author" }]
settings: { seed: 11 }
datasets:
  - id: runs
    kind: samples
    file: "${file}"
    columns: { W: W, Q: Q, dN: dN }
    energy_unit: ${unit}
    reservoirs:
      A: { T: 1.3, mu: 0.05 }
      B: { T: 1.0, mu: 0 }
    tau: 1.0e-9
    work: measured
checks: all
`;
}

/** Three parts drawn from an exactly tilted family at the declared reservoirs (src/synth/tiltedFamily.ts), 6 decimals as a code prints them. */
function partFiles(rows = 3000): Record<string, string> {
  const bA = betaPerMeV(1.3);
  const bB = betaPerMeV(1.0);
  const family = { theta: { W: (bA + bB) / 2, Q: bB - bA, N: bA * 0.05 }, spreadW: 0.1, spreadQ: 0.3, correlation: 0.2, intensity: 1.5 };
  const files: Record<string, string> = {};
  PARTS.forEach((p, k) => {
    const { W, Q, dN } = sampleTilted(family, rows, rngFromText(`part ${k}`));
    const lines = ["W,Q,dN"];
    for (let i = 0; i < rows; i++) lines.push(`${W[i].toFixed(6)},${Q[i].toFixed(6)},${dN[i]}`);
    files[p] = `${lines.join("\n")}\n`;
  });
  return files;
}

/** The raw parts read as a large dataset (summarised, however small), in this thread. */
async function rawParts(dir: string): Promise<SamplesDataset> {
  const config = loadAuditDefinition(dir).datasets[0] as SamplesDatasetConfig;
  return loadSamples(config, path.join(dir, config.file), "datasets[0]", { auditDir: dir, reduceAboveBytes: 0, threads: false });
}

async function summariseAll(dir: string, parts = PARTS): Promise<void> {
  for (const p of parts) await summarisePart({ part: path.join(dir, p) }, { threads: false });
}

/** Every array and count of a summarised dataset that the checks read. */
function cellsOf(d: SamplesDataset) {
  return { rows: d.rows, realisations: d.realisations, W: d.W, Q: d.Q, dN: d.dN, sigma: d.sigma, weight: d.weight, dE_A: d.dE_A, reduction: d.reduction };
}

describe("summaries of parts", () => {
  it("merge into exactly the cells, totals and check results of the raw parts", async () => {
    const dir = tempAudit(yaml("data/runs"), partFiles());
    const raw = await rawParts(dir);
    await summariseAll(dir);
    for (const p of PARTS) fs.renameSync(path.join(dir, `${p}.summary`), path.join(dir, "data", `${path.basename(p)}.summary`));
    // The summaries alone, named by a glob, without the raw parts.
    fs.writeFileSync(path.join(dir, "audit.yaml"), yaml("data/part-*.csv.summary"));
    const audit = await ingestAudit(dir);
    const summarised = audit.datasets[0] as SamplesDataset;
    // Reference: the raw rows. 9000 rows, one realisation each.
    expect(raw.realisations).toBe(9000);
    expect(summarised.realisations).toBe(9000);
    // Bit-identical arrays (toEqual on Float64Arrays compares every element with Object.is semantics).
    expect(cellsOf(summarised)).toEqual(cellsOf(raw));
    // The same verdicts and values of every check (a fixed seed: the random streams do not depend on the digest).
    const definition = loadAuditDefinition(dir);
    const rawResults = runChecks({ dir, definition, datasets: [raw] });
    expect(runChecks(audit)).toEqual(rawResults);
    expect(rawResults.length).toBeGreaterThan(5);
    // The digest is that of the files read (the summaries), as verify recomputes it; the format says so.
    expect(summarised.sha256).toBe(datasetDigest(dir, "data/part-*.csv.summary", "datasets[0].file"));
    expect(summarised.format).toBe("3 part(s) of comma-separated text (detected), 3 of them from summaries (transport-audit summarise)");
  });

  it("stand in for their parts beside them, and mix with raw parts", async () => {
    const dir = tempAudit(yaml("data/runs"), partFiles(1500));
    const raw = await rawParts(dir);
    await summariseAll(dir, PARTS.slice(0, 2)); // part-2 stays raw; part-0 and part-1 have their summary beside them
    const mixed = await rawParts(dir);
    expect(cellsOf(mixed)).toEqual(cellsOf(raw));
    // The digest covers every file listed: the parts and their summaries.
    expect(mixed.sha256).toBe(datasetDigest(dir, "data/runs", "datasets[0].file"));
  });

  it("are refused when the part beside them changed after summarising", async () => {
    const dir = tempAudit(yaml("data/runs"), partFiles(500));
    await summariseAll(dir, PARTS.slice(0, 1));
    fs.appendFileSync(path.join(dir, PARTS[0]), "0.1,0.2,1\n");
    const err = await rejectedWith(DataError, () => ingestAudit(dir));
    const now = (await import("node:crypto")).createHash("sha256").update(fs.readFileSync(path.join(dir, PARTS[0]))).digest("hex");
    expect(err.message).toMatch(
      new RegExp(`^data/runs/part-0\\.csv\\.summary: was written from a file with SHA-256 [0-9a-f]{64}, but the part data/runs/part-0\\.csv beside it has SHA-256 ${now}; the part changed after it was summarised: summarise it again, or remove the stale summary$`),
    );
  });

  it("are refused when they would count a part twice", async () => {
    const dir = tempAudit(yaml("data/runs"), partFiles(500));
    await summariseAll(dir, PARTS.slice(0, 1));
    fs.renameSync(path.join(dir, `${PARTS[0]}.summary`), path.join(dir, "data/runs/copy-of-0.summary"));
    const sha = (await import("node:crypto")).createHash("sha256").update(fs.readFileSync(path.join(dir, PARTS[0]))).digest("hex");
    expect((await rejectedWith(DataError, () => ingestAudit(dir))).message).toBe(
      `data/runs/part-0.csv: holds the same part as data/runs/copy-of-0.summary (SHA-256 ${sha}); its realisations would count twice: keep one of them`,
    );
  });

  it("are refused when the audit gives another grid, naming what differs", async () => {
    const dir = tempAudit(yaml("data/runs"), partFiles(500));
    await summariseAll(dir);
    // The audit now reads the energies in µeV: the unit and the chemical potential's share of Σ change
    // (a_N = β_A μ_A, μ_A = 0.05 of the unit: 0.05 meV/(k_B 1.3 K) = 0.4463 against 0.05 µeV/(k_B 1.3 K) = 4.463e-4).
    fs.writeFileSync(path.join(dir, "audit.yaml"), yaml("data/runs/*.summary", "ueV"));
    const message = (await rejectedWith(DataError, () => ingestAudit(dir))).message;
    expect(message).toBe(
      `data/runs/part-0.csv.summary: was summarised on another grid than this audit gives the dataset (written by transport-audit ${TOOL.version} for dataset "runs"), so its cells cannot be merged: ` +
        "energy unit (J): the audit gives 1.602176634e-25, the summary has 1.6021766339999998e-22; " +
        "Σ coefficients (work, Q, ΔN): the audit gives [6.407243148804544e+22,1.6714547344707515e+22,0.0004463276200596185], the summary has [6.407243148804544e+22,1.6714547344707515e+22,0.44632762005961846]; " +
        "summarise the part again with this audit.yaml",
    );
  });

  it("are refused when damaged or truncated", async () => {
    const dir = tempAudit(yaml("data/runs/*.summary"), partFiles(500));
    await summariseAll(dir);
    const file = path.join(dir, `${PARTS[1]}.summary`);
    const bytes = fs.readFileSync(file);
    fs.writeFileSync(file, bytes.subarray(0, bytes.length - 5));
    expect((await rejectedWith(DataError, () => ingestAudit(dir))).message).toMatch(
      /^data\/runs\/part-1\.csv\.summary: the summary's cells take \d+ bytes, but its header announces \d+ \(the file is truncated or damaged\)$/,
    );
    bytes[bytes.length - 3] ^= 1;
    fs.writeFileSync(file, bytes);
    expect((await rejectedWith(DataError, () => ingestAudit(dir))).message).toBe(
      "data/runs/part-1.csv.summary: the summary's cells do not match the SHA-256 its header records (the file is damaged)",
    );
  });
});

describe("transport-audit summarise", () => {
  it("writes <part>.summary and says what it summarised; refuses what it cannot summarise with exit 2", async () => {
    const dir = tempAudit(yaml("data/runs"), partFiles(400));
    const part = path.join(dir, PARTS[0]);
    const r = await cli(["summarise", part]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const sha = (await import("node:crypto")).createHash("sha256").update(fs.readFileSync(part)).digest("hex");
    expect(r.stdout).toMatch(new RegExp(`^${part.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}\\.summary: 400 rows of .* \\(SHA-256 ${sha}\\) in \\d+ cells over 2 table\\(s\\), for dataset runs\\n$`));
    expect(fs.existsSync(`${part}.summary`)).toBe(true);

    const again = await cli(["summarise", `${part}.summary`]);
    expect(again.code).toBe(2);
    expect(again.stderr).toBe(`error: ${part}.summary: is already a summary; summarise the raw part it came from\n`);

    const badOut = await cli(["summarise", part, "--out", path.join(dir, "x.bin")]);
    expect(badOut.code).toBe(2);
    expect(badOut.stderr).toBe(`error: --out: ${JSON.stringify(path.join(dir, "x.bin"))} must end in .summary, which is how an audit tells a summary from a raw part\n`);

    const noDataset = await cli(["summarise", part, "--dataset", "other"]);
    expect(noDataset.code).toBe(2);
    expect(noDataset.stderr).toBe(`error: --dataset: audit.yaml in ${dir} has no samples dataset "other"; its samples datasets are runs\n`);
  });
});

describe("summaries written by the command", () => {
  it("on worker threads, of parts written by the fixture script, merge as the raw parts read in one thread", async () => {
    // The three CSV parts of the format fixtures (scripts/fixtures/write_formats.py, written by Python).
    const parts = path.resolve("test/ingest/fixtures/formats/parts");
    const yamlOf = (file: string) =>
      `id: fixture-parts\ntitle: Parts\nauthors: [{ name: "Test Author" }]\nsettings: { seed: 20 }\ndatasets:\n  - id: exchange\n    kind: samples\n    file: "${file}"\n    columns: { Q: Q_meV, dN: n }\n    energy_unit: meV\n    reservoirs:\n      A: { T: 1.3, mu: 0.0 }\n      B: { T: 1.0, mu: 0.0 }\n    work: zero\n`;
    const files: Record<string, string> = {};
    for (const f of fs.readdirSync(parts)) files[`data/parts/${f}`] = fs.readFileSync(path.join(parts, f), "utf8");
    const dir = tempAudit(yamlOf("data/parts"), files);
    const raw = await rawParts(dir);
    for (const f of fs.readdirSync(parts)) {
      const r = await cli(["summarise", path.join(dir, "data/parts", f), "--out", path.join(dir, "data", `${f}.summary`)]);
      expect(r.code).toBe(0);
    }
    fs.writeFileSync(path.join(dir, "audit.yaml"), yamlOf("data/*.summary"));
    const summarised = (await ingestAudit(dir)).datasets[0] as SamplesDataset;
    expect(summarised.realisations).toBe(240);
    expect(cellsOf(summarised)).toEqual(cellsOf(raw));
  });
});
