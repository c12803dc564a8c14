/**
 * The data build copies beside each published version for the browser's
 * re-run panel: byte for byte, only what the version was computed on (its
 * recorded SHA-256 digests are checked while copying), within the size limit,
 * and never from outside the audit folder or to outside the site.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { publishAudit } from "../../src/archive/publish.ts";
import { buildSite, confinedSitePath } from "../../src/report/buildSite.ts";
import { readVersion } from "../../src/archive/readVersion.ts";
import { copyVersionData, planVersionData, type RerunManifest } from "../../src/report/versionData.ts";
import { fixedClock, makeTempArchive, TEST_AUDIT_ID } from "../archive/tempArchive.ts";
import { planAuditVersions } from "../../src/report/versionView.ts";
import { loadArchiveDefinition } from "../../src/config/archiveSchema.ts";
import { TOOL } from "../../src/version.ts";

const outDir = () => path.join(fs.mkdtempSync(path.join(os.tmpdir(), "ta-rerun-data-")), "site");
const rerunOf = (out: string, n: number) => JSON.parse(fs.readFileSync(path.join(out, TEST_AUDIT_ID, `v${n}`, "rerun.json"), "utf8")) as RerunManifest;
const copyOf = (out: string, n: number) => path.join(out, TEST_AUDIT_ID, `v${n}`, "data", "exchange.csv");

describe("build copies each published version's data into the site", () => {
  it("puts the data at <id>/v<N>/data/… byte for byte, with the frozen audit.yaml and a rerun.json", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const out = outDir();
    await buildSite({ root: a.root, out });
    expect(fs.readFileSync(copyOf(out, 1))).toEqual(fs.readFileSync(a.dataFile));
    expect(fs.readFileSync(path.join(out, TEST_AUDIT_ID, "v1", "audit.yaml"), "utf8")).toBe(fs.readFileSync(path.join(a.auditDir, "versions", "1", "audit.yaml"), "utf8"));
    const m = rerunOf(out, 1);
    expect(m).toMatchObject({ data: "copied", audit: TEST_AUDIT_ID, version: 1, files: [{ path: "data/exchange.csv", bytes: fs.statSync(a.dataFile).size }] });
    expect(m.inputs).toEqual([{ id: "pulse", file: "data/exchange.csv", parts: null }]);
    // The version page carries the panel, pointing at its own folder.
    const page = fs.readFileSync(path.join(out, TEST_AUDIT_ID, "v1", "index.html"), "utf8");
    expect(page).toContain('data-rerun-panel data-base="../v1/"');
  });

  it("gives an older version whose data changed since no data at all, rather than data it was not computed on", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    a.writeData(400, -1);
    await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") });
    const out = outDir();
    await buildSite({ root: a.root, out });
    expect(rerunOf(out, 2).data).toBe("copied");
    const v1 = rerunOf(out, 1);
    expect(v1.data).toBe("unavailable");
    expect(v1.reason).toBe("The data of this version are no longer in the archive as published: data/exchange.csv differ from the digest the version recorded.");
    expect(fs.existsSync(copyOf(out, 1))).toBe(false);
  });

  it("copies the newest versions first while the audit's total stays within --data-size-limit", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    fs.writeFileSync(path.join(a.auditDir, "audit.yaml"), fs.readFileSync(path.join(a.auditDir, "audit.yaml"), "utf8").replace("margin: 0.05", "margin: 0.1"));
    await publishAudit(a.auditDir, { now: fixedClock("2026-12-01T09:00:00Z") });
    const size = fs.statSync(a.dataFile).size;
    const out = outDir();
    // Room for one copy: version 2 gets it, version 1 is linked instead.
    await buildSite({ root: a.root, out, dataSizeLimit: size + size / 2 });
    expect(rerunOf(out, 2).data).toBe("copied");
    const v1 = rerunOf(out, 1);
    expect(v1.data).toBe("over-limit");
    expect(v1.reason).toMatch(/^The data of this version \(.+\) would take the audit's copies on this site past the build's limit of .+ \(build --data-size-limit\), so they are not copied\.$/);
    expect(fs.existsSync(copyOf(out, 1))).toBe(false);
    // The page then offers the archive's address and the check of a downloaded file.
    const page = fs.readFileSync(path.join(out, TEST_AUDIT_ID, "v1", "index.html"), "utf8");
    expect(page).toContain("data-drop-zone");

    const none = outDir();
    await buildSite({ root: a.root, out: none, dataSizeLimit: 0 });
    expect([rerunOf(none, 1).data, rerunOf(none, 2).data]).toEqual(["over-limit", "over-limit"]);
  });
});

describe("the copy is confined to the audit folder and to the site", () => {
  it("refuses a data file that is a link to a file outside the audit folder, even with the recorded bytes", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const outside = path.join(a.root, "outside.csv");
    fs.renameSync(a.dataFile, outside);
    fs.symlinkSync(outside, a.dataFile);
    const [plan] = planVersionData(a.auditDir, TEST_AUDIT_ID, [readVersion(a.auditDir, 1)], 1e9);
    expect(plan.manifest.data).toBe("unavailable");
    expect(plan.manifest.reason).toBe(
      `The data of this version are not in the archive as they were published: audit.yaml versions/1/version.json inputs[0].file: "data/exchange.csv" is a link to ${fs.realpathSync(outside)}, outside the audit folder.`,
    );
    expect(plan.manifest.files).toEqual([]);
  });

  it("refuses a link swapped in after planning (the opened file is checked), and removes what it wrote", () => {
    const a = makeTempArchive();
    return publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") }).then(() => {
      const [plan] = planVersionData(a.auditDir, TEST_AUDIT_ID, [readVersion(a.auditDir, 1)], 1e9);
      expect(plan.manifest.data).toBe("copied");
      const outside = path.join(a.root, "outside.csv");
      fs.renameSync(a.dataFile, outside);
      fs.symlinkSync(outside, a.dataFile);
      const out = outDir();
      fs.mkdirSync(out, { recursive: true });
      const m = copyVersionData(plan, (rel) => confinedSitePath(out, rel));
      expect(m.data).toBe("unavailable");
      expect(m.reason).toContain("data/exchange.csv: the file opened is not inside the audit folder");
      expect(fs.existsSync(path.join(out, TEST_AUDIT_ID, "v1", "data", "exchange.csv"))).toBe(false);
    });
  });

  it("never writes a copy outside the output folder, whatever folder the plan names", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const [plan] = planVersionData(a.auditDir, TEST_AUDIT_ID, [readVersion(a.auditDir, 1)], 1e9);
    const out = outDir();
    fs.mkdirSync(out, { recursive: true });
    expect(() => copyVersionData({ ...plan, siteDir: "../escaped/" }, (rel) => confinedSitePath(out, rel))).toThrow(
      `site path "../escaped/data/exchange.csv" would be written outside the output folder ${out}; refused`,
    );
    expect(fs.existsSync(path.join(path.dirname(out), "escaped"))).toBe(false);
  });
});

describe("a dataset of several parts", () => {
  it("copies every part under its own path and checks them by the parts digest the version recorded", async () => {
    const a = makeTempArchive();
    // The same rows as two parts in a folder (README: "Several parts"); each part repeats the header.
    const [header, ...rows] = fs.readFileSync(a.dataFile, "utf8").trimEnd().split("\n");
    fs.mkdirSync(path.join(a.auditDir, "data", "runs"));
    fs.writeFileSync(path.join(a.auditDir, "data", "runs", "part-1.csv"), `${[header, ...rows.slice(0, 200)].join("\n")}\n`);
    fs.writeFileSync(path.join(a.auditDir, "data", "runs", "part-2.csv"), `${[header, ...rows.slice(200)].join("\n")}\n`);
    fs.rmSync(a.dataFile);
    const yamlFile = path.join(a.auditDir, "audit.yaml");
    fs.writeFileSync(yamlFile, fs.readFileSync(yamlFile, "utf8").replace("file: data/exchange.csv", "file: data/runs"));
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const out = outDir();
    await buildSite({ root: a.root, out });
    const m = rerunOf(out, 1);
    expect(m.data).toBe("copied");
    expect(m.inputs).toEqual([{ id: "pulse", file: "data/runs", parts: ["data/runs/part-1.csv", "data/runs/part-2.csv"] }]);
    for (const part of ["part-1.csv", "part-2.csv"]) {
      expect(fs.readFileSync(path.join(out, TEST_AUDIT_ID, "v1", "data", "runs", part))).toEqual(fs.readFileSync(path.join(a.auditDir, "data", "runs", part)));
    }
    // One part changed after publication: the parts digest no longer matches, so nothing is offered.
    fs.appendFileSync(path.join(a.auditDir, "data", "runs", "part-2.csv"), "0.1,0\n");
    const again = outDir();
    await buildSite({ root: a.root, out: again });
    expect(rerunOf(again, 1).data).toBe("unavailable");
    expect(fs.existsSync(path.join(again, TEST_AUDIT_ID, "v1", "data", "runs", "part-1.csv"))).toBe(false);
  });
});

describe("the panel of a version published by another tool version", () => {
  it("gives the panel the tool version that published it, marked as not the site's, with the data still offered for the comparison", async () => {
    const a = makeTempArchive();
    await publishAudit(a.auditDir, { now: fixedClock("2026-11-30T09:00:00Z") });
    const v = readVersion(a.auditDir, 1);
    // The record as an older release would have written it (in memory only: the chain on disk is untouched).
    const older = { ...v, manifest: { ...v.manifest, tool: { name: "transport-audit", version: "0.0.9" } } };
    const plans = planVersionData(a.auditDir, TEST_AUDIT_ID, [older], 1e9);
    const plan = planAuditVersions({
      id: TEST_AUDIT_ID,
      folder: `audits/${TEST_AUDIT_ID}`,
      versions: [older],
      problems: [],
      current: null,
      currentDefinitionDigest: null,
      archive: loadArchiveDefinition(a.root),
      rerun: new Map(plans.map((p) => [p.version.number, p.manifest])),
    });
    expect(plan.versions[0].versioning.rerun).toEqual({ base: "../v1/", data: "copied", toolVersion: "0.0.9", sameTool: false, siteToolVersion: TOOL.version });
    expect(plan.landing.versioning.rerun?.base).toBe("v1/");
  });
});
