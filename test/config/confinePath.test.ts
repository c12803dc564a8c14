import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { confinePath } from "../../src/config/confinePath.ts";

describe("confinePath (contract: a path that leaves the audit folder is refused)", () => {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), "ta-confine-"));
  const audit = path.join(root, "audit");
  fs.mkdirSync(path.join(audit, "data"), { recursive: true });
  fs.writeFileSync(path.join(root, "secret.csv"), "q\n1\n");
  fs.symlinkSync(path.join(root, "secret.csv"), path.join(audit, "data", "link.csv"));

  it("resolves a path inside the folder", () => {
    expect(confinePath(audit, "data/run.csv", "datasets[0].file")).toBe(path.join(audit, "data", "run.csv"));
  });

  it("refuses .. that climbs out", () => {
    expect(() => confinePath(audit, "../secret.csv", "datasets[0].file")).toThrow(
      'audit.yaml datasets[0].file: must stay inside the audit folder, found "../secret.csv"',
    );
  });

  it("refuses an absolute path", () => {
    expect(() => confinePath(audit, "/etc/passwd", "datasets[0].file")).toThrow(
      'audit.yaml datasets[0].file: must be a path inside the audit folder, found the absolute path "/etc/passwd"',
    );
  });

  it("refuses a symbolic link whose target is outside", () => {
    expect(() => confinePath(audit, "data/link.csv", "datasets[0].file")).toThrow(/^audit\.yaml datasets\[0\]\.file: "data\/link\.csv" is a link to .*secret\.csv, outside the audit folder$/);
  });
});
