import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { listVersionNumbers } from "../../src/archive/layout.ts";
import { formatVerifyReport, verifyVersion } from "../../src/archive/verify.ts";
import { TOOL } from "../../src/version.ts";

const AUDITS = path.resolve(import.meta.dirname, "..", "..", "audits");
const published = fs
  .readdirSync(AUDITS)
  .map((name) => path.join(AUDITS, name))
  .flatMap((dir) => listVersionNumbers(dir).map((version) => ({ dir, version })));

describe("every committed demo version verifies from its data (a fresh clone can verify them)", () => {
  it("has published versions to verify", () => {
    expect(published.length).toBeGreaterThan(0);
  });

  it.each(published.map((p) => [`${path.basename(p.dir)} v${p.version}`, p] as const))("%s", async (_name, p) => {
    const report = await verifyVersion(p.dir, { version: p.version });
    // On failure the formatted report names every differing file, check and value.
    const details = formatVerifyReport(report, p.dir);
    if (report.tool.frozen.version === TOOL.version) {
      // Published by this tool version: it must reproduce to the last digit.
      expect(report.reproduced, details).toBe(true);
    } else {
      // Published by an earlier tool version: results may differ by design, but the
      // hash chain and every data digest must still hold.
      expect(report.chain, details).toEqual([]);
      expect(report.data, details).toEqual([]);
    }
  });
});
