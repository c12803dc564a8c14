import fs from "node:fs";
import path from "node:path";
import { ConfigError } from "../errors.ts";
import { confinePath } from "./confinePath.ts";
import { auditSchema } from "./auditSchema.ts";
import { checkYamlSize, parseLocatedYaml } from "./yamlDocument.ts";
import { validateLocated } from "./validate.ts";
import type { AuditDefinition } from "./types.ts";

export const AUDIT_FILE = "audit.yaml";

/** Parse and validate `<auditDir>/audit.yaml`. Throws ConfigError naming file, line and key path. */
export function loadAuditDefinition(auditDir: string): AuditDefinition {
  const file = path.join(auditDir, AUDIT_FILE);
  if (!fs.existsSync(file)) {
    throw new ConfigError(`${file}: not found; an audit folder must contain ${AUDIT_FILE} (create one with: transport-audit init ${auditDir})`);
  }
  if (!fs.statSync(file).isFile()) throw new ConfigError(`${file}: is not a file; ${AUDIT_FILE} must be a text file holding the audit's definition`);
  checkYamlSize(AUDIT_FILE, fs.statSync(file).size); // before reading: a huge file is refused unread
  const definition = parseAuditDefinition(fs.readFileSync(file, "utf8"), AUDIT_FILE);
  // Every data path is confined before any dataset is read: an audit that names
  // one file outside its folder is refused as a whole, with nothing read.
  definition.datasets.forEach((d, i) => confinePath(auditDir, d.file, `datasets[${i}].file`));
  return definition;
}

/** Validate audit.yaml text; `label` is the file name used in messages. */
export function parseAuditDefinition(source: string, label = AUDIT_FILE): AuditDefinition {
  const doc = parseLocatedYaml(label, source);
  if (doc.value === null || typeof doc.value !== "object" || Array.isArray(doc.value)) {
    throw new ConfigError(`${label}:1 (top level): must be a map of keys (id, title, authors, datasets, …), found ${doc.value === null ? "an empty file" : Array.isArray(doc.value) ? "a list" : `the single value ${JSON.stringify(doc.value)}`}`);
  }
  return validateLocated(auditSchema, doc) as AuditDefinition;
}
