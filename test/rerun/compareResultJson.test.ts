/**
 * compareResultJson, the browser panel's comparison, is `verify`'s
 * (src/archive/resultDifferences.ts): these worked examples tamper with a
 * result document in known ways and expect exactly those places named, with
 * both values as `verify` prints them. The reference is the edit itself
 * (one digit of one value, one digit of one data cell); numbers compare
 * exactly, as a published version promises reproduction to the last digit.
 */
import path from "node:path";
import { beforeAll, describe, expect, test } from "vitest";
import { compareResultJson, runAuditFromFiles } from "../../src/browser/engine/engine.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { sha256Of } from "../../src/archive/digest.ts";
import { auditFiles, ROOT } from "./auditFiles.ts";

const DIR = path.join(ROOT, "audits", "lc60-growth-series");
let frozen: string;

beforeAll(async () => {
  frozen = (await runAuditFromFiles(auditFiles(DIR))).json;
});

/** The document with one change made by `edit`, written back in canonical form. */
function edited(text: string, edit: (doc: any) => void): string {
  const doc = JSON.parse(text);
  edit(doc);
  return canonicalJson(doc);
}

describe("compareResultJson", () => {
  test("the same bytes reproduce, with nothing listed", () => {
    expect(compareResultJson(frozen, frozen)).toEqual({ reproduced: true, differences: [], more: 0 });
  });

  test("a changed value of a check is named by check, dataset and value, with both numbers exact", () => {
    const doc = JSON.parse(frozen);
    const check = doc.checks[0];
    const [key, value] = Object.entries(check.values as Record<string, unknown>).find(([, v]) => typeof v === "number" && v !== 0)! as [string, number];
    const tampered = edited(frozen, (d) => (d.checks[0].values[key] = value * 1.5));
    const result = compareResultJson(tampered, frozen);
    expect(result.reproduced).toBe(false);
    expect(result.differences).toEqual([{ where: `check ${check.check} on ${check.dataset}`, path: `values.${key}`, frozen: String(value * 1.5), now: String(value) }]);
    expect(result.more).toBe(0);
  });

  test("a data file with one digit changed: its digest is named with both values, and so are the fingerprint and the check values that moved", async () => {
    const files = auditFiles(DIR);
    const text = new TextDecoder().decode(files.get("data/mean-transfer.csv"));
    const changed = text.replace("0.016887", "0.016886"); // row 2's mean_dN, its last digit
    expect(changed).not.toBe(text);
    files.set("data/mean-transfer.csv", new TextEncoder().encode(changed));
    const now = (await runAuditFromFiles(files)).json;
    const result = compareResultJson(frozen, now, 1000);
    expect(result.reproduced).toBe(false);
    const digest = result.differences.find((d) => d.path === "datasets[0].sha256")!;
    // The digests are the files' SHA-256 (FIPS 180-4), here from node:crypto through src/archive/digest.ts.
    expect(digest).toEqual({ where: "document", path: "datasets[0].sha256", frozen: JSON.stringify(sha256Of(text).replace(/^sha256:/, "")), now: JSON.stringify(sha256Of(changed).replace(/^sha256:/, "")) });
    expect(result.differences.some((d) => d.where === "document" && d.path === "fingerprint")).toBe(true);
    expect(result.differences.some((d) => d.where.startsWith("check linear-growth on "))).toBe(true);
  });

  test("at most maxDifferences are listed; the rest are counted", () => {
    const tampered = edited(frozen, (d) => {
      d.audit = "another-audit";
      d.title = "Another title";
      d.fingerprint = "sha256:0";
    });
    const result = compareResultJson(tampered, frozen, 2);
    expect(result.differences.map((d) => d.path)).toEqual(["audit", "fingerprint"]);
    expect(result.more).toBe(1);
  });

  test("the same values in other bytes (indented by hand) are named as such, not reproduced", () => {
    const result = compareResultJson(JSON.stringify(JSON.parse(frozen), null, 2), frozen);
    expect(result).toEqual({ reproduced: false, differences: [{ where: "document", path: "(bytes)", frozen: "stored text", now: "not the canonical JSON of the same values" }], more: 0 });
  });

  test("a frozen text that is not JSON is named as such", () => {
    const result = compareResultJson(frozen.slice(0, -1), frozen);
    expect(result.reproduced).toBe(false);
    expect(result.differences).toHaveLength(1);
    expect(result.differences[0]).toMatchObject({ where: "document", path: "(bytes)", now: "JSON" });
    expect(result.differences[0].frozen).toMatch(/^not JSON \(/);
  });
});
