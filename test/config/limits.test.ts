/**
 * Issue 22 item 9: a definition cannot exhaust the machine, and every numeric
 * setting is checked, each refusal naming the line and the key path and
 * quoting what was written.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { loadAuditDefinition, parseAuditDefinition } from "../../src/config/loadAudit.ts";
import { ConfigError } from "../../src/errors.ts";
import { thrownBy } from "../helpers/thrown.ts";
import { samplesDatasetYaml } from "./minimalAudit.ts";

const dataset = (i: number) => samplesDatasetYaml(`run-${i}`);

const audit = (settings = "", extra = "", datasets = 1) =>
  `id: demo-audit
title: A demo
authors:
  - { name: "A. Person" }
${settings ? `settings: { ${settings} }\n` : ""}${extra}datasets:
${Array.from({ length: datasets }, (_, i) => dataset(i)).join("")}`;

const messageOf = (source: string) => thrownBy(ConfigError, () => parseAuditDefinition(source)).message;

describe("documents that would exhaust memory", () => {
  it("refuses the reported case, a 5 MB anchored string, by the file's size before parsing it", () => {
    const source = audit("", `keywords: [&s "${"x".repeat(5_000_000)}", ${Array(99).fill("*s").join(", ")}]\n`);
    expect(messageOf(source)).toBe(
      `audit.yaml: is ${Buffer.byteLength(source)} bytes; a definition file may hold at most 1048576 bytes (1 MiB): keep data in the data files, not in the YAML`,
    );
  });

  it("refuses a file on disk larger than 1 MiB without reading it", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-limits-"));
    fs.writeFileSync(path.join(dir, "audit.yaml"), audit("", `description: "${"y".repeat(1_100_000)}"\n`));
    expect(thrownBy(ConfigError, () => loadAuditDefinition(dir)).message).toBe(
      `audit.yaml: is ${fs.statSync(path.join(dir, "audit.yaml")).size} bytes; a definition file may hold at most 1048576 bytes (1 MiB): keep data in the data files, not in the YAML`,
    );
  });

  it("refuses aliases whose expansion passes 4 MiB, naming the line and key of the alias that crosses it", () => {
    // 100 000 characters anchored, then repeated: the 41st copy is the first past 4 194 304 characters.
    const source = audit("", `keywords: [&s "${"x".repeat(100_000)}", ${Array(99).fill("*s").join(", ")}]\n`);
    expect(messageOf(source)).toBe(
      "audit.yaml:5 keywords[41]: YAML aliases (*name) expand the document to more than 4194304 characters (4 MiB), the limit that keeps a definition from exhausting memory; write shorter values or fewer repeats",
    );
  });

  it("refuses more than 100 aliased nodes (the yaml package's alias count)", () => {
    const source = audit("", `keywords: [&s word, ${Array(101).fill("*s").join(", ")}]\n`);
    expect(messageOf(source)).toBe(
      "audit.yaml: YAML aliases (*name) repeat more than 100 nodes in all, the limit that keeps a definition from exhausting memory; write the values out instead of repeating them by alias",
    );
  });

  it("refuses more than 1000 datasets", () => {
    expect(messageOf(audit("", "", 1001))).toBe("audit.yaml:6 datasets: must list at most 1000 datasets; split a larger study into several audits, found a list");
  });
});

describe("settings, each checked and named by line and key path", () => {
  it.each([
    ["resamples: 199", "audit.yaml:5 settings.resamples: must be a whole number from 200 to 100000, found 199"],
    ["resamples: 100001", "audit.yaml:5 settings.resamples: must be a whole number from 200 to 100000 (each resample re-weighs every row or cell), found 100001"],
    ["resamples: 2000.5", "audit.yaml:5 settings.resamples: must be a whole number from 200 to 100000, found 2000.5"],
    ["resamples: abc", 'audit.yaml:5 settings.resamples: must be a whole number from 200 to 100000, found "abc"'],
    ["margin: 0", "audit.yaml:5 settings.margin: must be in (0, 1), found 0"],
    ["margin: 1", "audit.yaml:5 settings.margin: must be in (0, 1), found 1"],
    ["margin: 1.5e0", "audit.yaml:5 settings.margin: must be in (0, 1), found 1.5e0"],
    ["alpha: 0.5", "audit.yaml:5 settings.alpha: must be in (0, 0.5), found 0.5"],
    ["alpha: -0.01", "audit.yaml:5 settings.alpha: must be in (0, 0.5), found -0.01"],
    ["seed: -1", "audit.yaml:5 settings.seed: must be auto (seeded from the data digest) or a whole number from 0 to 9007199254740991, found -1"],
    // Quoted as written: the double nearest to it is 9007199254740992.
    ["seed: 9007199254740993", "audit.yaml:5 settings.seed: must be auto (seeded from the data digest) or a whole number from 0 to 9007199254740991, found 9007199254740993"],
    ["seed: 1.5", "audit.yaml:5 settings.seed: must be auto (seeded from the data digest) or a whole number from 0 to 9007199254740991, found 1.5"],
  ])("%s", (setting, message) => {
    expect(messageOf(audit(setting))).toBe(message);
  });

  it("accepts settings inside their ranges", () => {
    expect(parseAuditDefinition(audit("resamples: 100000, margin: 0.999, alpha: 0.001, seed: 9007199254740991")).settings).toEqual({
      alpha: 0.001,
      margin: 0.999,
      confidence: 0.95,
      seed: 9007199254740991,
      resamples: 100000,
    });
  });
});

describe("dates that exist", () => {
  it.each([
    ["2026-02-30", "must be a date that exists (YYYY-MM-DD; months have 28 to 31 days)"],
    ["2025-02-29", "must be a date that exists (YYYY-MM-DD; months have 28 to 31 days)"],
    ["2026-13-01", "must be a date that exists (YYYY-MM-DD; months have 28 to 31 days)"],
    ["2026-1-5", "must be a date written YYYY-MM-DD"],
  ])("refuses %s", (date, message) => {
    expect(messageOf(audit("", `date: "${date}"\n`))).toBe(`audit.yaml:5 date: ${message}, found "${date}"`);
  });

  it("accepts 29 February of a leap year (2024: divisible by 4, not a century)", () => {
    expect(parseAuditDefinition(audit("", "date: 2024-02-29\n")).date).toBe("2024-02-29");
  });
});
