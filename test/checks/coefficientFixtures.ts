// Builders for constructed coefficient tables used by the coefficient-check tests.
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { IngestedAudit } from "../../src/ingest/types.ts";
import { contextFor } from "../../src/report/runAudit.ts";
import type { CheckDefinition, CheckOptions, CheckResult } from "../../src/checks/types.ts";
import { tempAudit } from "../helpers/tempAudit.ts";

export interface TableSpecInput {
  form: "onsager" | "thermoelectric";
  header: string[];
  rows: number[][];
  /** Extra YAML lines for the dataset (temperature, field, point, units, …), indented by 4 spaces. */
  dataset: string;
  settings?: string;
}

export async function ingestTable(t: TableSpecInput): Promise<IngestedAudit> {
  const csv = [t.header.join(","), ...t.rows.map((r) => r.map((v) => String(v)).join(","))].join("\n") + "\n";
  const yaml = `id: coeff-check
title: Constructed coefficients
authors:
  - { name: "A. Person" }
${t.settings ?? ""}
datasets:
  - id: constructed
    kind: coefficients
    file: data/c.csv
    form: ${t.form}
${t.dataset}${t.form === "thermoelectric" && !t.dataset.includes("units:") ? "\n    units: SI" : ""}
`;
  return ingestAudit(tempAudit(yaml, { "data/c.csv": csv }));
}

export async function runCheck(check: CheckDefinition, t: TableSpecInput, options: CheckOptions = {}): Promise<CheckResult> {
  const audit = await ingestTable(t);
  const results = check.run(audit, contextFor(audit.definition, options, check.id));
  if (results.length !== 1) throw new Error(`expected one result, got ${results.length}`);
  return results[0];
}
