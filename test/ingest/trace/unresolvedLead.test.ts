import { describe, expect, it } from "vitest";
import { ingestAudit } from "../../../src/ingest/loadAudit.ts";
import { runAudit } from "../../../src/report/runAudit.ts";
import type { TraceDataset } from "../../../src/ingest/types.ts";
import { ConfigError } from "../../../src/errors.ts";
import { synthDot } from "../../../src/synth/index.ts";
import { dotModel } from "../../../src/synth/dotModels.ts";
import { simulateTrajectory } from "../../../src/synth/countingModel.ts";
import { traceOccupancy } from "../../../src/ingest/trace/traceOccupancy.ts";
import { jumpRates } from "../../../src/checks/tunnelling-rates/tunnellingRates.ts";
import { rngFromText } from "../../../src/stats/rng.ts";
import { tempAudit } from "../../helpers/tempAudit.ts";
import { rejectedWith } from "../../helpers/thrown.ts";
import { expectClose } from "../../helpers/expectClose.ts";

/**
 * A charge sensor beside a single dot sees the occupation jump 0 → 1 and 1 → 0 but not through which lead.
 * The trace of `synth dot` (level 0.1 meV, Γ_A = Γ_B = 1/ns, T_A = T_B = 1 K, μ_A = 0.05 meV, μ_B = 0) is
 * declared with the lead unresolved. Exact rates (sequential tunnelling with Fermi-function rates, Beenakker,
 * PRB 44, 1646 (1991)): Γ_in = Γ_A f_A + Γ_B f_B, Γ_out = Γ_A (1 − f_A) + Γ_B (1 − f_B), with
 * f_X = 1/(1 + e^{(ε − μ_X)/k_B T}) and k_B = 8.617333262e-2 meV/K (CODATA 2018); the stationary occupation
 * Γ_in/(Γ_in + Γ_out) (Bagrets & Nazarov, PRB 67, 085316 (2003)).
 */
const KB_MEV = 8.617333262e-2;
const fermi = (e: number, mu: number, T: number) => 1 / (1 + Math.exp((e - mu) / (KB_MEV * T)));
const fA = fermi(0.1, 0.05, 1);
const fB = fermi(0.1, 0, 1);
const GAMMA_IN = 1e9 * (fA + fB); // 1/s
const GAMMA_OUT = 1e9 * (2 - fA - fB);

function unresolvedYaml(extra = ""): string {
  return `id: hidden-lead
title: Single dot, lead not resolved
authors: [{ name: "Test Author" }]
datasets:
  - id: dot-trace
    kind: trace
    file: data/trace.csv
    signal: transitions
    columns: { time: time, state: state }
    time_unit: ns
${extra}    energy_unit: meV
    reservoirs: { A: { T: 1, mu: 0.05 }, B: { T: 1, mu: 0 } }
    transitions:
      - { from: 0, to: 1, lead: unresolved }
      - { from: 1, to: 0, lead: unresolved }
`;
}

describe("a single-dot trace whose lead is unresolved", () => {
  const trace = synthDot({ samples: "3000", tau: "5", seed: "hidden lead" }).files["data/trace.csv"];

  it("is ingested as one trace dataset that keeps the time in each state and the jumps, and nothing per lead", async () => {
    const audit = await ingestAudit(tempAudit(unresolvedYaml(), { "data/trace.csv": trace }));
    expect(audit.datasets.map((d) => [d.id, d.kind])).toEqual([["dot-trace", "trace"]]);
    const d = audit.datasets[0] as TraceDataset;
    expect(d.unresolved).toEqual(["0 → 1", "1 → 0"]);
    expect(d.states.map((s) => s.label)).toEqual([0, 1]);
    // A two-state trace alternates: jumps out of 0 and out of 1 differ by at most one.
    const out0 = d.states[0].exits[0].count;
    const out1 = d.states[1].exits[0].count;
    expect(Math.abs(out0 - out1)).toBeLessThanOrEqual(1);
    // Times in the states add up to the record (exact up to rounding of the sums: 1e-12 relative).
    expectClose(d.states[0].time + d.states[1].time, d.duration, { rtol: 1e-12, source: "the record is partitioned into stays" });
  });

  it("reports the rates and occupation the trace determines, within their intervals of the simulator's exact values", async () => {
    const { result } = await runAudit(tempAudit(unresolvedYaml(), { "data/trace.csv": trace }));
    const rates = result.checks.find((c) => c.check === "tunnelling-rates")!;
    expect(rates.status).toBe("info");
    const byJump = new Map((rates.values.rates as { from: number; to: number; rate: number; rate_ci: [number, number] }[]).map((r) => [`${r.from}>${r.to}`, r]));
    for (const [key, exact] of [["0>1", GAMMA_IN], ["1>0", GAMMA_OUT]] as const) {
      const r = byJump.get(key)!;
      // The 95 % interval holds the exact rate (coverage over many traces is measured below).
      expect(r.rate_ci[0], `${key}: ${r.rate_ci} against ${exact}`).toBeLessThanOrEqual(exact);
      expect(r.rate_ci[1], `${key}: ${r.rate_ci} against ${exact}`).toBeGreaterThanOrEqual(exact);
    }
    const occ = rates.values.occupation as { state: number; from_rates: number; u_from_rates: number }[];
    const p1 = GAMMA_IN / (GAMMA_IN + GAMMA_OUT);
    // Within 3 standard uncertainties of the delta method (a 0.3 % chance of failing by chance for a fixed seed).
    expectClose(occ[1].from_rates, p1, { atol: 3 * occ[1].u_from_rates, source: "Γ_in/(Γ_in + Γ_out), Bagrets & Nazarov 2003" });
    // The single-level closed form for the delta method: u(p₁) = p₀ p₁ √(1/N_in + 1/N_out) (exact differentiation).
    const r01 = byJump.get("0>1")! as unknown as { jumps: number; rate: number };
    const r10 = byJump.get("1>0")! as unknown as { jumps: number; rate: number };
    const pHat = r01.rate / (r01.rate + r10.rate);
    expectClose(occ[1].u_from_rates, pHat * (1 - pHat) * Math.sqrt(1 / r01.jumps + 1 / r10.jumps), { rtol: 1e-6, source: "delta method, closed form for two states; finite-difference derivative" });
  });

  it("gives every check of the exchanged quantities not applicable, naming what is missing", async () => {
    const { result } = await runAudit(tempAudit(unresolvedYaml(), { "data/trace.csv": trace }));
    const needing = ["exchange-fluctuation", "integral-fluctuation", "second-law", "work", "weighted-identity", "uncertainty-relation", "linear-growth", "steady-state-counting"];
    for (const id of needing) {
      const r = result.checks.filter((c) => c.check === id && c.dataset === "dot-trace");
      expect(r.map((c) => c.status), id).toEqual(["not-applicable"]);
      expect(r[0].reason).toContain("the detector does not show which lead each electron used (audit.yaml declares lead: unresolved for 0 → 1, 1 → 0)");
      expect(r[0].reason).toContain("a charge sensor on a serial double dot");
    }
    // No other result speaks of this trace, and nothing passed: the stamp is inconclusive.
    expect(result.checks.filter((c) => c.dataset === "dot-trace").map((c) => c.check).sort()).toEqual([...needing, "tunnelling-rates"].sort());
    expect(result.stamp).toBe("inconclusive");
    // Every value of these results has its unit in the result document (src/checks/valueUnits.ts): a key the
    // registry lacks would be left out of `units`.
    for (const c of result.checks.filter((c) => c.dataset === "dot-trace")) {
      expect(Object.keys(c.units ?? {}).sort(), c.check).toEqual(Object.keys(c.values).sort());
    }
  });

  it("accepts no per-lead amounts beside lead: unresolved", async () => {
    const yaml = unresolvedYaml().replace("{ from: 0, to: 1, lead: unresolved }", "{ from: 0, to: 1, lead: unresolved, dN_A: -1 }");
    const e = await rejectedWith(ConfigError, () => ingestAudit(tempAudit(yaml, { "data/trace.csv": trace })));
    expect(e.message).toContain(
      "datasets[0].transitions[0].dN_A: must not be given with lead: unresolved (which lead gains it is what the trace does not show); remove it, or remove lead: unresolved",
    );
  });

  it("still needs windows when every lead is declared", async () => {
    const yaml = unresolvedYaml().replace("{ from: 0, to: 1, lead: unresolved }", "{ from: 0, to: 1, dN_A: -1, dE_A: -0.1 }").replace("{ from: 1, to: 0, lead: unresolved }", "{ from: 1, to: 0, dN_B: 1, dE_B: 0.1 }");
    const e = await rejectedWith(ConfigError, () => ingestAudit(tempAudit(yaml, { "data/trace.csv": trace })));
    expect(e.message).toBe("audit.yaml datasets[0].windows: is required: list the window lengths (in ns) to cut the trace into, e.g. windows: [3, 8]");
  });
});

describe("rate intervals from traces", () => {
  it("cover the exact rates at about the nominal 95 % over 400 simulated single-dot traces", () => {
    // Rates in 1/ns; traces of 150 ns hold about 60 jumps each way, where the Poisson interval is far from normal.
    const model = dotModel({ level: 0.1, rateA: 1, rateB: 1, beta: { A: 1 / KB_MEV, B: 1 / KB_MEV }, mu: { A: 0.05, B: 0 }, heatingBeta: null });
    const exact = new Map([["0>1", GAMMA_IN / 1e9], ["1>0", GAMMA_OUT / 1e9]]);
    const p0 = [1 - GAMMA_IN / (GAMMA_IN + GAMMA_OUT), GAMMA_IN / (GAMMA_IN + GAMMA_OUT)];
    const rng = rngFromText("rate coverage");
    let covered = 0;
    let total = 0;
    for (let k = 0; k < 400; k++) {
      const t = simulateTrajectory(model, p0, 150, rng);
      const times = Float64Array.from([0, ...t.times, 150]);
      const states = Int32Array.from([t.initial, ...t.states, t.states.length ? t.states[t.states.length - 1] : t.initial]);
      for (const r of jumpRates(traceOccupancy(times, states), 0.95)) {
        total++;
        const g = exact.get(`${r.from}>${r.to}`)!;
        if (r.interval[0] <= g && g <= r.interval[1]) covered++;
      }
    }
    // Binomial: 800 intervals at 95 % give 760 ± 6.2; Garwood's interval is conservative (coverage ≥ 95 %),
    // so at least 95 % − 3 standard deviations, and not above 99 % (a uselessly wide interval).
    expect(total).toBe(800);
    expect(covered / total).toBeGreaterThanOrEqual(0.95 - 3 * Math.sqrt((0.95 * 0.05) / 800));
    expect(covered / total).toBeLessThanOrEqual(0.99);
  });
});
