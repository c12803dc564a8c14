import fs from "node:fs";
import path from "node:path";
import { readNumericCsv } from "../../src/ingest/readCsv.ts";

/** The fixtures of scripts/fixtures/write_formats.py: one samples dataset in many file shapes, and bad files. */
export const FORMAT_FIXTURES = path.resolve("test/ingest/fixtures/formats");

/** The comma file's columns, for writers run by the tests (Parquet: pyarrow is not packaged for Debian). */
export async function commaColumns(): Promise<Record<string, Float64Array>> {
  const table = await readNumericCsv(path.join(FORMAT_FIXTURES, "comma.csv"), "comma.csv", [
    { role: "window", column: "window" },
    { role: "Q", column: "Q_meV" },
    { role: "dN", column: "n" },
  ]);
  return { window: table.columns.get("window")!, Q_meV: table.columns.get("Q_meV")!, n: table.columns.get("n")! };
}

/** audit.yaml for the fixtures' dataset in `data/<file>`, with the dataset's layout keys (columns included). */
export function formatsAuditYaml(file: string, keys: readonly string[]): string {
  return [
    "id: formats-sample",
    "title: One dataset in many file shapes",
    "authors:",
    '  - { name: "A. N. Example" }',
    "license: CC-BY-4.0",
    // A fixed seed: the bootstraps must not draw from the file's digest, which differs by shape.
    "settings: { alpha: 0.01, margin: 0.05, seed: 20, resamples: 200 }",
    "datasets:",
    "  - id: exchange",
    "    kind: samples",
    `    file: data/${file}`,
    ...keys.map((k) => `    ${k}`),
    "    energy_unit: meV",
    "    reservoirs:",
    "      A: { T: 1.3, mu: 0.0 }",
    "      B: { T: 1.0, mu: 0.0 }",
    "    work: zero",
    "checks: all",
    "",
  ].join("\n");
}

/**
 * A new audit folder under `root` whose data/<file> is the fixture of that name (or what
 * `write` writes there), with the audit.yaml above.
 */
export async function formatsAudit(root: string, file: string, keys: readonly string[], write?: (target: string) => Promise<void> | void): Promise<string> {
  const dir = fs.mkdtempSync(path.join(root, "audit-"));
  fs.mkdirSync(path.join(dir, "data"));
  const target = path.join(dir, "data", file);
  if (write) await write(target);
  else fs.cpSync(path.join(FORMAT_FIXTURES, file), target, { recursive: true });
  fs.writeFileSync(path.join(dir, "audit.yaml"), formatsAuditYaml(file, keys));
  return dir;
}
