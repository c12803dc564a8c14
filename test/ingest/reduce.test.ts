// Large samples files are summarised into cells while they are read (src/ingest/reduce). These tests hold
// the summary to what it claims: the grid's arithmetic (exact integer identities), the quantities kept
// exactly (counts, column totals, sums of e^−Σ: checked against the raw rows), independence from how the
// file is cut and from threads, the reference reader's messages, and — the point of it all — the same
// verdicts as the exact computation on the raw rows, on medium data drawn from laws with known answers.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CellTable, coarserIndex, columnLevel, keyOrder, MAX_LEVEL, mergeCellTables, type GridSpec } from "../../src/ingest/reduce/cellTable.ts";
import { loadAuditDefinition } from "../../src/config/loadAudit.ts";
import { loadSamples, type SamplesReadOptions } from "../../src/ingest/samples.ts";
import { describeReduction } from "../../src/ingest/reduce/describeReduction.ts";
import { cachedWorkerBundle, digestOfInputs, privateBundleDir, removeStaleBundles, workerBundle, type BundleIndex } from "../../src/ingest/reduce/parallelReduce.ts";
import type { Dataset, IngestedAudit, SamplesDataset } from "../../src/ingest/types.ts";
import type { SamplesDatasetConfig } from "../../src/config/types.ts";
import { runChecks } from "../../src/report/runAudit.ts";
import type { CheckDefinition, CheckResult } from "../../src/checks/types.ts";
import { sampleTilted, type TiltedFamily } from "../../src/synth/tiltedFamily.ts";
import { betaPerMeV } from "../../src/synth/units.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { currentMoments, withinCellScatter } from "../../src/checks/helpers.ts";
import { weightedMoments } from "../../src/stats/weightedMoments.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { writeSamplesParquet } from "../helpers/writeSamplesParquet.ts";

const REDUCE: SamplesReadOptions = { reduceAboveBytes: 0 };
const EXACT: SamplesReadOptions = { reduceAboveBytes: Infinity };

/** Exactly tilted family at reservoirs (TA, TB, μ_A) in K and meV (src/synth/tiltedFamily.ts). */
function family(TA: number, TB: number, muA: number, work: boolean): TiltedFamily {
  const bA = betaPerMeV(TA);
  const bB = betaPerMeV(TB);
  return { theta: { W: (bA + bB) / 2, Q: bB - bA, N: bA * muA }, spreadW: work ? 0.1 : 0, spreadQ: 0.3, correlation: 0.2, intensity: 1.5 };
}

interface Scenario {
  name: string;
  rows: number;
  columns: string; // YAML mapping
  header: string;
  line: (W: number, Q: number, dN: number) => string;
  work: "measured" | "zero";
  drawn: TiltedFamily;
  declared: { TA: number; TB: number; muA: number };
}

/** audit.yaml of one `samples` dataset `runs` (data/runs.csv, meV) at reservoirs (TA, TB, μ_A) in K and meV, all checks. */
function runsAuditYaml(name: string, columns: string, declared: Scenario["declared"], work: Scenario["work"]): string {
  return `id: reduce-${name}
title: Reduction test ${name}
authors: [{ name: "Test Author" }]
datasets:
  - id: runs
    kind: samples
    file: data/runs.csv
    columns: ${columns}
    energy_unit: meV
    reservoirs:
      A: { T: ${declared.TA}, mu: ${declared.muA} }
      B: { T: ${declared.TB}, mu: 0 }
    tau: 1.0e-9
    work: ${work}
checks: all
`;
}

function auditFor(s: Scenario, seed: string): string {
  const { W, Q, dN } = sampleTilted(s.drawn, s.rows, rngFromText(seed));
  const lines = [s.header];
  for (let i = 0; i < s.rows; i++) lines.push(s.line(W[i], Q[i], dN[i]));
  return tempAudit(runsAuditYaml(s.name, s.columns, s.declared, s.work), { "data/runs.csv": `${lines.join("\n")}\n` });
}

/** Σ over a dataset's rows or cells of multiplicity × f(i). */
function weightedTotal(d: SamplesDataset, f: (i: number) => number): number {
  let s = 0;
  for (let i = 0; i < d.sigma.length; i++) s += (d.weight ? d.weight[i] : 1) * f(i);
  return s;
}

async function loadBoth(dir: string, file = "data/runs.csv"): Promise<{ exact: SamplesDataset; reduced: SamplesDataset; definition: ReturnType<typeof loadAuditDefinition> }> {
  const definition = loadAuditDefinition(dir);
  const config = definition.datasets[0] as SamplesDatasetConfig;
  const exact = await loadSamples(config, path.join(dir, file), "datasets[0]", EXACT);
  const reduced = await loadSamples(config, path.join(dir, file), "datasets[0]", REDUCE);
  return { exact, reduced, definition };
}

function statuses(dir: string, definition: ReturnType<typeof loadAuditDefinition>, d: SamplesDataset): Record<string, string> {
  const out: Record<string, string> = {};
  for (const r of runChecks({ dir, definition, datasets: [d] })) out[`${r.check}/${r.dataset}`] = r.status;
  return out;
}

const fixed6 = (x: number) => x.toFixed(6);

/** W, Q and ΔN columns, drawn from `drawn`, declared at T_A = 1.3 K, T_B = 1 K, μ_A = 0.05 meV. */
const withWork = (name: string, drawn: TiltedFamily, rows = 200_000): Scenario => ({
name,
rows,
  columns: "{ W: W, Q: Q, dN: dN }",
  header: "W,Q,dN",
  line: (W, Q, dN) => `${fixed6(W)},${fixed6(Q)},${dN}`,
  work: "measured",
  drawn,
  declared: { TA: 1.3, TB: 1.0, muA: 0.05 },
});

describe("reduction worker bundles", () => {
  it("removes other versions' bundles unused for a week, and nothing else", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "bundles-"));
    const name = (digest: string) => `transport-audit-reduce-worker-${digest}.mjs`;
    const weekAndADay = (8 * 24 * 3600 * 1000) / 1000;
    const files = { keep: name("a".repeat(16)), stale: name("b".repeat(16)), recent: name("c".repeat(16)), other: "transport-audit-notes.txt" };
    for (const f of Object.values(files)) fs.writeFileSync(path.join(dir, f), "");
    const old = Date.now() / 1000 - weekAndADay;
    for (const f of [files.keep, files.stale, files.other]) fs.utimesSync(path.join(dir, f), old, old);
    removeStaleBundles(files.keep, dir);
    expect(fs.readdirSync(dir).sort()).toEqual([files.keep, files.recent, files.other].sort());
    fs.rmSync(dir, { recursive: true, force: true });
  });
});

describe("reduction worker bundle index", () => {
  it("reuses a bundle only while every module it was built from has the same bytes", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "bundle-index-"));
    const bundle = path.join(dir, "bundle.mjs");
    const modules = [path.join(dir, "a.ts"), path.join(dir, "b.js")];
    fs.writeFileSync(bundle, "export {};\n");
    fs.writeFileSync(modules[0], "export const a = 1;\n");
    fs.writeFileSync(modules[1], "export const b = 2;\n");
    const indexFile = path.join(dir, "index.json");
    const index: BundleIndex = { bundle, inputs: modules, digest: digestOfInputs(modules) };
    fs.writeFileSync(indexFile, JSON.stringify(index));
    expect(cachedWorkerBundle(indexFile)).toBe(bundle);
    // One byte changed in one module: the bundle is no longer the code.
    fs.writeFileSync(modules[1], "export const b = 3;\n");
    expect(cachedWorkerBundle(indexFile)).toBeNull();
    fs.writeFileSync(modules[1], "export const b = 2;\n");
    expect(cachedWorkerBundle(indexFile)).toBe(bundle);
    // A module gone, the bundle gone, or no index: no reuse.
    fs.rmSync(bundle);
    expect(cachedWorkerBundle(indexFile)).toBeNull();
    expect(cachedWorkerBundle(path.join(dir, "missing.json"))).toBeNull();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it("keeps bundles in a folder of this user's that nobody else can write, and refuses any other", () => {
    // The system's temporary folder is shared on a cluster's login node: code found there is trusted
    // only inside a directory owned by this user with no group or other write permission (POSIX
    // permission bits; common practice for per-user temporary folders).
    const base = fs.mkdtempSync(path.join(os.tmpdir(), "bundle-dir-"));
    const dir = privateBundleDir(base);
    expect(dir).not.toBeNull();
    const stat = fs.statSync(dir!);
    expect(stat.isDirectory()).toBe(true);
    expect(stat.mode & 0o077).toBe(0);
    expect(privateBundleDir(base)).toBe(dir); // found again as it is
    fs.chmodSync(dir!, 0o777);
    expect(privateBundleDir(base)).toBeNull(); // writable by others: not ours alone
    fs.rmSync(dir!, { recursive: true });
    const elsewhere = fs.mkdtempSync(path.join(os.tmpdir(), "bundle-elsewhere-"));
    fs.symlinkSync(elsewhere, dir!);
    expect(privateBundleDir(base)).toBeNull(); // a symbolic link, whatever it points to
    fs.rmSync(dir!);
    fs.writeFileSync(dir!, "");
    expect(privateBundleDir(base)).toBeNull(); // a file in its place
    fs.rmSync(base, { recursive: true, force: true });
    fs.rmSync(elsewhere, { recursive: true, force: true });
  });

  it("records the worker's own modules beside the bundle esbuild writes", async () => {
    const bundle = await workerBundle();
    expect(bundle).not.toBeNull();
    // The index of this install names the bundle just written (or one of identical code) and its modules.
    const dir = privateBundleDir()!;
    expect(path.dirname(bundle!)).toBe(dir);
    const indexes = fs.readdirSync(dir).filter((f) => /^transport-audit-reduce-worker-index-[0-9a-f]{16}\.json$/.test(f));
    const ours = indexes.map((f) => JSON.parse(fs.readFileSync(path.join(dir, f), "utf8")) as BundleIndex).find((i) => i.inputs.some((p) => p.endsWith(path.join("src", "ingest", "reduce", "worker.ts")) && p.startsWith(path.resolve("src"))));
    expect(ours).toBeDefined();
    expect(ours!.inputs).toContain(path.resolve("src/ingest/reduce/cellTable.ts"));
    expect(ours!.inputs).toContain(path.resolve("src/ingest/fast/scanLines.ts"));
  });
});

describe("cell grid arithmetic", () => {
  it("nests levels exactly and keeps mirrored cells mirrored (integer identities)", () => {
    // ⌊(⌊(k + a)/p⌋ + b)/q⌋ = ⌊(k + a + p b)/(p q)⌋ for integers (Graham, Knuth & Patashnik, Concrete
    // Mathematics, §3.2, from memory): going up two levels at once equals going up one at a time; and the
    // centred cells of width 3^L are symmetric, so cell −k is the mirror of cell k at every level.
    for (let k = -500; k <= 500; k++) {
      for (let a = 0; a <= 4; a++) {
        for (let b = a; b <= 5; b++) {
          expect(coarserIndex(coarserIndex(k, 0, a), a, b)).toBe(coarserIndex(k, 0, b));
          expect(coarserIndex(-k, 0, b) + 0).toBe(-coarserIndex(k, 0, b) + 0);
        }
      }
    }
  });
});

/**
 * A grid over (Σ, ΔN) as the reduction uses it: Σ on steps of `step` k_B, ΔN whole (it widens only
 * once Σ can widen no more), with a current and ΔN stored.
 */
function sigmaCountGrid(step: number, capacity: number): GridSpec {
  return {
    dims: 2,
    step0: Float64Array.from([step, 1]),
    delay: Float64Array.from([0, Infinity]),
    maxColumnLevel: Float64Array.from([Infinity, Infinity]),
    stored: 2,
    pairs: [[0, 0], [0, 1], [1, 1]],
    capacity,
    startLevel: 0,
  };
}

describe("cell table", () => {
  it("gives bit for bit the cells of row-by-row insertion when rows come in blocks, also across a change of level", () => {
    // Each cell's rows wait in one partition's queue in their order, and add() and addRows() fill the
    // same queues, so every floating-point sum is formed in the same order: exact equality, whether or
    // not the table goes up a level on the way (capacity 3000 makes it).
    for (const capacity of [100_000, 3000]) check(capacity);
  });

  it("reads a part's keys the same way in the merge when only that part had to widen its whole-number column", () => {
    // More distinct counts than the capacity: one part's table goes past MAX_LEVEL, where its count
    // column widens too; the other part stays low. The level alone fixes how each column is cut
    // (columnLevel), so the merge must equal one table that received every row at the final level.
    // Σ and the counts are whole multiples of the step, so every sum is exact and equality is exact.
    const spec = sigmaCountGrid(2 ** -4, 64);
    const rows = (n: number, counts: number, seed: string) => {
      const rng = rngFromText(seed);
      return Array.from({ length: n }, () => ({ sigma: Math.round(16 * rng.normal()) / 16, n: Math.floor(rng.uniform() * counts) - Math.floor(counts / 2) }));
    };
    const wide = rows(2000, 400, "cell-table:wide-counts");
    const narrow = rows(2000, 12, "cell-table:narrow-counts");
    const fill = (table: CellTable, part: { sigma: number; n: number }[]) => {
      for (const r of part) table.add(Float64Array.of(r.sigma, r.n), Float64Array.of(r.sigma, r.n), 1, r.sigma);
      return table;
    };
    const a = fill(new CellTable(spec), wide);
    const b = fill(new CellTable(spec), narrow);
    // (Rows wait in queues; exporting adds them and lets the table go up as it must.)
    expect(a.export().level).toBeGreaterThan(MAX_LEVEL); // 400 distinct counts do not fit in 64 cells otherwise
    expect(b.export().level).toBeLessThanOrEqual(MAX_LEVEL);
    for (const sorted of [true, false]) {
      const merged = mergeCellTables(spec, [a, b].map((t) => (sorted ? t.exportSorted() : t.export())));
      const once = fill(new CellTable({ ...spec, startLevel: merged.level, capacity: 1 << 20 }), [...wide, ...narrow]);
      const reference = mergeCellTables({ ...spec, capacity: 1 << 20 }, [once.exportSorted()]);
      expect(merged.level).toBe(reference.level);
      expect(Array.from(merged.keys)).toEqual(Array.from(reference.keys));
      expect(Array.from(merged.count)).toEqual(Array.from(reference.count));
      expect(Array.from(merged.sums)).toEqual(Array.from(reference.sums));
      expect(merged.cells).toBeLessThanOrEqual(spec.capacity);
    }
    // The merged cells' count keys are at the level of the widened part: each count cell is 3^l counts wide.
    expect(columnLevel(a.level, Infinity)).toBeGreaterThan(0);
  });

  it("merges sorted parts in one pass to the same bits as absorbing them into a table", () => {
    // Workers send their parts sorted; the linear merge must repeat absorb's arithmetic exactly
    // (first part's reference Σ, e^−Σ sums rescaled to it, sums in part order).
    const spec = sigmaCountGrid(2 ** -10, 100_000);
    const rng = rngFromText("cell-table:merge");
    const part = () => {
      const table = new CellTable(spec);
      for (let i = 0; i < 30_000; i++) {
        const sigma = 2 * rng.normal();
        const n = Math.round(2 * rng.normal());
        table.add(Float64Array.of(sigma, n), Float64Array.of(1.7 * sigma, n), 1, sigma);
      }
      return table;
    };
    // Four parts, so that a key may be held by any subset of them (each combined in part order).
    const tables = [part(), part(), part(), part()];
    const linear = mergeCellTables(spec, tables.map((t) => t.exportSorted()));
    const general = mergeCellTables(spec, tables.map((t) => t.export()));
    expect(linear.level).toBe(0); // within the capacity: the one-pass merge gave it
    expect(linear.cells).toBe(general.cells);
    expect(linear.cells).toBeLessThan(tables.reduce((a, t) => a + t.size, 0)); // the parts share cells
    for (const field of ["keys", "count", "sums", "productTotals", "sigmaMin", "sigmaMax", "sigmaRef", "expSum"] as const) {
      expect(Array.from(linear[field])).toEqual(Array.from(general[field]));
    }
  });

  it("gives the general merge's bits when sorted parts at one level merge past the capacity before the last part", () => {
    // Four parts of about 1800 cells each on a fine Σ grid, capacity 3000: the first two already hold
    // more cells than that together, so the one-pass merge of sorted parts cannot give the result and
    // the general merge must: the parts absorbed in part order into one table, which goes up a level
    // on the way. The reference does exactly that by hand (then sorts through a merge with room to
    // spare, an exact copy), so the cells must agree to the last bit. (The same parts unsorted would
    // pool cells in another order and differ in the last bits of their sums.)
    const spec = sigmaCountGrid(2 ** -10, 3000);
    const rng = rngFromText("cell-table:merge-past-capacity");
    const part = () => {
      const table = new CellTable(spec);
      for (let i = 0; i < 2500; i++) {
        const sigma = 2 * rng.normal();
        const n = Math.round(2 * rng.normal());
        table.add(Float64Array.of(sigma, n), Float64Array.of(1.7 * sigma, n), 1, sigma);
      }
      return table.exportSorted();
    };
    const sorted = [part(), part(), part(), part()];
    expect(sorted.every((t) => t.level === 0 && t.cells <= spec.capacity)).toBe(true);
    expect(sorted[0].cells + sorted[1].cells).toBeGreaterThan(spec.capacity + 1000); // few keys are shared at this width
    const merged = mergeCellTables(spec, sorted);
    const table = new CellTable(spec);
    for (const p of sorted) table.absorb(p);
    const reference = mergeCellTables({ ...spec, capacity: 1 << 20 }, [table.export()]);
    expect(merged.level).toBeGreaterThan(0);
    expect(merged.cells).toBeLessThanOrEqual(spec.capacity);
    expect(merged.level).toBe(reference.level);
    for (const field of ["keys", "count", "sums", "productTotals", "sigmaMin", "sigmaMax", "sigmaRef", "expSum"] as const) {
      expect(Array.from(merged[field])).toEqual(Array.from(reference[field]));
    }
  });

  it("keeps every total of the rows, however they are split into parts and blocks (property test, fast-check, fixed seed)", () => {
    // Whatever the capacity (so whatever the changes of level), the block sizes, the weights and the
    // number of parts, the merged table must hold the rows' total weight exactly (whole numbers), and
    // their sums, sums of products and sum of w e^−Σ to rounding (rtol 1e-12; the order of additions
    // differs from the reference's plain loop). Cells must stay within the capacity and keep each
    // realisation's Σ inside its cell's range.
    // Most rows share two keys, so that one partition's queue fills and goes in (and the table may
    // change level) while rows are still arriving, as in a large file.
    const rowArb = fc.record({
      sigma: fc.oneof({ arbitrary: fc.double({ min: -6, max: 6, noNaN: true }), weight: 1 }, { arbitrary: fc.constantFrom(-1.5, 0.75), weight: 3 }),
      n: fc.oneof({ arbitrary: fc.integer({ min: -3, max: 3 }), weight: 1 }, { arbitrary: fc.constant(1), weight: 3 }),
      q: fc.double({ min: -2, max: 2, noNaN: true }),
      w: fc.constantFrom(1, 1, 1, 2, 5),
    });
    fc.assert(
      fc.property(
        fc.array(rowArb, { minLength: 1, maxLength: 8000, size: "max" }),
        fc.integer({ min: 1, max: 4 }),
        fc.integer({ min: 1, max: 700 }),
        fc.constantFrom(20, 200, 5000),
        fc.boolean(),
        (rows, parts, block, capacity, sorted) => {
          const spec = sigmaCountGrid(2 ** -8, capacity);
          const tables: CellTable[] = [];
          const per = Math.ceil(rows.length / parts);
          for (let p = 0; p < parts; p++) {
            const table = new CellTable(spec);
            const mine = rows.slice(p * per, (p + 1) * per);
            for (let from = 0; from < mine.length; from += block) {
              const part = mine.slice(from, from + block);
              table.addRows({
                rows: part.length,
                x: Float64Array.from(part.flatMap((r) => [r.sigma, r.n])),
                v: Float64Array.from(part.flatMap((r) => [r.q, r.n])),
                sigma: Float64Array.from(part, (r) => r.sigma),
                weight: Float64Array.from(part, (r) => r.w),
              });
            }
            tables.push(table);
          }
          const merged = mergeCellTables(spec, tables.map((t) => (sorted ? t.exportSorted() : t.export())));
          expect(merged.cells).toBeLessThanOrEqual(Math.max(capacity, 7)); // ΔN alone takes 7 cells before it is pooled
          let count = 0;
          const sums = [0, 0];
          let expSum = 0;
          for (let c = 0; c < merged.cells; c++) {
            count += merged.count[c];
            sums[0] += merged.sums[2 * c];
            sums[1] += merged.sums[2 * c + 1];
            expSum += merged.expSum[c] * Math.exp(-merged.sigmaRef[c]);
            expect(merged.sigmaMin[c]).toBeLessThanOrEqual(merged.sigmaMax[c]);
          }
          const ref = { count: 0, q: 0, n: 0, qq: 0, qn: 0, nn: 0, exp: 0, absQ: 0 };
          for (const r of rows) {
            ref.count += r.w;
            ref.q += r.w * r.q;
            ref.n += r.w * r.n;
            ref.qq += r.w * r.q * r.q;
            ref.qn += r.w * r.q * r.n;
            ref.nn += r.w * r.n * r.n;
            ref.exp += r.w * Math.exp(-r.sigma);
            ref.absQ += r.w * Math.abs(r.q);
          }
          const why = "totals are kept exactly; rtol 1e-12 for the order of additions";
          expect(count).toBe(ref.count);
          expectClose(sums[0], ref.q, { rtol: 1e-12, atol: 1e-12 * ref.absQ + 1e-300, source: why });
          expect(sums[1]).toBe(ref.n); // whole numbers times small weights: exact
          expectClose(merged.productTotals[0], ref.qq, { rtol: 1e-12, atol: 1e-300, source: why });
          expectClose(merged.productTotals[1], ref.qn, { rtol: 1e-12, atol: 1e-12 * ref.qq + 1e-300, source: why });
          expect(merged.productTotals[2]).toBe(ref.nn);
          expectClose(expSum, ref.exp, { rtol: 1e-12, source: why });
        },
      ),
      { numRuns: Number(process.env.FUZZ_RUNS ?? 200), seed: Number(process.env.FUZZ_SEED ?? 20261202) },
    );
  });

  it("orders cells lexicographically by key, through packed numbers or, for a huge range of keys, by comparison", () => {
    // The packed order must equal a plain lexicographic comparison sort (common practice: a stable
    // reference). Keys here include negatives, ties in the leading column, and in the second case a
    // range near 2^40 that makes the box of keys too large to pack.
    const rng = rngFromText("cell-table:order");
    for (const spread of [40, 2 ** 40]) {
      const cells = 5000;
      const keys = new Float64Array(cells * 3);
      for (let c = 0; c < cells; c++) {
        keys[3 * c] = Math.round(rng.normal() * 5);
        keys[3 * c + 1] = Math.round(rng.normal() * spread);
        keys[3 * c + 2] = c; // distinct keys, as a table's are
      }
      const reference = Array.from({ length: cells }, (_, i) => i).sort((a, b) => keys[3 * a] - keys[3 * b] || keys[3 * a + 1] - keys[3 * b + 1] || keys[3 * a + 2] - keys[3 * b + 2]);
      expect(Array.from(keyOrder(keys, 3, cells))).toEqual(reference);
    }
  });
});

function check(capacity: number): void {
  const spec = sigmaCountGrid(2 ** -12, capacity);
  const rng = rngFromText("cell-table:blocks");
  // Enough rows for queues to fill and go in (and the table to change level) before the end.
  const rows = 600_000;
  const x = new Float64Array(rows * 2);
  const v = new Float64Array(rows * 2);
  const sigma = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    sigma[i] = 2 * rng.normal();
    x[2 * i] = sigma[i];
    x[2 * i + 1] = Math.round(3 * rng.normal());
    v[2 * i] = sigma[i] * 1.7;
    v[2 * i + 1] = x[2 * i + 1];
  }
  const one = new CellTable(spec);
  for (let i = 0; i < rows; i++) one.add(x.subarray(2 * i, 2 * i + 2), v.subarray(2 * i, 2 * i + 2), 1, sigma[i]);
  const blocks = new CellTable(spec);
  for (let from = 0; from < rows; from += 4096) {
    const to = Math.min(rows, from + 4096);
    blocks.addRows({ rows: to - from, x: x.slice(2 * from, 2 * to), v: v.slice(2 * from, 2 * to), sigma: sigma.slice(from, to) });
  }
  const a = mergeCellTables(spec, [one.export()]);
  const b = mergeCellTables(spec, [blocks.export()]);
  expect(b.level).toBe(a.level);
  if (capacity < 10_000) expect(a.level).toBeGreaterThan(0);
  for (const field of ["keys", "count", "sums", "productTotals", "sigmaMin", "sigmaMax", "sigmaRef", "expSum"] as const) {
    expect(Array.from(b[field])).toEqual(Array.from(a[field]));
  }
  if (one.level === 0) {
    // Without a change of level, each cell's sums are those of its rows in file order, formed one row
    // at a time: a plain Map over the level-0 keys gives the same doubles.
    const naive = new Map<string, { count: number; sums: number[]; ref: number; exp: number }>();
    for (let i = 0; i < rows; i++) {
      const key = `${Math.floor(x[2 * i] * 2 ** 12 + 0.5)},${x[2 * i + 1]}`;
      let cell = naive.get(key);
      if (!cell) naive.set(key, (cell = { count: 0, sums: [0, 0], ref: sigma[i], exp: 0 }));
      cell.count += 1;
      cell.sums[0] += 1 * v[2 * i];
      cell.sums[1] += 1 * v[2 * i + 1];
      cell.exp += 1 * Math.exp(cell.ref - sigma[i]);
    }
    expect(a.cells).toBe(naive.size);
    for (let c = 0; c < a.cells; c++) {
      const cell = naive.get(`${a.keys[2 * c]},${a.keys[2 * c + 1]}`)!;
      expect([a.count[c], a.sums[2 * c], a.sums[2 * c + 1], a.sigmaRef[c], a.expSum[c]]).toEqual([cell.count, cell.sums[0], cell.sums[1], cell.ref, cell.exp]);
    }
  }
}

describe("cell summary of a samples file", () => {
  const scenario = withWork("exact-sums", family(1.3, 1.0, 0.05, true), 60_000);
  const dir = auditFor(scenario, "reduce:sums");

  it("keeps the number of realisations, every column total and the sum of e^−Σ of the raw rows", async () => {
    const { exact, reduced } = await loadBoth(dir);
    expect(reduced.reduction).not.toBeNull();
    expect(reduced.rows).toBe(exact.rows);
    expect(reduced.realisations).toBe(exact.rows);
    expect(reduced.sha256).toBe(exact.sha256);
    const why = "kept exactly by construction; rtol 1e-10 allows for the different order of additions";
    expectClose(weightedTotal(reduced, (i) => reduced.Q[i]), weightedTotal(exact, (i) => exact.Q[i]), { rtol: 1e-10, source: why });
    expectClose(weightedTotal(reduced, (i) => reduced.W[i]), weightedTotal(exact, (i) => exact.W[i]), { rtol: 1e-10, source: why });
    expectClose(weightedTotal(reduced, (i) => reduced.dN[i]), weightedTotal(exact, (i) => exact.dN[i]), { atol: 1e-6, source: why });
    expectClose(weightedTotal(reduced, (i) => Math.exp(-reduced.sigma[i])), weightedTotal(exact, (i) => Math.exp(-exact.sigma[i])), { rtol: 1e-10, source: why });
    // Second moments: the cells' means plus the kept within-cell scatter give the raw variances
    // (law of total variance), the covariance too.
    for (const [name, ofD] of [["Q", (d: SamplesDataset) => d.Q], ["W", (d: SamplesDataset) => d.W], ["dN", (d: SamplesDataset) => d.dN]] as const) {
      expectClose(currentMoments(reduced, ofD(reduced), name).variance, weightedMoments(ofD(exact)).variance, { rtol: 1e-9, source: `${name}: law of total variance; rounding only` });
    }
    const covariance = (d: SamplesDataset) => {
      const mq = weightedTotal(d, (i) => d.Q[i]) / d.realisations;
      const mw = weightedTotal(d, (i) => d.W[i]) / d.realisations;
      return (weightedTotal(d, (i) => (d.Q[i] - mq) * (d.W[i] - mw)) + withinCellScatter(d, "Q", "W")) / d.realisations;
    };
    expectClose(covariance(reduced), covariance(exact), { rtol: 1e-9, source: "Cov(Q, W): law of total covariance; rounding only" });
    // Each cell's Σ lies within the Σ range of its realisations, which the reduction reports.
    expect(reduced.reduction!.maxSigmaSpread).toBeLessThanOrEqual(reduced.reduction!.steps.sigma * (1 + 1e-9));
  });

  it("gives the same cells whether the parts are reduced on worker threads or in this thread", async () => {
    const definition = loadAuditDefinition(dir);
    const config = definition.datasets[0] as SamplesDatasetConfig;
    const file = path.join(dir, "data/runs.csv");
    const a = await loadSamples(config, file, "datasets[0]", { ...REDUCE, threads: true });
    const b = await loadSamples(config, file, "datasets[0]", { ...REDUCE, threads: false });
    expect(Array.from(a.sigma)).toEqual(Array.from(b.sigma));
    expect(Array.from(a.weight!)).toEqual(Array.from(b.weight!));
    expect(Array.from(a.Q)).toEqual(Array.from(b.Q));
  });

  it("summarises a histogram (a count column) into the same cells as the same realisations listed one a row", async () => {
    // The same realisations, as rows and as counts of distinct rows: the weighted path must give the
    // same cells, counts and sums as the plain one (sums to rounding: a count multiplies where the
    // plain path adds; rtol 1e-12). Values printed to 0.1 meV, so that rows repeat.
    const { W, Q, dN } = sampleTilted(family(1.3, 1.0, 0.05, true), 160_000, rngFromText("reduce:histogram"));
    const rows: string[] = [];
    const counts = new Map<string, number>();
    for (let i = 0; i < W.length; i++) {
      const line = `${W[i].toFixed(1)},${Q[i].toFixed(1)},${dN[i]}`;
      rows.push(line);
      counts.set(line, (counts.get(line) ?? 0) + 1);
    }
    expect(counts.size).toBeLessThan(rows.length / 2);
    const head = (columns: string) => runsAuditYaml("histogram", columns, { TA: 1.3, TB: 1.0, muA: 0.05 }, "measured");
    const plainDir = tempAudit(head("{ W: W, Q: Q, dN: dN }"), { "data/runs.csv": `W,Q,dN\n${rows.join("\n")}\n` });
    const histogramDir = tempAudit(head("{ W: W, Q: Q, dN: dN, count: n }"), {
      "data/runs.csv": `W,Q,dN,n\n${[...counts].map(([line, n]) => `${line},${n}`).join("\n")}\n`,
    });
    const plain = await loadBoth(plainDir);
    const histogram = await loadBoth(histogramDir);
    expect(histogram.reduced.reduction).not.toBeNull();
    expect(histogram.reduced.realisations).toBe(rows.length);
    expect(Array.from(histogram.reduced.weight!)).toEqual(Array.from(plain.reduced.weight!));
    const why = "the same realisations, weighted instead of repeated; rtol 1e-12";
    histogram.reduced.sigma.forEach((x, i) => expectClose(x, plain.reduced.sigma[i], { rtol: 1e-12, atol: 1e-12, source: why }));
    histogram.reduced.Q.forEach((x, i) => expectClose(x, plain.reduced.Q[i], { rtol: 1e-12, atol: 1e-40, source: why }));
    // Verdicts: the summarised histogram against the histogram read row by row (the same file, so the
    // same bootstrap seeds; a different file, such as the plain one, draws other resamples).
    expect(statuses(histogramDir, histogram.definition, histogram.reduced)).toEqual(statuses(histogramDir, histogram.definition, histogram.exact));
  });

  it("widens cells until they fit the capacity, and still keeps the totals", async () => {
    const definition = loadAuditDefinition(dir);
    const config = definition.datasets[0] as SamplesDatasetConfig;
    const file = path.join(dir, "data/runs.csv");
    const small = await loadSamples(config, file, "datasets[0]", { ...REDUCE, cellCapacity: 2000, threads: false });
    expect(small.sigma.length).toBeLessThanOrEqual(2000);
    expect(small.realisations).toBe(60_000);
    const { exact } = await loadBoth(dir);
    const r = weightedTotal(small, (i) => Math.exp(-small.sigma[i]));
    const e = weightedTotal(exact, (i) => Math.exp(-exact.sigma[i]));
    expectClose(r, e, { rtol: 1e-10, source: "sum of e^−Σ is kept exactly at every level" });
  });

  it("widens a count column with Σ when the start of the file shows more distinct counts than the table could hold", async () => {
    // Counts spread over some 30 000 values (a long counting window) with a tiny chemical-potential
    // affinity, so Σ stays of order one. With 16 384 cells the counts alone would overflow the table:
    // kept apart, they would drive every other column past MAX_LEVEL (Σ cells ~5e10 k_B wide). The
    // probe sees over 256 distinct counts (capacity / 64), so the counts widen with Σ instead and
    // Σ's cells stay narrow; the totals stay exact at any width.
    const rng = rngFromText("reduce:many-counts");
    const lines = ["W,Q,dN"];
    for (let i = 0; i < 60_000; i++) lines.push(`${(0.1 * rng.normal()).toFixed(6)},${(0.3 * rng.normal()).toFixed(6)},${Math.round(5000 * rng.normal())}`);
    const yaml = runsAuditYaml("many-counts", "{ W: W, Q: Q, dN: dN }", { TA: 1.3, TB: 1.0, muA: 0.000001 }, "measured");
    const many = tempAudit(yaml, { "data/runs.csv": `${lines.join("\n")}\n` });
    const config = loadAuditDefinition(many).datasets[0] as SamplesDatasetConfig;
    const file = path.join(many, "data/runs.csv");
    const reduced = await loadSamples(config, file, "datasets[0]", { ...REDUCE, cellCapacity: 1 << 14, threads: false });
    const exact = await loadSamples(config, file, "datasets[0]", EXACT);
    expect(reduced.sigma.length).toBeLessThanOrEqual(1 << 14);
    expect(reduced.reduction!.steps.dN).toBeGreaterThan(1);
    expect(reduced.reduction!.steps.sigma).toBeLessThan(1); // k_B; without the rule, 2^−12·3^31 ≈ 1.5e11
    expect(reduced.realisations).toBe(60_000);
    // The report's assumption says how wide the count cells are, not "equal ΔN".
    expect(describeReduction(reduced)).toContain(`ΔN in cells of ${reduced.reduction!.steps.dN} counts`);
    expect(describeReduction(exact)).toBeNull();
    const r = weightedTotal(reduced, (i) => Math.exp(-reduced.sigma[i]));
    const e = weightedTotal(exact, (i) => Math.exp(-exact.sigma[i]));
    const nReduced = weightedTotal(reduced, (i) => reduced.dN[i]);
    const nExact = weightedTotal(exact, (i) => exact.dN[i]);
    expectClose(r, e, { rtol: 1e-10, source: "sum of e^−Σ is kept exactly at every level" });
    expectClose(nReduced, nExact, { rtol: 1e-9, atol: 1e-6, source: "the total count is kept (cell means times multiplicities; rounding only)" });
    fs.rmSync(many, { recursive: true, force: true });
  });

  it("reports bad cells and disagreeing rows with the reference reader's words and absolute lines", async () => {
    const lines = ["dE_A,dE_B,Q"];
    // dE_A = −k/1000, dE_B = 0.2, Q = (0.2 + k/1000)/2: decimals printed exactly, so Q agrees with (dE_B − dE_A)/2.
    for (let i = 0; i < 50_000; i++) lines.push(`${(-(i % 100) / 1000).toFixed(3)},0.2,${((0.2 + (i % 100) / 1000) / 2).toFixed(4)}`);
    lines[30_001] = "-0.1,0.2,seven";
    lines[45_000] = "-0.1,0.2,0.5";
    const bad = tempAudit(
      `id: reduce-errors
title: Reduction errors
authors: [{ name: "Test Author" }]
datasets:
  - id: runs
    kind: samples
    file: data/runs.csv
    columns: { dE_A: dE_A, dE_B: dE_B, Q: Q }
    energy_unit: meV
    reservoirs: { A: { T: 1.3, mu: 0 }, B: { T: 1.0, mu: 0 } }
    work: measured
`,
      { "data/runs.csv": `${lines.join("\n")}\n` },
    );
    const config = loadAuditDefinition(bad).datasets[0] as SamplesDatasetConfig;
    const file = path.join(bad, "data/runs.csv");
    const messageOf = async (options: SamplesReadOptions) => loadSamples(config, file, "datasets[0]", options).then(() => "no error", (e: Error) => e.message);
    const expected = 'data/runs.csv:30002, column "Q": expected a number, found "seven"';
    expect(await messageOf(EXACT)).toBe(expected);
    expect(await messageOf(REDUCE)).toBe(expected);
    lines[30_001] = "-0.1,0.2,0.1500";
    fs.writeFileSync(file, `${lines.join("\n")}\n`);
    const disagreement = 'data/runs.csv:45001, column "Q": disagrees with (dE_B − dE_A)/2 from the dE_A and dE_B columns of the same row; map either the column or the energy changes, or correct the row';
    expect(await messageOf(EXACT)).toBe(disagreement);
    expect(await messageOf(REDUCE)).toBe(disagreement);
  });
});

describe("verdicts on summarised files equal those on the raw rows (medium data, laws with known answers)", () => {
  const scenarios: Scenario[] = [
    withWork("work-declared-state", family(1.3, 1.0, 0.05, true)),
    withWork("drawn-hotter-than-declared", family(1.45, 1.0, 0.05, true)),
    {
      ...withWork("no-work", family(1.3, 1.0, 0.05, false)),
      columns: "{ Q: Q, dN: dN }",
      header: "Q,dN",
      line: (_W, Q, dN) => `${fixed6(Q)},${dN}`,
      work: "zero",
    },
    {
      ...withWork("energy-changes", family(1.3, 1.0, 0.05, true)),
      columns: "{ dE_A: ea, dE_B: eb, dN: dN }",
      header: "ea,eb,dN",
      line: (W, Q, dN) => `${fixed6(W / 2 - Q)},${fixed6(W / 2 + Q)},${dN}`,
    },
  ];
  for (const s of scenarios) {
    it(`${s.name}: every check gives the same status`, async () => {
      const dir = auditFor(s, `reduce:verdicts:${s.name}`);
      const { exact, reduced, definition } = await loadBoth(dir);
      expect(reduced.reduction).not.toBeNull();
      const fromExact = statuses(dir, definition, exact);
      expect(statuses(dir, definition, reduced)).toEqual(fromExact);
      if (s.name === "drawn-hotter-than-declared") expect(fromExact["exchange-fluctuation/runs"]).toBe("fail");
      if (s.name === "work-declared-state") expect(fromExact["exchange-fluctuation/runs"]).toBe("pass");
    }, 120_000);
  }

  it("an affinity sweep: fluctuation-dissipation gives the same status from summarised files", async () => {
    // Exactly tilted family with one symmetric base law at each affinity: ⟨x⟩ = C θ/2, linear in the affinities
    // with L = C/2 = half the equilibrium covariance, so the fluctuation–dissipation relation holds exactly.
    const points = [
      { id: "centre", TA: 1.0, muA: 0 },
      { id: "warm", TA: 1.06, muA: 0 },
      { id: "bias", TA: 1.0, muA: 0.004 },
      { id: "both", TA: 1.04, muA: -0.003 },
    ];
    const files: Record<string, string> = {};
    let yaml = `id: reduce-sweep
title: Reduction sweep
authors: [{ name: "Test Author" }]
datasets:
`;
    for (const p of points) {
      const { Q, dN } = sampleTilted(family(p.TA, 1.0, p.muA, false), 150_000, rngFromText(`reduce:sweep:${p.id}`));
      const lines = ["Q,dN"];
      for (let i = 0; i < Q.length; i++) lines.push(`${fixed6(Q[i])},${dN[i]}`);
      files[`data/${p.id}.csv`] = `${lines.join("\n")}\n`;
      yaml += `  - id: ${p.id}
    kind: samples
    file: data/${p.id}.csv
    columns: { Q: Q, dN: dN }
    energy_unit: meV
    reservoirs: { A: { T: ${p.TA}, mu: ${p.muA} }, B: { T: 1.0, mu: 0 } }
    tau: 1.0e-9
    work: zero
    sweep: s
`;
    }
    const dir = tempAudit(`${yaml}checks: [fluctuation-dissipation]\n`, files);
    const definition = loadAuditDefinition(dir);
    const load = (options: SamplesReadOptions) =>
      Promise.all(definition.datasets.map((c, i) => loadSamples(c as SamplesDatasetConfig, path.join(dir, c.file), `datasets[${i}]`, options)));
    const exact = await load(EXACT);
    const reduced = await load(REDUCE);
    expect(reduced.every((d) => d.reduction !== null)).toBe(true);
    const [fromExact] = runChecks({ dir, definition, datasets: exact });
    const [fromReduced] = runChecks({ dir, definition, datasets: reduced });
    // (At 150 000 realisations a point the verdict is inconclusive: the interval is wider than the margin.)
    expect(fromReduced.status).toBe(fromExact.status);
    const Lf = (r: typeof fromExact) => (r.values as { L_fluctuation: number[][] }).L_fluctuation;
    expectClose(Lf(fromReduced)[0][0], Lf(fromExact)[0][0], { rtol: 1e-6, source: "equilibrium second moments are kept exactly (cell means + within-cell scatter)" });
  }, 120_000);

  it("a Parquet file gives the same dataset as the same numbers in CSV, whole or summarised", async () => {
    const s = scenarios[0];
    const dir = auditFor({ ...s, rows: 40_000 }, "reduce:parquet");
    const text = fs.readFileSync(path.join(dir, "data/runs.csv"), "utf8").trim().split("\n").slice(1);
    const cols = { W: new Float64Array(text.length), Q: new Float64Array(text.length), dN: new Float64Array(text.length) };
    text.forEach((line, i) => {
      const [w, q, n] = line.split(",").map(Number);
      cols.W[i] = w;
      cols.Q[i] = q;
      cols.dN[i] = n;
    });
    writeSamplesParquet(path.join(dir, "data/runs.parquet"), cols, { rowGroupRows: 7_000 });
    const yaml = fs.readFileSync(path.join(dir, "audit.yaml"), "utf8").replace("data/runs.csv", "data/runs.parquet");
    fs.writeFileSync(path.join(dir, "audit.yaml"), yaml);
    const csvConfig = { ...(loadAuditDefinition(dir).datasets[0] as SamplesDatasetConfig), file: "data/runs.csv" };
    const fromCsv = await loadSamples(csvConfig, path.join(dir, "data/runs.csv"), "datasets[0]", EXACT);
    const { exact, reduced, definition } = await loadBoth(dir, "data/runs.parquet");
    expect(Array.from(exact.sigma)).toEqual(Array.from(fromCsv.sigma));
    expect(reduced.reduction).not.toBeNull();
    expect(reduced.realisations).toBe(40_000);
    expect(statuses(dir, definition, reduced)).toEqual(statuses(dir, definition, fromCsv));
  }, 120_000);
});

describe("pooling guard", () => {
  it("reports a failure that coarse pooling can fake as inconclusive, and keeps it where cells are fine", async () => {
    const dir = auditFor(withWork("guard", family(1.3, 1.0, 0.05, true), 40_000), "reduce:guard");
    const definition = loadAuditDefinition(dir);
    const config = definition.datasets[0] as SamplesDatasetConfig;
    const file = path.join(dir, "data/runs.csv");
    const coarse = await loadSamples(config, file, "datasets[0]", { ...REDUCE, cellCapacity: 3000, threads: false });
    const fine = await loadSamples(config, file, "datasets[0]", { ...REDUCE, threads: false });
    expect(coarse.reduction!.steps.sigma).toBeGreaterThan(0.06);
    expect(fine.reduction!.steps.sigma).toBeLessThanOrEqual(0.06);
    // A stand-in for a check that finds a violation, under an id whose failures pooling can fake.
    const failing: CheckDefinition = {
      id: "weighted-identity",
      title: "stand-in",
      kinds: ["samples"],
      run: (audit: IngestedAudit) => audit.datasets.map((d: Dataset) => ({ check: "weighted-identity", dataset: d.id, status: "fail", summary: "A departure.", values: {}, criteria: {}, assumptions: [] }) as unknown as CheckResult),
    } as unknown as CheckDefinition;
    const [onCoarse] = runChecks({ dir, definition, datasets: [coarse] }, [failing]);
    expect(onCoarse.status).toBe("inconclusive");
    expect(onCoarse.reason).toMatch(/^the file was summarised into cells [0-9.e+]+ k_B wide in Σ .*the departure found was: A departure\. Audit a part of the file/);
    expect(onCoarse.assumptions.at(-1)).toMatch(/^Dataset runs \(40,000 realisations\) was summarised while it was read into \d+ cells/);
    const [onFine] = runChecks({ dir, definition, datasets: [fine] }, [failing]);
    expect(onFine.status).toBe("fail");
  });
});

describe("threshold", () => {
  it("keeps every row of a file below the size threshold", async () => {
    const dir = tempAudit(
      `id: small
title: Small
authors: [{ name: "Test Author" }]
datasets:
  - id: runs
    kind: samples
    file: data/runs.csv
    columns: { Q: Q }
    energy_unit: meV
    reservoirs: { A: { T: 1.3, mu: 0 }, B: { T: 1.0, mu: 0 } }
    work: zero
`,
      { "data/runs.csv": "Q\n0.1\n-0.2\n" },
    );
    const config = loadAuditDefinition(dir).datasets[0] as SamplesDatasetConfig;
    const d = await loadSamples(config, path.join(dir, "data/runs.csv"), "datasets[0]");
    expect(d.reduction).toBeNull();
    expect(d.sigma.length).toBe(2);
  });
});

