import fs from "node:fs";
import os from "node:os";
import path from "node:path";

/** Write an audit folder (audit.yaml plus files) into a fresh temporary directory. */
export function tempAudit(yaml: string, files: Record<string, string> = {}): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-audit-"));
  fs.writeFileSync(path.join(dir, "audit.yaml"), yaml);
  for (const [name, content] of Object.entries(files)) {
    const target = path.join(dir, name);
    fs.mkdirSync(path.dirname(target), { recursive: true });
    fs.writeFileSync(target, content);
  }
  return dir;
}
