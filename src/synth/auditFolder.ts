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
 * Write an audit folder (audit.yaml and its files) into `dir`: simulated
 * audits, and the generated demo and benchmark archives. An existing
 * audit.yaml is only replaced with `force`, so a user's own audit is never
 * overwritten by accident.
 */
export function writeAuditFolder(dir: string, audit: Pick<SynthAudit, "yaml" | "files">, force = false): string[] {
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


/** What differs between the simulated audits' headers. */
export interface SynthAuditHeader {
  model: string; // synth model name, e.g. "dot"
  id: string;
  title: string;
  description: string; // Markdown, any number of lines
  keywords: string[];
}

/**
 * The common head of a simulated audit.yaml, up to and including `datasets:`:
 * provenance comment, identity, the simulator as author, licence, the
 * description as a YAML block and the default settings.
 */
export function synthAuditYamlHeader(h: SynthAuditHeader): string {
  const block = h.description
    .trimEnd()
    .split("\n")
    .map((l) => `  ${l}`)
    .join("\n");
  return `# Written by \`transport-audit synth ${h.model}\`: simulated data with known exact properties.
id: ${h.id}
title: ${JSON.stringify(h.title)}
authors:
  - { name: "transport-audit synth (simulation)" }
license: CC-BY-4.0
description: |
${block}
keywords: [${h.keywords.join(", ")}]
settings: { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: auto }
datasets:
`;
}
