import fs from "node:fs";
import path from "node:path";
import { InputError } from "../errors.ts";

/** A simulated audit: its audit.yaml text and its files (paths relative to the audit folder). */
export interface SynthAudit {
  yaml: string;
  files: Record<string, string>;
  /** One line for the terminal: what was written. */
  summary: string;
}

/**
 * Write a simulated audit into `dir`. An existing audit.yaml is only replaced
 * with `force`, so a user's own audit is never overwritten by accident.
 */
export function writeAuditFolder(dir: string, audit: SynthAudit, force = false): string[] {
  const yamlPath = path.join(dir, "audit.yaml");
  if (fs.existsSync(yamlPath) && !force) {
    throw new InputError(`${yamlPath}: already exists; choose another --out folder, or pass --force to replace the simulated audit`);
  }
  fs.mkdirSync(dir, { recursive: true });
  fs.writeFileSync(yamlPath, audit.yaml);
  const written = [yamlPath];
  for (const [file, content] of Object.entries(audit.files)) {
    const target = path.join(dir, file);
    fs.mkdirSync(path.dirname(target), { recursive: true });
    fs.writeFileSync(target, content);
    written.push(target);
  }
  return written;
}

