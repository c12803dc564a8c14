import { describe, it, expect } from "vitest";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { CoefficientsDataset } from "../../src/ingest/types.ts";
import { ConfigError, DataError, UnitError } from "../../src/errors.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { rejectedWith } from "../helpers/thrown.ts";

function yaml(dataset: string): string {
  return `id: coeff-test
title: Coefficient ingestion
authors:
  - { name: "A. Person" }
datasets:
  - id: sweep
    kind: coefficients
    file: data/c.csv
${dataset}
`;
}

async function load(dataset: string, csv: string): Promise<CoefficientsDataset> {
  const dir = tempAudit(yaml(dataset), { "data/c.csv": csv });
  const audit = await ingestAudit(dir);
  return audit.datasets[0] as CoefficientsDataset;
}

function failure(dataset: string, csv: string): Promise<Error> {
  return rejectedWith(Error, () => load(dataset, csv));
}

const thermo = `    form: thermoelectric
    temperature: { value: 2.0 }
    field: { column: B }
    point: [Vg]
    units: { G: uS, S: uV/K, Pi: uV, K: pW/K }`;

describe("loadCoefficients, thermoelectric form", () => {
  it("converts the declared units exactly and builds Callen's matrix L11 = G T, L12 = G S T², L21 = G Π T, L22 = T²(K + G S Π)", async () => {
    const d = await load(thermo, "Vg,B,G,S,Pi,K\n0.1,0.5,20,-30,-60,4\n0.1,-0.5,20,-30,-60,4\n");
    expect(d.form).toBe("thermoelectric");
    expect(d.points[0].inputs.values).toEqual([2e-5, -3e-5, -6e-5, 4e-12]); // exact SI (correctly rounded)
    const [G, S, Pi, K, T] = [2e-5, -3e-5, -6e-5, 4e-12, 2];
    const L = d.points[0].L;
    expectClose(L[0][0], G * T, { rtol: 1e-15, source: "Callen (1948) charge–heat form" });
    expectClose(L[0][1], G * S * T * T, { rtol: 1e-15, source: "Callen (1948)" });
    expectClose(L[1][0], G * Pi * T, { rtol: 1e-15, source: "Callen (1948)" });
    expectClose(L[1][1], T * T * (K + G * S * Pi), { rtol: 1e-14, source: "Callen (1948)" });
    expect(d.hasUncertainties).toBe(false);
    expect(d.units).toEqual({ G: "uS", S: "uV/K", Pi: "uV", K: "pW/K" });
  });

  it("pairs +B with −B rows at the same operating point and reports unpaired and duplicate rows with their lines", async () => {
    const csv = [
      "Vg,B,G,S,Pi,K",
      "0.1,0.5,20,-30,-60,4", // line 2 pairs with line 3
      "0.1,-0.5,20,-30,-60,4",
      "0.2,0.5,21,-31,-62,4", // line 4 unpaired
      "0.3,0.5,22,-32,-64,4", // lines 5, 6, 7 duplicate at +B
      "0.3,0.5,22,-32,-64,4",
      "0.3,-0.5,22,-32,-64,4",
      "0.4,0,23,-33,-66,4", // line 8 pairs with itself
    ].join("\n");
    const d = await load(thermo, csv);
    expect(d.pairs).toEqual([[0, 1], [6, 6]]);
    expect(d.points.map((p) => p.partner)).toEqual([1, 0, null, null, null, null, 6]);
    expect(d.findings.map((f) => [f.kind, f.rows])).toEqual([
      ["unpaired", [4]],
      ["duplicate", [5, 6, 7]],
    ]);
    expect(d.findings[0].message).toBe("row 4 (Vg = 0.2, B = 0.5 T) has no partner at B = -0.5 T; measure that point at the reversed field to test reciprocity there");
    expect(d.findings[1].message).toBe(
      "rows 5, 6, 7 give 2 row(s) at B = 0.5 T and 1 at B = -0.5 T for Vg = 0.3; with more than one candidate none is paired — keep one row per field sign (or average repeats before auditing)",
    );
  });

  it("reports paired rows measured at different temperatures, and keeps the pair", async () => {
    const ds = thermo.replace("temperature: { value: 2.0 }", "temperature: { column: T }");
    const d = await load(ds, "Vg,B,T,G,S,Pi,K\n0.1,0.5,2.0,20,-30,-60,4\n0.1,-0.5,2.1,20,-30,-60,4\n");
    expect(d.pairs).toEqual([[0, 1]]);
    expect(d.findings.map((f) => f.message)).toEqual([
      "rows 2 and 3 (Vg = 0.1, ±0.5 T) were measured at 2 K and 2.1 K; they are paired at their mean temperature",
    ]);
  });

  it("sets Π(B) = T S(−B) from the partner when there is no Pi column", async () => {
    const d = await load(thermo.replace(", Pi: uV", ""), "Vg,B,G,S,K\n0.1,0.5,20,-30,4\n0.1,-0.5,20,-10,4\n");
    expect(d.kelvinAssumed).toBe(true);
    expectClose(d.points[0].inputs.values[2], 2 * -1e-5, { rtol: 1e-15, source: "Kelvin–Onsager: Π(B) = T S(−B)" });
    expectClose(d.points[1].inputs.values[2], 2 * -3e-5, { rtol: 1e-15, source: "Kelvin–Onsager: Π(−B) = T S(B)" });
  });

  it("refuses a row with neither Pi nor a partner to supply it", async () => {
    const e = await failure(thermo.replace(", Pi: uV", ""), "Vg,B,G,S,K\n0.1,0.5,20,-30,4\n");
    expect(e).toBeInstanceOf(DataError);
    expect(e.message).toBe(
      "data/c.csv:2: there is no Pi column, so Π(B) must come from the Kelvin relation Π(B) = T S(−B), but this row (Vg = 0.1, B = 0.5 T) has no partner row at the reversed field; add a Pi column or the missing row",
    );
  });

  it("propagates u_ columns to first order into the uncertainties of L", async () => {
    const d = await load(thermo, "Vg,B,G,S,Pi,K,u_G,u_S,u_Pi,u_K\n0.1,0,20,-30,-60,4,1,2,3,0.5\n");
    const T = 2;
    expect(d.hasUncertainties).toBe(true);
    // L11 = G T → u = T u_G exactly.
    expectClose(d.points[0].uL![0][0], T * 1e-6, { rtol: 1e-15, source: "linear propagation (GUM, JCGM 100:2008 eq. 10)" });
    // L12 = G S T² → u² = (S T² u_G)² + (G T² u_S)².
    expectClose(d.points[0].uL![0][1], T * T * Math.hypot(-3e-5 * 1e-6, 2e-5 * 2e-6), { rtol: 1e-14, source: "linear propagation, GUM eq. 10" });
  });

  it("refuses an unknown unit naming the key and the accepted units", async () => {
    const e = await failure(thermo.replace("S: uV/K", "S: uV/C"), "Vg,B,G,S,Pi,K\n0.1,0,20,-30,-60,4\n");
    expect(e).toBeInstanceOf(UnitError);
    expect(e.message).toBe(
      'audit.yaml datasets[0].units.S: unknown unit "uV/C" for the Seebeck coefficient S; accepted: V/K with an optional prefix f, p, n, u (or µ), m or k, e.g. uV/K',
    );
  });

  it("refuses a units key that is not a column of the form", async () => {
    const e = await failure(thermo.replace("K: pW/K", "K: pW/K, T: mK"), "Vg,B,G,S,Pi,K\n0.1,0,20,-30,-60,4\n");
    expect(e).toBeInstanceOf(ConfigError);
    expect(e.message).toBe('audit.yaml datasets[0].units.T: "T" is not a value column of the thermoelectric form; units apply to G, S, Pi, K (u_ columns take the unit of their value column)');
  });

  it("refuses a units map that omits the Peltier coefficient of a table with a Pi column, naming file, key and role", async () => {
    // Π in µV read as volts would be 10^6 too large: a map that leaves a column out is refused, not read as SI.
    const e = await failure(thermo.replace(", Pi: uV", ""), "Vg,B,G,S,Pi,K\n0.1,0,20,-30,-60,4\n");
    expect(e).toBeInstanceOf(ConfigError);
    expect(e.message).toBe(
      'audit.yaml datasets[0].units: gives no unit for Pi (column "Pi" of data/c.csv); a map of units must give the unit of every coefficient column the table has, so that none is taken for SI unsaid: add it (in SI: Pi in V), or write units: SI when every column is in SI units',
    );
  });

  it("names the mapped column of a role left out of the units map, and reads the table when Pi is absent", async () => {
    const e = await failure(`${thermo.replace(", Pi: uV", "")}\n    columns: { Pi: peltier_uV }`, "Vg,B,G,S,peltier_uV,K\n0.1,0,20,-30,-60,4\n");
    expect(e.message).toMatch(/^audit\.yaml datasets\[0\]\.units: gives no unit for Pi \(column "peltier_uV" of data\/c\.csv\);/);
    // Without a Pi column Π comes from the Kelvin relation, and G, S and K are all the map must give.
    const d = await load(thermo.replace(", Pi: uV", ""), "Vg,B,G,S,K\n0.1,0,20,-30,4\n");
    expect(d.kelvinAssumed).toBe(true);
    expect(d.units).toEqual({ G: "uS", S: "uV/K", Pi: "SI", K: "pW/K" });
  });

  it("refuses incomplete uncertainty columns", async () => {
    const e = await failure(thermo, "Vg,B,G,S,Pi,K,u_G,u_K\n0.1,0,20,-30,-60,4,1,1\n");
    expect(e.message).toBe("data/c.csv: uncertainty columns are incomplete: found u_G, u_K but not u_S, u_Pi; give a u_ column for every coefficient, or none");
  });

  it("names file, line and column of a bad temperature and a negative uncertainty together", async () => {
    const ds = `    form: onsager
    temperature: { column: T }
    point: [Vg]`;
    const e = await failure(ds, "Vg,T,L11,L12,L21,L22,u_L11,u_L12,u_L21,u_L22\n1,4.2,1,0,0,1,0.1,0.1,0.1,0.1\n2,-1.0,1,0,0,1,0.1,-1e-1,0.1,0.1\n");
    expect(e).toBeInstanceOf(DataError);
    // The cells as written (-1.0, -1e-1), not the doubles they were read as (-1, -0.1).
    expect(e.message).toBe('data/c.csv:3, column "T": expected a positive temperature in kelvin, found "-1.0"\ndata/c.csv:3, column "u_L12": expected a standard uncertainty ≥ 0, found "-1e-1"');
  });
});

describe("loadCoefficients, onsager form", () => {
  const ds = `    form: onsager
    temperature: { value: 1.5 }
    point: [Vg]`;

  it("reads an n×n matrix from L<i><j> columns (here 3×3) and keeps SI values", async () => {
    const header = "Vg,L11,L12,L13,L21,L22,L23,L31,L32,L33";
    const d = await load(ds, `${header}\n0,1,2,3,4,5,6,7,8,9\n`);
    expect(d.n).toBe(3);
    expect(d.points[0].L).toEqual([[1, 2, 3], [4, 5, 6], [7, 8, 9]]);
    expect(d.points[0].partner).toBe(0);
    expect(d.parity).toEqual([1, 1, 1]);
  });

  it("refuses an incomplete matrix, naming the missing columns", async () => {
    const e = await failure(ds, "Vg,L11,L12,L22\n0,1,2,3\n");
    expect(e.message).toBe("data/c.csv: the onsager form needs the 2×2 matrix columns L11, L12, L21, L22; missing: L21");
  });

  it("maps roles to differently named columns with columns:", async () => {
    const d = await load(`${ds}\n    columns: { L12: l_qh, L21: l_hq }`, "Vg,L11,l_qh,l_hq,L22\n0,1,2,3,4\n");
    expect(d.points[0].L).toEqual([[1, 2], [3, 4]]);
  });

  it("converts declared units of the 2×2 charge–heat entries exactly (L11 in S K, L12 and L21 in A K, L22 in W K)", async () => {
    const d = await load(`${ds}\n    units: { L11: uS K, L12: nA K, L21: nA*K, L22: pW K }`, "Vg,L11,L12,L21,L22\n0,3,2,2,5\n");
    expect(d.points[0].L).toEqual([[3e-6, 2e-9], [2e-9, 5e-12]]);
    expect(d.units).toEqual({ L11: "uS K", L12: "nA K", L21: "nA*K", L22: "pW K" });
  });

  it("refuses a units map of the 2×2 matrix that omits entries, listing each with its SI unit", async () => {
    const e = await failure(`${ds}\n    units: { L11: uS K, L21: nA K }`, "Vg,L11,L12,L21,L22\n0,3,2,2,5\n");
    expect(e).toBeInstanceOf(ConfigError);
    expect(e.message).toBe(
      'audit.yaml datasets[0].units: gives no unit for L12, L22 (columns "L12", "L22" of data/c.csv); a map of units must give the unit of every coefficient column the table has, so that none is taken for SI unsaid: add them (in SI: L12 in A K, L22 in W K), or write units: SI when every column is in SI units',
    );
  });

  it("refuses an empty units map for a matrix larger than 2×2, as it refuses any unit there", async () => {
    const header = "L11,L12,L13,L21,L22,L23,L31,L32,L33";
    const e = await failure(`${ds.replace("    point: [Vg]", "")}\n    units: {}`, `${header}\n1,0,0,0,1,0,0,0,1\n`);
    expect(e.message).toBe(
      "audit.yaml datasets[0].units: units are accepted only for the 2×2 charge–heat matrix (L11 in S K, L12 and L21 in A K, L22 in W K); give the 3×3 entries in SI and drop units",
    );
  });

  it("refuses units for a matrix larger than 2×2", async () => {
    const header = "L11,L12,L13,L21,L22,L23,L31,L32,L33";
    const e = await failure(`${ds.replace("    point: [Vg]", "")}\n    units: { L11: uS K }`, `${header}\n1,0,0,0,1,0,0,0,1\n`);
    expect(e.message).toBe(
      "audit.yaml datasets[0].units.L11: units are accepted only for the 2×2 charge–heat matrix (L11 in S K, L12 and L21 in A K, L22 in W K); give the 3×3 entries in SI and drop units",
    );
  });

  it("refuses a parity list of the wrong length", async () => {
    const e = await failure(`${ds}\n    parity: [1, -1, 1]`, "Vg,L11,L12,L21,L22\n0,1,2,3,4\n");
    expect(e.message).toBe("audit.yaml datasets[0].parity: lists 3 parities but the matrix has 2 fluxes; give one +1 or -1 per flux");
  });
});
