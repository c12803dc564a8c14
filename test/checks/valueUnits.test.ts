// Every number a check writes into `values` must have an SI unit in the check's registry
// (src/checks/<id>/units.ts), so that no value reaches the result document without one. This test runs
// every check on the demo audits and on constructed fixtures that reach the less common branches
// (zero affinity, collinear channels, too few realisations, measured work, heat-only sweeps, coefficient
// tables in both forms, with and without a field, a 3×3 Onsager table, a cumulants series) and fails for
// any value key that is not registered, any number the registry leaves without a unit, and any unit not
// written as SI symbols (SI Brochure, 9th ed. (2019), Tables 2 and 4).
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { CHECKS } from "../../src/checks/index.ts";
import type { CheckResult } from "../../src/checks/types.ts";
import { isUnitText, numbersWithoutUnit, SHARED_UNITS, unitTexts, valueUnitsOf } from "../../src/checks/valueUnits.ts";
import type { AuditDefinition } from "../../src/config/types.ts";
import type { Dataset, IngestedAudit } from "../../src/ingest/types.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { runAudit, runChecks } from "../../src/report/runAudit.ts";
import { withValueUnits } from "../../src/report/resultDocument.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { ingestTable } from "./coefficientFixtures.ts";
import { exactExchangeData, fixtureDataset } from "./exchangeFixtures.ts";
import { E0, samplesDataset, tiltedGaussian } from "./fluctuation-dissipation.fixtures.ts";

const REPO = path.resolve(import.meta.dirname, "../..");
const SETTINGS = { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: "auto" as const, resamples: 200 };

/** What is wrong with one result's units: unregistered keys, numbers without a unit, misspelt units. */
function unitProblems(r: CheckResult): string[] {
  const registered = CHECKS.find((c) => c.id === r.check)?.units;
  if (!registered) return [`${r.check}: no units registry`];
  const withUnits = withValueUnits(r);
  const out: string[] = [];
  for (const key of Object.keys(r.values)) {
    if (!Object.hasOwn(registered, key) && !Object.hasOwn(SHARED_UNITS, key)) out.push(`${r.check}/${r.dataset}: value key ${key} is not registered in src/checks/${r.check}/units.ts`);
    else for (const p of numbersWithoutUnit(r.values[key], withUnits.units![key], key)) out.push(`${r.check}/${r.dataset}: ${p} has no unit`);
  }
  for (const [key, spec] of Object.entries(withUnits.units!)) for (const u of unitTexts(spec)) if (!isUnitText(u)) out.push(`${r.check}/${r.dataset}: ${key} has the unit ${JSON.stringify(u)}`);
  return out;
}

function auditOf(datasets: Dataset[]): IngestedAudit {
  return { dir: "/nonexistent", definition: { id: "units-test", settings: SETTINGS, checks: "all" } as unknown as AuditDefinition, datasets };
}

describe("the units registry of the checks", () => {
  it("spells every fixed unit with SI symbols and integer powers", () => {
    // Worked examples of the notation: the unit one, per joule, a product with powers.
    for (const ok of ["1", "J^-1", "J^2 s^-1", "W K^-1", "W Ω K^-2", "as written"]) expect(isUnitText(ok), ok).toBe(true);
    // Display units are not result units: meV and e²/h must never reach the result document.
    for (const bad of ["meV", "1/J", "e2/h", "J²/s", "", "W  K", "J^0.5"]) expect(isUnitText(bad), bad).toBe(false);
    for (const c of CHECKS) {
      for (const [key, rule] of Object.entries(c.units)) {
        if (typeof rule === "function") continue;
        for (const u of unitTexts(rule)) expect(isUnitText(u), `${c.id}.${key}: ${u}`).toBe(true);
      }
    }
  });

  it("leaves out a key the registry lacks instead of guessing, and keeps the values as they were", () => {
    const values = { slope: 0.98, invented_key: 3 };
    expect(valueUnitsOf(values, { slope: "1" })).toEqual({ slope: "1" });
    // A list of records under an object specification: each record member by member; a number the spec misses is named.
    expect(numbersWithoutUnit([{ T: 1, u: 2 }], { T: "K" }, "per_point")).toEqual(["per_point[0].u"]);
    // A matrix with entries of different units, element by element.
    expect(numbersWithoutUnit([[1, 2], [3, 4]], [["J^2 s^-1", "J s^-1"], ["J s^-1", "s^-1"]])).toEqual([]);
    expect(numbersWithoutUnit({ a: [1, 2] }, null, "x")).toEqual(["x.a[0]", "x.a[1]"]);
  });

  it("gives every value of every check on the demo audits a unit", async () => {
    const dirs = fs.readdirSync(path.join(REPO, "audits")).filter((d) => fs.existsSync(path.join(REPO, "audits", d, "audit.yaml")));
    expect(dirs.length).toBeGreaterThan(5);
    const problems: string[] = [];
    const seen = new Set<string>();
    for (const d of dirs) {
      const { result } = await runAudit(path.join(REPO, "audits", d));
      for (const c of result.checks) {
        seen.add(c.check);
        // The result document carries the map itself.
        expect(c.units, `${d}: ${c.check}`).toBeDefined();
        problems.push(...unitProblems(c));
      }
    }
    expect(problems).toEqual([]);
    // The demo archive exercises every check (each registry entry is reached at least once).
    expect([...seen].sort()).toEqual(CHECKS.map((c) => c.id).sort());
  }, 600_000);

  it("gives every value a unit on constructed fixtures that reach the rarer branches", async () => {
    const results: CheckResult[] = [];
    const runAll = (datasets: Dataset[]) => results.push(...runChecks(auditOf(datasets)));
    // Samples: measured work with particles; heat only; a collinear channel (Q = ε ΔN); too few realisations.
    const withWork = exactExchangeData({ seed: "units:work", n: 4000, TA: 1.3, TB: 1, muA: 0.2, withWork: true, heat: "gaussian", sQ: 1, lN: 1 });
    const heatOnly = exactExchangeData({ seed: "units:heat", n: 4000, TA: 1.3, TB: 1, withWork: false, heat: "laplace", sQ: 1 });
    const collinear = exactExchangeData({ seed: "units:collinear", n: 4000, TA: 1, TB: 1, muA: 0.3, withWork: false, heat: "gaussian", sQ: 1, lN: 1 });
    runAll([
      fixtureDataset({ id: "work", TA: 1.3, TB: 1, muA: 0.2, work: "measured", ...withWork }),
      fixtureDataset({ id: "heat", TA: 1.3, TB: 1, work: "zero", ...heatOnly, W: null, dN: null }),
      fixtureDataset({ id: "collinear", TA: 1, TB: 1, muA: 0.3, work: "zero", W: null, dN: collinear.dN, Q: Float64Array.from(collinear.dN!, (n) => 0.5 * n) }),
      fixtureDataset({ id: "few", TA: 1.3, TB: 1, work: "zero", W: null, Q: Float64Array.from([0.5, -0.2, 0.1]), dN: null }),
    ]);
    // Zero affinity (identical reservoirs, no work): the mirror-symmetry branch and the not-applicable ones.
    const rng = rngFromText("units:mirror");
    const mirrorQ = Float64Array.from({ length: 2000 }, () => rng.normal());
    runAll([fixtureDataset({ id: "mirror", TA: 1, TB: 1, work: "zero", W: null, Q: mirrorQ, dN: null })]);
    // A sweep without work (two channels) and one with measured work, heat only.
    const tilts: [number, number][] = [[0, 0], [0.3, 0], [0, 0.3], [-0.3, 0.15], [0.15, -0.3]];
    const C = [[4, 1.2], [1.2, 2.25]];
    const sweepRng = rngFromText("units:sweep");
    runAll(
      tilts.map(([aq, an], k) => {
        const [q, dn] = tiltedGaussian(sweepRng, C, [aq, an], 3000);
        return samplesDataset({ id: `tilt-${k}`, a_Q: aq / E0, a_N: an, beta_bar: 1 / E0, tau: 1e-9, sweep: "bias", W: null, Q: q.map((v) => v * E0), dN: dn });
      }),
    );
    runAll(
      [0, 0.3, -0.3, 0.15].map((aq, k) => {
        const [q] = tiltedGaussian(sweepRng, [[4]], [aq], 3000);
        const w = Float64Array.from(q, () => 0.3 * E0 * sweepRng.normal());
        return samplesDataset({ id: `heat-${k}`, a_Q: aq / E0, a_N: 0, beta_bar: 1 / E0, tau: 1e-9, sweep: "heat", W: w, Q: q.map((v) => v * E0), dN: null });
      }),
    );
    // Coefficient tables: thermoelectric with a field, and a 3×3 Onsager matrix (entries of undeclared units).
    const T = 4.2;
    const te = await ingestTable({
      form: "thermoelectric",
      header: ["Vg", "B", "G", "S", "Pi", "K", "u_G", "u_S", "u_Pi", "u_K"],
      rows: [-1, 1].flatMap((b) => [0, 1, 2].map((k) => [k, b, 30 + k, -20 - 10 * k, T * (-20 - 10 * k), 12, 0.2, 0.2, 0.2 * T, 0.1])),
      dataset: `    temperature: { value: ${T} }\n    field: { column: B }\n    point: [Vg]\n    units: { G: uS, S: uV/K, Pi: uV, K: pW/K }`,
    });
    results.push(...runChecks(te));
    const three = await ingestTable({
      form: "onsager",
      header: ["L11", "L12", "L13", "L21", "L22", "L23", "L31", "L32", "L33", "u_L11", "u_L12", "u_L13", "u_L21", "u_L22", "u_L23", "u_L31", "u_L32", "u_L33"],
      rows: [[2, 0.3, 0.1, 0.3, 1.5, 0.2, 0.1, 0.2, 1, ...Array(9).fill(0.01)]],
      dataset: "    temperature: { value: 1.0 }",
    });
    results.push(...runChecks(three));
    // A cumulants series (linear growth from a table of mean transfers).
    const rows = Array.from({ length: 30 }, (_, i) => `${(i + 1) * 0.5},${(0.2 * (i + 1) * 0.5).toFixed(6)},${(3 * (i + 1) * 0.5).toFixed(6)},0.01,0.05`);
    const series = await ingestAudit(
      tempAudit(
        `id: units-series\ntitle: Series\nauthors: [{ name: "Test Author" }]\ndatasets:\n  - id: ramp\n    kind: cumulants\n    file: data/ramp.csv\n    energy_unit: meV\n    time_unit: ns\n    series: ramp\n`,
        { "data/ramp.csv": `tau,Q,dN,u_Q,u_dN\n${rows.join("\n")}\n` },
      ),
    );
    results.push(...runChecks(series));
    const problems = results.flatMap(unitProblems);
    expect(problems).toEqual([]);
    // The fixtures reach branches the demos do not: the mirror-symmetry values and a 3×3 table.
    expect(results.some((r) => r.check === "exchange-fluctuation" && r.values.zero_affinity === true)).toBe(true);
    expect(results.map(withValueUnits).some((r) => r.check === "reciprocity" && r.dataset === "constructed" && (r.units?.comparisons as { left: string }[] | null)?.some((c) => c.left === "as written"))).toBe(true);
  }, 600_000);
});
