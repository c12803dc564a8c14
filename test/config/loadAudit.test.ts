import { describe, expect, it } from "vitest";
import { parseAuditDefinition } from "../../src/config/loadAudit.ts";
import { ConfigError } from "../../src/errors.ts";
import { thrownBy } from "../helpers/thrown.ts";
import { minimalAuditYaml } from "./minimalAudit.ts";

const valid = minimalAuditYaml();

function messageOf(source: string): string {
  return thrownBy(ConfigError, () => parseAuditDefinition(source)).message;
}

describe("parseAuditDefinition", () => {
  it("accepts a minimal audit and fills the default settings", () => {
    const def = parseAuditDefinition(valid);
    expect(def.id).toBe("demo-audit");
    expect(def.settings).toEqual({ alpha: 0.01, margin: 0.05, confidence: 0.95, seed: "auto", resamples: 2000 });
    expect(def.checks).toBe("all");
  });

  it("names the line, the key path, what is expected and what was found for a negative temperature", () => {
    expect(messageOf(valid.replace("A: { T: 1.3, mu: 0 }", "A: { T: -1.3, mu: 0 }"))).toBe(
      "audit.yaml:12 datasets[0].reservoirs.A.T: must be a positive number of kelvin, found -1.3",
    );
  });

  it("suggests the nearest valid key for a misspelt one", () => {
    expect(messageOf(valid.replace("energy_unit: meV", "energy_units: meV"))).toBe(
      [
        // energy_unit may be left out for HDF5 files only, so its absence is found after the keys (auditSchema.ts).
        "audit.yaml:10 datasets[0].energy_units: is not a known key (did you mean energy_unit?)",
        "audit.yaml:6 datasets[0].energy_unit: is missing; must be one of J, eV, meV, ueV, µeV, kT",
      ].join("\n"),
    );
  });

  it("rejects an id that cannot be a URL segment", () => {
    expect(messageOf(valid.replace("id: demo-audit", "id: Demo Audit"))).toBe(
      'audit.yaml:1 id: must use only lower-case letters, digits and single hyphens, e.g. dot-junction-sweep, found "Demo Audit"',
    );
  });

  it("requires exactly one of T and beta for a reservoir", () => {
    expect(messageOf(valid.replace("B: { T: 1.0, mu: 0 }", "B: { T: 1.0, beta: 2, mu: 0 }"))).toBe(
      "audit.yaml:13 datasets[0].reservoirs.B: must give exactly one of T (kelvin) or beta (per energy unit), found a map",
    );
  });

  it("reports an unknown dataset kind", () => {
    expect(messageOf(valid.replace("kind: samples", "kind: histogram"))).toBe(
      'audit.yaml:7 datasets[0].kind: kind must be one of samples, coefficients, cumulants, trace, found "histogram"',
    );
  });

  it("reports YAML syntax errors with their line", () => {
    expect(messageOf("id: x\ntitle: [unclosed\n")).toMatch(/^audit\.yaml:\d+: YAML syntax: /);
  });

  it("says a required key is missing, at the line of the map that lacks it", () => {
    expect(messageOf(valid.replace("title: A demo\n", ""))).toBe("audit.yaml:1 title: is missing; it is required");
  });

  it("rejects duplicate dataset ids", () => {
    const twice = valid + valid.slice(valid.indexOf("  - id: run-1"));
    expect(messageOf(twice)).toContain("datasets[1].id: duplicates the id of datasets[0]");
  });
});
