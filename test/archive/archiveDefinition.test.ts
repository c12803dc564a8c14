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
      'archive.yaml:3 base_url: must start with https:// or http://, such as https://example.org/audits/, found "ftp://example.org/"',
    );
  });

  it("refuses addresses with white space or control characters, and ones no URL parser reads, naming the character", () => {
    const message = (yaml: string) => {
      try {
        loadArchiveDefinition(archiveWith(`name: A\npublisher: B\n${yaml}`));
      } catch (err) {
        return (err as Error).message;
      }
      return "accepted";
    };
    expect(message('base_url: "https://example.org/a b/"\n')).toBe(
      'archive.yaml:3 base_url: must be a web address without white space or control characters (U+0020 at character 22), such as https://example.org/audits/, found "https://example.org/a b/"',
    );
    expect(message('repository: "https://example.org/x\\u0007.git"\n')).toBe(
      'archive.yaml:3 repository: must be a web address without white space or control characters (U+0007 at character 22), such as https://example.org/lab/audits.git, found "https://example.org/x\\u0007.git"',
    );
    expect(message("repository: https://exa mple\n")).toMatch(/^archive.yaml:3 repository: must be a web address without white space/);
    expect(message("repository: https://[::1\n")).toBe(
      'archive.yaml:3 repository: must be an absolute web address (WHATWG URL Standard), such as https://example.org/lab/audits.git, found "https://[::1"',
    );
    expect(message("repository: audits.git\n")).toBe(
      'archive.yaml:3 repository: must be an absolute web address (WHATWG URL Standard), such as https://example.org/lab/audits.git, found "audits.git"',
    );
  });

  it("writes addresses in their serialised form, braces and quotes percent-encoded, so exports can copy them", () => {
    expect(loadArchiveDefinition(archiveWith('name: A\npublisher: B\nbase_url: "https://example.org/{x}\\"y/"\n')).base_url).toBe("https://example.org/%7Bx%7D%22y/");
  });
});
