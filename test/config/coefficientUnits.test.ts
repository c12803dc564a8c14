/**
 * Issue 22, smaller item: a thermoelectric table (G, S, Pi, K) is printed in
 * µS and µV/K as often as in SI, so its units must be declared: `units: SI`,
 * or each column's unit. Silence is refused, naming the line and the key.
 */
import { describe, expect, it } from "vitest";
import { parseAuditDefinition } from "../../src/config/loadAudit.ts";
import { ConfigError } from "../../src/errors.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { thrownBy } from "../helpers/thrown.ts";

const withUnits = (units: string, form = "thermoelectric") => `id: demo-audit
title: A demo
authors:
  - { name: "A. Person" }
datasets:
  - id: sweep
    kind: coefficients
    file: data/c.csv
    form: ${form}
    temperature: { value: 4.2 }
${units}`;

const messageOf = (source: string) => thrownBy(ConfigError, () => parseAuditDefinition(source)).message;

describe("units of a thermoelectric table", () => {
  it("refuses a table whose units are not declared", () => {
    expect(messageOf(withUnits(""))).toBe(
      "audit.yaml:6 datasets[0].units: is missing; the thermoelectric form needs its units declared: write units: SI when every column is in SI units (S, V/K, V, W/K), or give each column's unit, e.g. units: { G: uS, S: uV/K, Pi: uV, K: pW/K }",
    );
  });

  it("refuses a map that leaves a column's unit out", () => {
    expect(messageOf(withUnits("    units: { G: uS, Pi: uV }\n"))).toBe(
      "audit.yaml:11 datasets[0].units: must give the unit of each of G, S and K (and Pi when the table has it; missing: S, K); write SI units as S, V/K, V and W/K, or units: SI for all, e.g. units: { G: uS, S: uV/K, Pi: uV, K: pW/K }",
    );
  });

  it("refuses a units value that is neither SI nor a map", () => {
    expect(messageOf(withUnits("    units: si\n"))).toBe(
      'audit.yaml:11 datasets[0].units: must be SI, or a map from each column to its unit such as { G: uS, S: uV/K, Pi: uV, K: pW/K }, found "si"',
    );
  });

  it("accepts units: SI, and a map naming every column", () => {
    expect(parseAuditDefinition(withUnits("    units: SI\n")).datasets[0]).toMatchObject({ units: "SI" });
    expect(parseAuditDefinition(withUnits("    units: { G: S, S: V/K, K: W/K }\n")).datasets[0]).toMatchObject({ units: { G: "S", S: "V/K", K: "W/K" } });
  });

  it("leaves the Onsager form as it was: its L entries are SI unless units say otherwise", () => {
    expect(parseAuditDefinition(withUnits("", "onsager")).datasets[0]).not.toHaveProperty("units");
  });

  it("reads a table declared units: SI as SI, value for value, the same as spelling out S, V/K, V and W/K", async () => {
    const csv = "G,S,Pi,K\n2e-5,-3e-5,-6e-5,4e-12\n";
    const si = await ingestAudit(tempAudit(withUnits("    units: SI\n"), { "data/c.csv": csv }));
    const spelt = await ingestAudit(tempAudit(withUnits("    units: { G: S, S: V/K, Pi: V, K: W/K }\n"), { "data/c.csv": csv }));
    const points = (a: typeof si) => (a.datasets[0] as unknown as { points: { L: number[][] }[] }).points.map((p) => p.L);
    expect(points(si)).toEqual(points(spelt));
    expect(points(si)[0][0][0]).toBe(2e-5 * 4.2); // L11 = G T (Callen's matrix; physics.md)
  });
});
