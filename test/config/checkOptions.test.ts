import { describe, expect, it } from "vitest";
import { parseAuditDefinition } from "../../src/config/loadAudit.ts";
import { runAudit } from "../../src/report/runAudit.ts";
import { tempAudit } from "../helpers/tempAudit.ts";

const head = `id: options
title: Options
authors: [{ name: "A. Person" }]
datasets:
  - { id: hot-left, kind: samples, file: data/a.csv, columns: { Q: q }, energy_unit: meV, reservoirs: { A: { T: 1.3 }, B: { T: 1 } }, work: zero, sweep: sweep-a }
  - { id: hot-right, kind: samples, file: data/b.csv, columns: { Q: q }, energy_unit: meV, reservoirs: { A: { T: 1 }, B: { T: 1.3 } }, work: zero, sweep: sweep-a }
  - { id: cold, kind: samples, file: data/c.csv, columns: { Q: q }, energy_unit: meV, reservoirs: { A: { T: 0.5 }, B: { T: 0.4 } }, work: zero }
`;

function errorOf(source: string): string {
  try {
    parseAuditDefinition(source);
  } catch (e) {
    return (e as Error).message;
  }
  throw new Error("expected a configuration error");
}

describe("checks: options and datasets per check", () => {
  it("accepts datasets by id or by sweep name, and declared options", () => {
    const def = parseAuditDefinition(`${head}checks:\n  - exchange-fluctuation: { datasets: [cold, sweep-a], margin: 0.1, min_bin_count: 8 }\n  - reciprocity: { dof: 4 }\n`);
    expect(def.checks).toEqual([{ "exchange-fluctuation": { datasets: ["cold", "sweep-a"], margin: 0.1, min_bin_count: 8 } }, { reciprocity: { dof: 4 } }]);
  });

  it("refuses an unknown dataset name with its key path, line and the nearest name", () => {
    expect(errorOf(`${head}checks:\n  - second-law: { datasets: [hot-lef] }\n`)).toBe(
      "audit.yaml:9 checks[0].second-law.datasets[0]: is not a dataset id, sweep or series of this audit (did you mean hot-left?): one of hot-left, sweep-a, hot-right, cold, found \"hot-lef\"",
    );
  });

  it("refuses a margin that is not a number, with key path, line and what is expected", () => {
    expect(errorOf(`${head}checks:\n  - reciprocity:\n      margin: "abc"\n`)).toBe(
      'audit.yaml:10 checks[0].reciprocity.margin: must be a number in (0, 1) (a fraction of the scale, e.g. 0.05), found "abc"',
    );
  });

  it("refuses an unknown option key, naming the valid keys and the nearest one", () => {
    expect(errorOf(`${head}checks:\n  - exchange-fluctuation: { margins: 0.1 }\n`)).toBe(
      "audit.yaml:9 checks[0].exchange-fluctuation.margins: is not an option of exchange-fluctuation (did you mean margin?); valid keys: datasets, margin, min_bin_count",
    );
    expect(errorOf(`${head}checks:\n  - figures-of-merit: { margin: 0.1 }\n`)).toBe(
      "audit.yaml:9 checks[0].figures-of-merit.margin: is not an option of figures-of-merit; valid keys: datasets",
    );
  });

  it("runs a check only on the named datasets and says which it skipped and why", async () => {
    const row = (k: number) => `${(k % 7) - 3}.5`;
    const csv = `q\n${Array.from({ length: 300 }, (_, k) => row(k)).join("\n")}\n`;
    const dir = tempAudit(`${head}checks:\n  - second-law: { datasets: [sweep-a] }\n`, { "data/a.csv": csv, "data/b.csv": csv, "data/c.csv": csv });
    const { result } = await runAudit(dir);
    expect(result.checks.map((c) => [c.dataset, c.status === "not-applicable" && (c.values as { skipped?: boolean }).skipped === true])).toEqual([
      ["hot-left", false],
      ["hot-right", false],
      ["cold", true],
    ]);
    expect(result.checks[2].summary).toBe("Skipped by choice: audit.yaml checks[0].second-law.datasets limits second-law to sweep-a, which does not include this dataset.");
  });
});
