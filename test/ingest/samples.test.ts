import { describe, expect, it } from "vitest";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { SamplesDataset } from "../../src/ingest/types.ts";
import { ConfigError, DataError, UnitError } from "../../src/errors.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { rejectedWith } from "../helpers/thrown.ts";

const KB = 1.380649e-23; // J/K, exact (SI 2019)
const EV = 1.602176634e-19; // J, exact (SI 2019)

function audit(datasetYaml: string, csv: string): string {
  return tempAudit(
    `id: samples-test
title: Samples ingestion
authors: [{ name: "Test Author" }]
datasets:
  - id: runs
    kind: samples
    file: data/runs.csv
${datasetYaml}
`,
    { "data/runs.csv": csv },
  );
}

async function load(datasetYaml: string, csv: string): Promise<SamplesDataset> {
  return (await ingestAudit(audit(datasetYaml, csv))).datasets[0] as SamplesDataset;
}

function errorOf(datasetYaml: string, csv: string): Promise<Error> {
  return rejectedWith(Error, () => load(datasetYaml, csv));
}

describe("loadSamples", () => {
  it("derives W = dE_A + dE_B and Q = (dE_B − dE_A)/2 and computes Σ = β̄W + a_Q Q + a_N ΔN", async () => {
    const d = await load(
      `    columns: { dE_A: ea, dE_B: eb, dN: n }
    energy_unit: meV
    reservoirs: { A: { T: 2.0, mu: 0.1 }, B: { T: 1.0, mu: 0 } }
    work: measured
`,
      "ea,eb,n\n-0.3,0.5,1\n0.2,-0.1,-2\n",
    );
    const meV = 1e-3 * EV;
    const src = "physics §1 definitions; exact constants (SI 2019); rtol 1e-14, a few roundings";
    expectClose(d.W[0], 0.2 * meV, { rtol: 1e-14, source: src });
    expectClose(d.Q[0], 0.4 * meV, { rtol: 1e-14, source: src });
    expectClose(d.W_data![1], 0.1 * meV, { rtol: 1e-14, source: src });
    expectClose(d.Q[1], -0.15 * meV, { rtol: 1e-14, source: src });
    // Σ from the reservoir form β_A(ΔE_A − μ_A ΔN_A) + β_B(ΔE_B − μ_B ΔN_B), ΔN_A = −ΔN, ΔN_B = ΔN.
    const bA = 1 / (KB * 2);
    const bB = 1 / (KB * 1);
    const direct = bA * (-0.3 * meV - 0.1 * meV * -1) + bB * (0.5 * meV - 0);
    expectClose(d.sigma[0], direct, { rtol: 1e-12, source: "Σ in the reservoir form (Andrieux et al. 2009)" });
    expect(d.realisations).toBe(2);
    expect(d.weight).toBeNull();
  });

  it("gives Σ > 0 for heat flowing from the hotter reservoir with no work", async () => {
    // Sign check of physics §1: A hotter, q > 0 reaches B ⇒ Σ = (β_B − β_A) q > 0.
    const d = await load(`    columns: { Q: q }\n    energy_unit: ueV\n    reservoirs: { A: { T: 0.3 }, B: { T: 0.1 } }\n    work: zero\n`, "q\n5\n");
    expectClose(d.sigma[0], (1 / (KB * 0.1) - 1 / (KB * 0.3)) * 5e-6 * EV, { rtol: 1e-14, source: "a_Q = β_B − β_A (physics §1)" });
    expect(d.sigma[0]).toBeGreaterThan(0);
    expect(d.W_data).toBeNull();
  });

  it("reads energies in units of k_B T_ref and reservoirs given by beta per energy unit", async () => {
    const d = await load(
      `    columns: { Q: q, dN: n, W: w }
    energy_unit: kT
    reference_temperature: 0.5
    reservoirs: { A: { beta: 0.5, mu: 1 }, B: { beta: 1.5, mu: 0 } }
    work: measured
`,
      "q,n,w\n2,1,0.4\n",
    );
    const unit = KB * 0.5;
    expectClose(d.Q[0], 2 * unit, { rtol: 1e-15, source: "kT unit = k_B × 0.5 K (exact)" });
    // beta per unit ⇒ T = unit/(k_B beta): A at 1 K, B at 1/3 K.
    expectClose(d.reservoirs.A.T, 1, { rtol: 1e-14, source: "T = 1/(k_B β) with β = 0.5 per (k_B·0.5 K)" });
    // Dimensionless Σ is the same sum in the declared units: 0.4·(0.5 + 1.5)/2 + (1.5 − 0.5)·2 + (0.5·1 − 0)·1 = 2.9.
    expectClose(d.sigma[0], 2.9, { rtol: 1e-14, source: "Σ = β̄W + a_Q Q + a_N ΔN evaluated in declared units (exact arithmetic)" });
  });

  it("turns a count column into weights and counts realisations", async () => {
    const d = await load(`    columns: { Q: q, count: c }\n    energy_unit: J\n    reservoirs: { A: { T: 2 }, B: { T: 1 } }\n    work: zero\n`, "q,c\n1e-23,3\n-1e-23,0\n2e-23,4\n");
    expect(Array.from(d.weight!)).toEqual([3, 0, 4]);
    expect(d.realisations).toBe(7);
    expect(d.rows).toBe(3);
  });

  it("keeps the work found in the data when work: zero is declared, so that the declaration can be tested", async () => {
    const d = await load(`    columns: { Q: q, W: w }\n    energy_unit: meV\n    reservoirs: { A: { T: 2 }, B: { T: 1 } }\n    work: zero\n`, "q,w\n1,0.5\n");
    expect(d.W[0]).toBe(0);
    expectClose(d.W_data![0], 0.5e-3 * EV, { rtol: 1e-15, source: "1 meV = 10^−3 e J (exact)" });
  });
});

describe("loadSamples errors name file, row and column", () => {
  const heat = `    columns: { Q: q, count: c }\n    energy_unit: J\n    reservoirs: { A: { T: 2 }, B: { T: 1 } }\n    work: zero\n`;

  it("refuses a row whose entropy production overflows double precision, naming its line", async () => {
    // Σ = a_Q Q with a_Q ≈ 1/(k_B · 0.1 K) − 1/(k_B · 0.3 K) ≈ 4.8e23 1/J and Q = 1e305 eV ≈ 1.6e286 J: about 7.7e309,
    // beyond the largest double, 1.8e308 (IEEE 754 binary64).
    const err = await errorOf(`    columns: { Q: q }\n    energy_unit: eV\n    reservoirs: { A: { T: 0.3 }, B: { T: 0.1 } }\n    work: zero\n`, "q\n0.001\n1e305\n");
    expect(err).toBeInstanceOf(DataError);
    expect(err.message).toBe(
      `data/runs.csv:3, column "q": dataset "runs": the entropy production of this row is beyond double precision (|Σ| above 1.8e308 k_B); check energy_unit, the reservoirs' temperatures (or β) and chemical potentials, and the row's cells`,
    );
  });

  it("rejects counts that are not whole numbers, every bad row at once", async () => {
    const err = await errorOf(heat, "q,c\n1,2\n2,1.5\n3,-1\n");
    expect(err).toBeInstanceOf(DataError);
    expect(err.message).toBe(
      [
        'data/runs.csv:3, column "c": expected a count (a whole number from 0 to 9007199254740991), found "1.5"',
        'data/runs.csv:4, column "c": expected a count (a whole number from 0 to 9007199254740991), found "-1"',
      ].join("\n"),
    );
  });

  it("rejects a histogram with no realisations", async () => {
    const err = await errorOf(heat, "q,c\n1,0\n2,0\n");
    expect(err.message).toBe('data/runs.csv: every count in column "c" is zero; there are no realisations');
  });

  it("rejects a Q column that disagrees with the energy changes of the same row", async () => {
    const err = await errorOf(
      `    columns: { Q: q, dE_A: a, dE_B: b }\n    energy_unit: meV\n    reservoirs: { A: { T: 2 }, B: { T: 1 } }\n    work: measured\n`,
      "q,a,b\n0.5,-0.5,0.5\n0.7,-0.5,0.5\n",
    );
    expect(err).toBeInstanceOf(DataError);
    expect(err.message).toBe(
      'data/runs.csv:3, column "q": disagrees with (dE_B − dE_A)/2 from the dE_A and dE_B columns of the same row; map either the column or the energy changes, or correct the row',
    );
  });

  it("refuses measured work without a work column or both energy changes", async () => {
    const err = await errorOf(`    columns: { Q: q }\n    energy_unit: J\n    reservoirs: { A: { T: 2 }, B: { T: 1 } }\n    work: measured\n`, "q\n1\n");
    expect(err).toBeInstanceOf(ConfigError);
    expect(err.message).toBe(
      "audit.yaml datasets[0].work: is measured, but columns map neither W nor both dE_A and dE_B; map the work column, or declare work: zero if the protocol does none",
    );
  });

  it("refuses one energy change without the other", async () => {
    const err = await errorOf(`    columns: { Q: q, dE_A: a }\n    energy_unit: J\n    reservoirs: { A: { T: 2 }, B: { T: 1 } }\n    work: zero\n`, "q,a\n1,2\n");
    expect(err.message).toBe("audit.yaml datasets[0].columns: dE_A and dE_B go together; found only dE_A");
  });

  it("needs a reference temperature for energies in kT", async () => {
    const err = await errorOf(`    columns: { Q: q }\n    energy_unit: kT\n    reservoirs: { A: { T: 2 }, B: { T: 1 } }\n    work: zero\n`, "q\n1\n");
    expect(err).toBeInstanceOf(UnitError);
    expect(err.message).toBe("audit.yaml datasets[0].energy_unit: energy_unit kT needs reference_temperature (kelvin), the T in k_B T");
  });

  it("names the cell that is not a number", async () => {
    const err = await errorOf(heat, "q,c\n1,2\nseven,1\n");
    expect(err.message).toBe('data/runs.csv:3, column "q": expected a number, found "seven"');
  });
});
