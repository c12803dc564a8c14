/**
 * The last line of defence behind the validation of frozen documents: no page
 * and no download of the site is written outside the output folder, whatever
 * id or path a model carries (a result from anywhere: a frozen version, the
 * result cache).
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { renderSite, type SiteData } from "../../src/report/buildSite.ts";
import type { AuditPageModel } from "../../src/report/viewModel.ts";
import type { ArchiveDefinition } from "../../src/config/archiveSchema.ts";

function siteWith(models: Partial<AuditPageModel>[], files: SiteData["files"] = []): SiteData {
  // Only the ids, permalinks and file paths are read before anything is written.
  return { archive: {} as ArchiveDefinition, audits: models as AuditPageModel[], broken: [], files };
}

describe("renderSite keeps every output inside its folder", () => {
  const parent = fs.mkdtempSync(path.join(os.tmpdir(), "ta-confine-"));
  const out = path.join(parent, "site");

  it("refuses an audit page whose id climbs out, before writing anything", async () => {
    await expect(renderSite(out, siteWith([{ id: "../../x" }]))).rejects.toThrow(
      `site path "../../x/index.html" would be written outside the output folder ${out}; refused`,
    );
    expect(fs.readdirSync(parent)).toEqual([]);
  });

  it("refuses downloads with a climbing, absolute or backslashed path", async () => {
    for (const bad of ["../notes.txt", "/etc/x", "a\\..\\..\\x"]) {
      await expect(renderSite(out, siteWith([{ id: "fine" }], [{ path: bad, content: "x" }]))).rejects.toThrow(
        `site path ${JSON.stringify(bad)} would be written outside the output folder ${out}; refused`,
      );
    }
    expect(fs.readdirSync(parent)).toEqual([]);
  });
});
