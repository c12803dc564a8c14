/**
 * The `units` map beside each check's `values` (added in tool version 0.3.0) is
 * optional in the result schema: result documents frozen by earlier versions,
 * which have none, still validate; a map that is there is checked for the
 * spelling of its units, so that a display unit such as meV (a factor 1.6e-22
 * away from the SI value stored) cannot pass for the unit of a stored number.
 */
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { validateResultDocument } from "../../src/archive/resultSchema.ts";
import { withValueUnits } from "../../src/report/resultDocument.ts";
import { ArchiveError } from "../../src/errors.ts";
import { thrownBy } from "../helpers/thrown.ts";

const AUDITS = path.resolve(import.meta.dirname, "../../audits");

/** Every committed `versions/<N>/result.json` of the demo archive, by its path below audits/. */
function frozenResults(): { label: string; doc: Record<string, any> }[] {
  const out: { label: string; doc: Record<string, any> }[] = [];
  for (const a of fs.readdirSync(AUDITS)) {
    const versions = path.join(AUDITS, a, "versions");
    if (!fs.existsSync(versions)) continue;
    for (const v of fs.readdirSync(versions)) out.push({ label: `${a}/versions/${v}/result.json`, doc: JSON.parse(fs.readFileSync(path.join(versions, v, "result.json"), "utf8")) });
  }
  return out;
}

/** Whether release a (major.minor.patch) comes before b. */
function releaseBefore(a: string, b: string): boolean {
  const [x, y] = [a, b].map((v) => v.split(".").map(Number));
  for (let i = 0; i < 3; i++) if (x[i] !== y[i]) return x[i] < y[i];
  return false;
}

describe("units in the result schema", () => {
  it("accepts every frozen demo result, those of tool versions before 0.3.0 without units and the later ones with", () => {
    const frozen = frozenResults();
    const before = frozen.filter(({ doc }) => releaseBefore(doc.tool.version, "0.3.0"));
    expect(before.length).toBeGreaterThan(10);
    expect(frozen.length).toBeGreaterThan(before.length);
    for (const { label, doc } of frozen) {
      const early = before.some((b) => b.label === label);
      expect(doc.checks.every((c: Record<string, unknown>) => ("units" in c) !== early), label).toBe(true);
      expect(() => validateResultDocument(doc, label)).not.toThrow();
    }
  });

  it("accepts the same documents with the units the registry gives their values", () => {
    for (const { label, doc } of frozenResults()) {
      const withUnits = { ...doc, checks: doc.checks.map(withValueUnits) };
      expect(() => validateResultDocument(withUnits, label)).not.toThrow();
    }
  });

  it("refuses a display unit or a malformed specification, naming file and key", () => {
    const { doc } = frozenResults().find((f) => f.label.startsWith("vq3-heat-exchange/"))!;
    const edited = structuredClone(doc);
    edited.checks[0].units = { slope: "meV", slope_ci: ["1", { a: 3 }] };
    const e = thrownBy(ArchiveError, () => validateResultDocument(edited, "versions/2/result.json"));
    expect(e.message).toBe(
      [
        'versions/2/result.json: checks[0].units.slope: must be a unit written as SI symbols with integer powers separated by spaces ("J^-1", "W K^-1"), "1" or "as written", found "meV"',
        "versions/2/result.json: checks[0].units.slope_ci: must be a unit, null, or a list or object of units, found a list",
      ].join("\n"),
    );
  });
});
