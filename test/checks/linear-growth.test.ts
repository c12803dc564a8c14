import { describe, expect, it } from "vitest";
import { runLinearGrowth } from "../../src/checks/linear-growth/linearGrowth.ts";
import type { CheckContext, CheckResult } from "../../src/checks/types.ts";
import type { AuditDefinition } from "../../src/config/types.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { Dataset, IngestedAudit } from "../../src/ingest/types.ts";
import { renderEquation } from "../../src/report/equations.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { tempAudit } from "../helpers/tempAudit.ts";
import { E0, samplesDataset, tiltedGaussian } from "./fluctuation-dissipation.fixtures.ts";

const SETTINGS = { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: "auto" as const, resamples: 2000 };
const ctx: CheckContext = { settings: SETTINGS, options: {}, rngFor: (d, s = "") => rngFromText(`${d}|${s}`) };

function run(datasets: Dataset[], options: Record<string, unknown> = {}): CheckResult[] {
  const audit: IngestedAudit = { dir: "/nonexistent", definition: { id: "lg-test", settings: SETTINGS } as unknown as AuditDefinition, datasets };
  return runLinearGrowth(audit, { ...ctx, options });
}

type ChannelValues = {
  verdict: string;
  flux: number;
  flux_se: number;
  window: { from: number; to: number; points: number };
  onset: { time: number } | null;
  end: { time: number } | null;
  finite_size: { kind: string } | null;
  transient: boolean;
};
const channel = (r: CheckResult, c: "Q" | "dN") => (r.values.channels as Record<string, ChannelValues>)[c];

/** Mean transfer (meV) of a delayed ramp: zero until tOn, slope J until tEnd, then constant (exact construction). */
function ramp(t: number, tOn: number, tEnd: number, J: number): number {
  return J * (Math.min(Math.max(t, tOn), tEnd) - tOn);
}

describe("linear-growth on a cumulants table", () => {
  // 40 contact times every 0.5 ns; onset at 3.2 ns, saturation at 14.3 ns, slope 0.2 meV/ns; noise 0.01 meV stated as u_Q.
  const step = 0.5;
  const rng = rngFromText("test:lg:cumulants");
  const rows = Array.from({ length: 40 }, (_, i) => {
    const t = (i + 1) * step;
    return `${t},${(ramp(t, 3.2, 14.3, 0.2) + 0.01 * rng.normal()).toFixed(6)},0.01`;
  });
  const dir = tempAudit(
    `id: lg-cumulants
title: Cumulants ramp
authors: [{ name: "Test Author" }]
datasets:
  - id: ramp
    kind: cumulants
    file: data/ramp.csv
    energy_unit: meV
    time_unit: ns
    series: chain-ramp
`,
    { "data/ramp.csv": `tau,Q,u_Q\n${rows.join("\n")}\n` },
  );

  it("finds the window between the delayed onset and the saturation within one sampling step, and the flux", async () => {
    const audit = await ingestAudit(dir);
    const [result] = runLinearGrowth(audit, ctx);
    expect(result.dataset).toBe("chain-ramp");
    const q = channel(result, "Q");
    const ns = 1e-9;
    // Exact construction: first sample after the onset is 3.5 ns, last before the saturation 14.0 ns.
    expect(Math.abs(q.window.from - 3.5 * ns)).toBeLessThanOrEqual(step * ns * (1 + 1e-9));
    expect(Math.abs(q.window.to - 14.0 * ns)).toBeLessThanOrEqual(step * ns * (1 + 1e-9));
    expect(Math.abs(q.onset!.time - 3.2 * ns)).toBeLessThanOrEqual(step * ns);
    expect(Math.abs(q.end!.time - 14.3 * ns)).toBeLessThanOrEqual(step * ns);
    // Flux: 0.2 meV/ns = 0.2e-3 e J / 1e-9 s with e exact (SI 2019); 4 standard errors of the window fit.
    const exact = (0.2e-3 * 1.602176634e-19) / 1e-9;
    expectClose(q.flux, exact, { atol: 4 * q.flux_se, source: "exact construction, 0.2 meV/ns; 4 standard errors" });
    expect(q.transient).toBe(true);
    expect(q.finite_size!.kind).toBe("saturation");
    expect(result.status).toBe("pass");
    expect(result.summary).toMatch(/^A stationary flux exists in series "chain-ramp": heat transfer grows linearly from τ = /);
    expect(result.summary).toContain("a transient precedes the window");
    expect(result.summary).toContain("finite-size saturation");
    for (const tex of result.equations) expect(renderEquation(tex)).toContain("katex");
    const plot = result.plots[0];
    expect(plot.series.find((s) => s.type === "span")).toBeDefined();
  });

  it("flags a recurrence when the transfer turns back", () => {
    const t = Array.from({ length: 30 }, (_, i) => (i + 1) * 1e-9);
    // Rises linearly to 20 ns, then falls back (exact construction).
    const y = t.map((x) => (x <= 20e-9 ? x : 40e-9 - x) * 1e-12);
    const ds: Dataset = {
      kind: "cumulants", id: "echo", file: "data/echo.csv", sha256: "fixture", rows: 30,
      config: { id: "echo", kind: "cumulants", file: "data/echo.csv", energy_unit: "J", time_unit: "s" },
      tau: Float64Array.from(t), Q: Float64Array.from(y), dN: null, u_Q: Float64Array.from(t, () => 1e-23), u_dN: null,
    };
    const [result] = run([ds]);
    expect(channel(result, "Q").finite_size!.kind).toBe("recurrence");
    expect(result.summary).toContain("the mean transfer turns back after the window (a recurrence");
  });
});

describe("linear-growth on samples datasets sharing a series", () => {
  /** Q(τ) Gaussian with mean J τ and variance 2 d τ: the transfer of a stationary process, linear in τ throughout. */
  function samplesSeries(taus: number[], n: number, seedText: string) {
    const rng = rngFromText(seedText);
    return taus.map((tau, k) => {
      const [q] = tiltedGaussian(rng, [[4 * tau * 1e9]], [0.5], n); // mean = 4τ·1e9·0.5/2 = τ·1e9 in units of E0
      return samplesDataset({ id: `tau-${k}`, a_Q: 0.5 / E0, a_N: 0, beta_bar: 1 / E0, tau, series: "contact", W: null, Q: q.map((v) => v * E0), dN: null });
    });
  }

  it("passes with the whole range linear, and says the end of the regime is not yet seen", () => {
    const taus = [1, 2, 3, 4, 5, 6, 7, 8].map((x) => x * 1e-9);
    // Margin 10 %: the slope change across the window has a standard error of about 2.3 % here, so a linear
    // curve clears the margin unless the estimate lands beyond about 2.7 standard errors.
    const [result] = run(samplesSeries(taus, 50000, "test:lg:samples"), { margin: 0.1 });
    const q = channel(result, "Q");
    expect(q.window.points).toBe(8);
    // Exact slope: <Q> = E0 · τ · 1e9, so J = E0 · 1e9 W; 4 standard errors.
    expectClose(q.flux, E0 * 1e9, { atol: 4 * q.flux_se, source: "exact tilted Gaussian, <Q> = E0 τ/ns; 4 standard errors" });
    expect(result.status).toBe("pass");
    expect(result.summary).toContain("the window reaches the longest contact time sampled, so where finite-size effects set in is not yet seen");
  });

  it("copes with contact times at which nothing has crossed yet (zero standard error)", () => {
    const rng = rngFromText("test:lg:delayed");
    const taus = [1, 2, 3, 4, 5, 6, 7, 8, 9].map((x) => x * 1e-9);
    const datasets = taus.map((tau, k) => {
      // Nothing crosses before 2.5 ns; afterwards <Q> = E0 (τ − 2.5 ns)/ns with unit-variance scatter per ns of contact.
      const grown = Math.max(0, tau * 1e9 - 2.5);
      const q = grown === 0 ? new Float64Array(2000) : tiltedGaussian(rng, [[2 * grown]], [1], 20000)[0];
      return samplesDataset({ id: `d-${k}`, a_Q: 1 / E0, a_N: 0, beta_bar: 1 / E0, tau, series: "delayed", W: null, Q: q.map((v) => v * E0), dN: null });
    });
    const [result] = run(datasets);
    const q = channel(result, "Q");
    expect(Number.isFinite(q.flux)).toBe(true);
    // Exact construction: the first contact time on the ramp is 3 ns; within one sampling step (1 ns).
    expect(Math.abs(q.window.from - 3e-9)).toBeLessThanOrEqual(1e-9 * (1 + 1e-9));
    expectClose(q.flux, E0 * 1e9, { atol: 4 * q.flux_se, source: "exact tilted Gaussian, slope E0 per ns; 4 standard errors" });
    expect(q.transient).toBe(true);
  });

  it("is inconclusive with too few contact times and says what to add", () => {
    const [result] = run(samplesSeries([1e-9, 2e-9, 3e-9], 1000, "test:lg:few"));
    expect(result.status).toBe("inconclusive");
    expect(result.reason).toBe("Sample at least 5 contact times (3 now).");
  });

  it("is not applicable when two datasets share a contact time", () => {
    const [result] = run(samplesSeries([1e-9, 2e-9, 2e-9, 3e-9], 100, "test:lg:dup"));
    expect(result.status).toBe("not-applicable");
    expect(result.reason).toBe('series "contact": tau-1 and tau-2 share the contact time 2e-9 s; a series needs one dataset per contact time.');
  });
});

describe("linear-growth verdicts", () => {
  it("fails when every run of five contact times curves significantly", () => {
    const t = Array.from({ length: 15 }, (_, i) => (i + 1) * 1e-9);
    const ds: Dataset = {
      kind: "cumulants", id: "runaway", file: "data/runaway.csv", sha256: "fixture", rows: 15,
      config: { id: "runaway", kind: "cumulants", file: "data/runaway.csv", energy_unit: "J", time_unit: "s" },
      tau: Float64Array.from(t), Q: null, dN: Float64Array.from(t, (x) => Math.exp(x / 2e-9)), u_Q: null, u_dN: Float64Array.from(t, () => 0.01),
    };
    const [result] = run([ds]);
    expect(result.status).toBe("fail");
    expect(result.summary).toBe(
      'Series "runaway" shows no stationary flux: particle transfer: every run of 5 consecutive contact times curves significantly, so the data contain no linear regime and no stationary particle flux.',
    );
  });

  it("respects the min_points option", () => {
    const t = Array.from({ length: 6 }, (_, i) => (i + 1) * 1e-9);
    const ds: Dataset = {
      kind: "cumulants", id: "short", file: "data/short.csv", sha256: "fixture", rows: 6,
      config: { id: "short", kind: "cumulants", file: "data/short.csv", energy_unit: "J", time_unit: "s" },
      tau: Float64Array.from(t), Q: Float64Array.from(t, (x) => x * 1e-12), dN: null, u_Q: null, u_dN: null,
    };
    expect(run([ds], { min_points: 8 })[0].reason).toBe("Sample at least 8 contact times (6 now).");
  });
});
