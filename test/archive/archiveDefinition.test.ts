import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { loadArchiveDefinition } from "../../src/config/archiveSchema.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");

function archiveWith(yaml: string): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-archive-def-"));
  fs.writeFileSync(path.join(dir, "archive.yaml"), yaml);
  return dir;
}

describe("loadArchiveDefinition", () => {
  it("reads the demo archive.yaml at the repository root", () => {
    expect(loadArchiveDefinition(ROOT)).toMatchObject({
      publisher: "Varga Cryogenic Transport Laboratory, Institute for Mesoscopic Physics, Lindqvist",
      base_url: "https://audits.example.org/",
      license: "CC-BY-4.0",
    });
  });

  it("ends the base URL with a slash, so that version addresses join onto it", () => {
    expect(loadArchiveDefinition(archiveWith("name: A\npublisher: B\nbase_url: https://example.org/audits\n")).base_url).toBe("https://example.org/audits/");
  });

  it("refuses a base URL that is not a web address, naming file, line and key", () => {
    expect(() => loadArchiveDefinition(archiveWith("name: A\npublisher: B\nbase_url: ftp://example.org/\n"))).toThrow(
      'archive.yaml:3 base_url: must start with https:// or http://, found "ftp://example.org/"',
    );
  });
});
