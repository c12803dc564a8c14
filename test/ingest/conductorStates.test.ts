import { describe, expect, it } from "vitest";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { SamplesDataset } from "../../src/ingest/types.ts";
import { ConfigError, DataError } from "../../src/errors.ts";
import { estimatedStateInfluence } from "../../src/ingest/conductorStates.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { rejectedWith } from "../helpers/thrown.ts";

function audit(datasetYaml: string, csv: string): string {
  return tempAudit(
    `id: states-test
title: Conductor states
authors: [{ name: "Test Author" }]
datasets:
  - id: dot
    kind: samples
    file: data/dot.csv
    energy_unit: kT
    reference_temperature: 1
    reservoirs: { A: { T: 1, mu: 2 }, B: { T: 1, mu: 0 } }
    work: measured
${datasetYaml}
`,
    { "data/dot.csv": csv },
  );
}

const load = async (yaml: string, csv: string) => (await ingestAudit(audit(yaml, csv))).datasets[0] as SamplesDataset;

const ROLES = "    columns: { dE_A: ea, dE_B: eb, dN_A: na, dN_B: nb, state_start: x0, state_end: x1, count: c }";
// A level at 1 k_B T (energy unit kT at 1 K), μ_A = 2, μ_B = 0, both leads at 1 K.
const CSV = `ea,eb,na,nb,x0,x1,c
0,1,0,1,1,0,3
-1,1,-1,1,0,0,2
-1,0,-1,0,0,1,4
0,0,0,0,1,1,1
`;

describe("samples with the conductor's states (physics.md §4b)", () => {
  it("computes Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) with p estimated from the start states", async () => {
    const d = await load(ROLES, CSV);
    // p(0) = (2 + 4)/10, p(1) = (3 + 1)/10 from the start states.
    expect(d.states!.probability).toEqual([0.6, 0.4]);
    expect(d.states!.source).toBe("estimated");
    // Row 1: lead B gains one electron at ε = 1, μ_B = 0: Σ_res = β_B(ε − μ_B) = 1; boundary ln 0.4 − ln 0.6.
    expectClose(d.states!.sigmaReservoirs[0], 1, { rtol: 1e-12, source: "Σ_res = Σ_X β_X(ΔE_X − μ_X ΔN_X)" });
    expectClose(d.sigma[0], 1 + Math.log(0.4) - Math.log(0.6), { rtol: 1e-12, source: "Seifert, PRL 95, 040602 (2005)" });
    // Row 3: lead A loses one electron at ε = 1, μ_A = 2: Σ_res = −β_A(ε − μ_A) = 1; boundary ln 0.6 − ln 0.4.
    expectClose(d.sigma[2], 1 + Math.log(0.6) - Math.log(0.4), { rtol: 1e-12, source: "Seifert, PRL 95, 040602 (2005)" });
    // The particle current is the symmetric split (dN_B − dN_A)/2.
    expect(Array.from(d.dN)).toEqual([0.5, 1, 0.5, 0]);
  });

  it("uses a declared stationary distribution", async () => {
    const d = await load(`${ROLES}\n    state_distribution: { 0: 0.25, 1: 0.75 }`, CSV);
    expect(d.states!.source).toBe("declared");
    expectClose(d.sigma[0], 1 + Math.log(0.75) - Math.log(0.25), { rtol: 1e-12, source: "Seifert, PRL 95, 040602 (2005)" });
  });

  it("the delta-method additions average to zero and match a numerical derivative of the statistic", async () => {
    const d = await load(ROLES, CSV);
    const s = d.states!;
    const w = d.weight!;
    // Statistic T(p) = ⟨e^{−Σ_res − b(p)}⟩; its additions a_i average to zero with the weights.
    const f = (p: number[]) => {
      let num = 0;
      let den = 0;
      for (let i = 0; i < w.length; i++) {
        const b = Math.log(p[s.start[i]]) - Math.log(p[s.end[i]]);
        num += w[i] * Math.exp(-s.sigmaReservoirs[i] - b);
        den += w[i];
      }
      return num / den;
    };
    const deriv = Float64Array.from(d.sigma, (x) => -Math.exp(-x));
    const a = estimatedStateInfluence(s, deriv, w);
    let mean = 0;
    for (let i = 0; i < w.length; i++) mean += w[i] * a[i];
    expect(Math.abs(mean)).toBeLessThan(1e-12);
    // Shifting p̂ by (−ε, +ε) changes T by Σ_x G_x δ_x/p_x = ε (a|start 1 − a|start 0) to first order.
    const aOf = (x: number) => a[s.start.findIndex((v) => v === x)];
    const eps = 1e-4;
    const linear = eps * (aOf(1) - aOf(0));
    const exact = f([0.6 - eps, 0.4 + eps]) - f([0.6, 0.4]);
    // Second-order remainder relative to the first-order term: O(ε/p) ≈ 3e-4.
    expectClose(linear, exact, { rtol: 1e-3, source: "first-order Taylor expansion (delta method)" });
  });

  it("refuses a state seen only at the end, naming the file, column and remedy", async () => {
    const e = await rejectedWith(DataError, () => load(ROLES, "ea,eb,na,nb,x0,x1,c\n-1,0,-1,0,0,1,4\n"));
    expect(e.message).toBe(
      'data/dot.csv, column "x0": state 1 occurs at the end of a realisation but never at its start, so the stationary probability cannot be estimated from the start states; record more realisations, or declare state_distribution in audit.yaml (audit.yaml datasets[0])',
    );
  });

  it("refuses non-integer state labels with file, line and column", async () => {
    const e = await rejectedWith(DataError, () => load(ROLES, "ea,eb,na,nb,x0,x1,c\n-1,0,-1,0,0.50,1,4\n"));
    expect(e.message).toBe('data/dot.csv:2, column "x0": expected an integer state label, found "0.50"');
  });

  it("refuses a declared distribution that misses a state", async () => {
    const e = await rejectedWith(DataError, () => load(`${ROLES}\n    state_distribution: { 0: 1 }`, CSV));
    expect(e.message).toBe("audit.yaml datasets[0].state_distribution: gives no probability for state 1, which data/dot.csv shows; declare the stationary probability of every state");
  });

  it("refuses half a pair of roles", async () => {
    const e = await rejectedWith(ConfigError, () => load("    columns: { dE_A: ea, dE_B: eb, dN_A: na, dN_B: nb, state_start: x0, count: c }", CSV));
    expect(e.message).toBe("audit.yaml datasets[0].columns: state_start and state_end go together (the conductor's state at both ends of a realisation); found only state_start");
    const f = await rejectedWith(ConfigError, () => load("    columns: { dE_A: ea, dE_B: eb, dN: nb, dN_A: na, dN_B: nb, count: c }", CSV));
    expect(f.message).toBe("audit.yaml datasets[0].columns: map either dN (particles gained by B, lost by A) or dN_A and dN_B (each lead's gain, when the conductor holds some), not both");
  });
});
