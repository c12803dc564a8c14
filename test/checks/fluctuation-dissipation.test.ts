import { describe, expect, it } from "vitest";
import { runFluctuationDissipation } from "../../src/checks/fluctuation-dissipation/fluctuationDissipation.ts";
import type { CheckContext, CheckResult } from "../../src/checks/types.ts";
import type { IngestedAudit, SamplesDataset } from "../../src/ingest/types.ts";
import type { AuditDefinition } from "../../src/config/types.ts";
import { renderEquation } from "../../src/report/equations.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { E0, samplesDataset, tiltedGaussian } from "./fluctuation-dissipation.fixtures.ts";
import { texValue } from "../../src/checks/fluctuation-dissipation/presentation.ts";

const TAU = 1e-9;
const SETTINGS = { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: "auto" as const, resamples: 2000 };
const ctx: CheckContext = { settings: SETTINGS, options: {}, rngFor: (d, s = "") => rngFromText(`${d}|${s}`) };

function auditOf(datasets: SamplesDataset[]): IngestedAudit {
  return { dir: "/nonexistent", definition: { id: "fd-test", settings: SETTINGS } as unknown as AuditDefinition, datasets };
}

function run(datasets: SamplesDataset[]): CheckResult {
  const results = runFluctuationDissipation(auditOf(datasets), ctx);
  expect(results).toHaveLength(1);
  return results[0];
}

/** Dimensionless tilts (alpha_Q = a_Q·E0, a_N) around zero affinity. */
const TILTS: [number, number][] = [
  [0, 0],
  [0.3, 0],
  [0, 0.3],
  [-0.3, 0.15],
  [0.15, -0.3],
  [-0.2, -0.2],
];

// Untilted law of (Q/E0, dN): symmetric Gaussian with this covariance.
const C2 = [
  [4, 1.2],
  [1.2, 2.25],
];
const SCALE = [E0, 1];

/** physics §3: for P ∝ P0 e^{a·x/2} with symmetric P0, L = <x x^T>_0/(2τ) exactly; here C2 in SI units. */
const L_EXACT = C2.map((row, i) => row.map((c, j) => (c * SCALE[i] * SCALE[j]) / (2 * TAU)));

function noWorkSweep(seedText: string, n: number, declaredFactor = 1): SamplesDataset[] {
  const rng = rngFromText(seedText);
  return TILTS.map(([aq, an], k) => {
    const [q, dn] = tiltedGaussian(rng, C2, [aq, an], n);
    return samplesDataset({
      id: `tilt-${k}`,
      a_Q: (declaredFactor * aq) / E0,
      a_N: declaredFactor * an,
      beta_bar: 1 / E0,
      tau: TAU,
      sweep: "bias-sweep",
      W: null,
      Q: q.map((v) => v * E0),
      dN: dn,
    });
  });
}

function matrixOf(r: CheckResult, key: string): number[][] {
  return r.values[key] as number[][];
}

describe("fluctuation-dissipation on an exactly tilted family without work", () => {
  const result = run(noWorkSweep("test:fd:no-work", 40000));

  it("recovers the exact Onsager matrix from the means, the weighted means and the second moments", () => {
    for (const key of ["L_response", "L_weighted", "L_fluctuation"]) {
      const M = matrixOf(result, key);
      const se = matrixOf(result, `${key}_se`);
      for (let i = 0; i < 2; i++) {
        for (let j = 0; j < 2; j++) {
          // Exact value from the untilted law (physics §3); tolerance 4 standard errors of the fit (about 1 in 16 000 per entry).
          expectClose(M[i][j], L_EXACT[i][j], { atol: 4 * se[i][j], source: `exact tilted Gaussian, L = C/(2τ); ${key}[${i}][${j}], 4 standard errors` });
        }
      }
    }
  });

  it("has D = 0 and L~ = L exactly, and a spontaneous flux compatible with zero", () => {
    expect(matrixOf(result, "D")).toEqual([[0, 0], [0, 0]]);
    expect(matrixOf(result, "L_weighted")).toEqual(matrixOf(result, "L_response"));
    const s = result.values.spontaneous as number[];
    const se = result.values.spontaneous_se as number[];
    s.forEach((v, i) => expectClose(v, 0, { atol: 4 * se[i], source: "no work: s = <x>_0/τ = 0 exactly (physics §3); 4 standard errors" }));
  });

  it("passes, finds the sweep linear and says so in words", () => {
    expect(result.status).toBe("pass");
    expect((result.values.linearity as { method: string; linear: boolean }).method).toBe("quadratic terms");
    expect((result.values.linearity as { linear: boolean }).linear).toBe(true);
    expect(result.summary).toContain("the response matrix L (slopes of the mean fluxes <x>/τ) equals the fluctuation matrix <x xᵀ>₀/(2τ) within 5 % of √(Lf_ii Lf_jj) of the fluctuation matrix for each entry at 95 % confidence");
    expect(result.summary).toContain("L is symmetric (Onsager reciprocity) within 5 %");
  });

  it("typesets every equation with KaTeX (throwOnError)", () => {
    expect(result.equations.length).toBeGreaterThan(3);
    for (const tex of result.equations) expect(renderEquation(tex)).toContain("katex");
  });

  it("draws each flux against each affinity", () => {
    expect(result.plots.map((p) => p.id)).toEqual(["slice-Q-Q", "slice-Q-dN", "slice-dN-Q", "slice-dN-dN"]);
  });
});

describe("fluctuation-dissipation with switching work", () => {
  // Joint law of (W/E0, Q/E0, dN): symmetric Gaussian with W correlated to both currents, tilted by
  // exp((beta_bar W + a_Q Q + a_N dN)/2). Tilted mean C θ/2, so at zero affinity <x>_0 = C_xW β̄E0/2 = m0.
  const C3 = [
    [2.25, 2.4, 0.675],
    [2.4, 4, 1.2],
    [0.675, 1.2, 2.25],
  ];
  const rng = rngFromText("test:fd:work");
  const n = 40000;
  const datasets = TILTS.map(([aq, an], k) => {
    const [w, q, dn] = tiltedGaussian(rng, C3, [1, aq, an], n);
    return samplesDataset({
      id: `work-${k}`,
      a_Q: aq / E0,
      a_N: an,
      beta_bar: 1 / E0,
      tau: TAU,
      sweep: "gate-sweep",
      W: w.map((v) => v * E0),
      Q: q.map((v) => v * E0),
      dN: dn,
    });
  });
  const result = run(datasets);
  const m0 = [C3[1][0] / 2, C3[2][0] / 2]; // dimensionless mean transfer at zero affinity (β̄E0 = 1)
  // Exact algebra for the tilted Gaussian: L = C_xx/(2τ); L~ = (C_xx + m0 m0^T)/(2τ) = <x x^T>_0/(2τ); D = −m0 m0^T/(2τ); s = m0/τ.
  const exact = {
    L_response: C2.map((row, i) => row.map((c, j) => (c * SCALE[i] * SCALE[j]) / (2 * TAU))),
    L_weighted: C2.map((row, i) => row.map((c, j) => ((c + m0[i] * m0[j]) * SCALE[i] * SCALE[j]) / (2 * TAU))),
    L_fluctuation: C2.map((row, i) => row.map((c, j) => ((c + m0[i] * m0[j]) * SCALE[i] * SCALE[j]) / (2 * TAU))),
    D: C2.map((row, i) => row.map((_, j) => (-m0[i] * m0[j] * SCALE[i] * SCALE[j]) / (2 * TAU))),
  };

  it("recovers L, L~, L_fluct and D of the exact tilted law", () => {
    for (const [key, M0] of Object.entries(exact)) {
      const M = matrixOf(result, key);
      const se = matrixOf(result, `${key}_se`);
      for (let i = 0; i < 2; i++) {
        for (let j = 0; j < 2; j++) {
          expectClose(M[i][j], M0[i][j], { atol: 4 * se[i][j], source: `exact tilted Gaussian with work (derivation in the comment above); ${key}[${i}][${j}], 4 standard errors` });
        }
      }
    }
    const s = result.values.spontaneous as number[];
    const sse = result.values.spontaneous_se as number[];
    s.forEach((v, i) => expectClose(v, (m0[i] * SCALE[i]) / TAU, { atol: 4 * sse[i], source: "exact: s = m0/τ; 4 standard errors" }));
  });

  it("finds s and D significantly non-zero and L~ symmetric, and fits the curvature of the weighted fluxes", () => {
    const sig = result.values.work_signature as { spontaneous: { max_abs_z: number }; D: { max_abs_z: number } };
    expect(sig.spontaneous.max_abs_z).toBeGreaterThan(5);
    expect(sig.D.max_abs_z).toBeGreaterThan(5);
    // L~ symmetric: the antisymmetric difference is compatible with zero (4 standard errors) and no relation is violated.
    const Lw = matrixOf(result, "L_weighted");
    const cmp = (result.values.comparisons as { label: string; estimate: number; se: number }[]).find((c) => c.label === "L~[Q,N] − L~[N,Q]")!;
    expectClose(Lw[0][1] - Lw[1][0], 0, { atol: 4 * cmp.se, source: "weighted identity: L~ = <x x^T>_0/(2τ) is symmetric (physics §3); 4 standard errors" });
    const relations = result.values.relations as { relation: string; verdict: string }[];
    expect(relations.map((r) => r.relation)).toEqual(["fluctuation-response", "reciprocity", "no-spontaneous-flux"]);
    for (const r of relations) expect(r.verdict).not.toBe("violated");
    // The weighted fluxes curve visibly at these tilts (exp(−β̄W) weighting), so the fit takes the quadratic model;
    // 6 × 40 000 realisations resolve each comparison to about 3 % of its scale, short of the 5 % margin at 95 %.
    expect(result.values.model).toBe("quadratic");
    expect(result.status).toBe("inconclusive");
    // The factor is (z·se/(margin·scale − |estimate|))² for the worst comparison (standard errors ∝ 1/√n); the count is
    // that factor times the realisations each dataset has now.
    expect(result.reason).toMatch(
      /^Not every comparison is inside the 5 % margin yet; about [\d.]+ times as many realisations per dataset would resolve it at this spread \(standard errors fall as one over the square root of the count\): about [\d,]+ in each dataset \(now 40,000\)\.$/,
    );
    expect(result.summary).toContain("Switching work is present: the spontaneous flux s is significantly non-zero");
    expect(result.summary).toContain("D = L − L~ is significantly non-zero");
    for (const tex of result.equations) expect(renderEquation(tex)).toContain("katex");
  });
});

describe("fluctuation-dissipation verdicts and applicability", () => {
  it("fails when the declared affinities are half the true ones (slopes twice the fluctuation matrix)", () => {
    const result = run(noWorkSweep("test:fd:wrong-affinity", 5000, 0.5));
    expect(result.status).toBe("fail");
    expect(result.summary).toContain("the response matrix L (slopes of the mean fluxes <x>/τ) equals the fluctuation matrix <x xᵀ>₀/(2τ) is violated");
  });

  it("reduces to heat alone when no particles are exchanged", () => {
    const rng = rngFromText("test:fd:heat-only");
    const datasets = [-0.3, -0.1, 0.1, 0.3].map((aq, k) => {
      const [q] = tiltedGaussian(rng, [[4]], [aq], 20000);
      return samplesDataset({ id: `heat-${k}`, a_Q: aq / E0, a_N: 0, beta_bar: 1 / E0, tau: TAU, sweep: "heat", W: null, Q: q.map((v) => v * E0), dN: null });
    });
    const result = run(datasets);
    expect(result.values.channels).toEqual(["Q"]);
    const L = matrixOf(result, "L_response");
    const se = matrixOf(result, "L_response_se");
    expectClose(L[0][0], (4 * E0 * E0) / (2 * TAU), { atol: 4 * se[0][0], source: "exact tilted Gaussian, L_QQ = σ²E0²/(2τ); 4 standard errors" });
    expect(result.assumptions).toContain(
      "No particles are exchanged (no particle column, or every dN is zero): the problem reduces to heat alone, with a_Q the only affinity that drives a flux.",
    );
  });

  it("is not applicable to a sweep of two datasets", () => {
    const result = run(noWorkSweep("test:fd:two", 100).slice(0, 2));
    expect(result.status).toBe("not-applicable");
    expect(result.reason).toBe('sweep "bias-sweep" has 2 datasets (tilt-0, tilt-1); the response matrix needs at least three whose affinity vectors span the plane.');
  });

  it("is not applicable when the affinity vectors lie on one line", () => {
    const rng = rngFromText("test:fd:line");
    const datasets = [0, 0.1, 0.2, 0.3].map((t, k) => {
      const [q, dn] = tiltedGaussian(rng, C2, [t, 2 * t], 200);
      return samplesDataset({ id: `line-${k}`, a_Q: t / E0, a_N: 2 * t, beta_bar: 1 / E0, tau: TAU, sweep: "diagonal", W: null, Q: q.map((v) => v * E0), dN: dn });
    });
    const result = run(datasets);
    expect(result.status).toBe("not-applicable");
    expect(result.reason).toBe(
      'sweep "diagonal": the affinity vectors (a_Q, a_N) lie on one line, so they do not span the plane and the two columns of the response matrix cannot be separated; add a dataset off that line.',
    );
  });

  it("is not applicable when only some datasets record particles", () => {
    const ds = noWorkSweep("test:fd:mixed", 100);
    ds[2] = { ...ds[2], hasParticleColumn: false };
    const result = run(ds);
    expect(result.status).toBe("not-applicable");
    expect(result.reason).toBe('sweep "bias-sweep": tilt-2 map no particle column while other datasets record particle transfer; map dN in every dataset of the sweep (or in none).');
  });

  it("with a magnetic field compares only the symmetric part of L with the fluctuation matrix", () => {
    const ds = noWorkSweep("test:fd:field", 40000).map((d) => ({ ...d, config: { ...d.config, field: 0.5 } }));
    const result = run(ds);
    // physics §3 (Saito & Utsumi 2008): second moments fix only (L + L^T)/2 at B ≠ 0; no reciprocity test at one field.
    expect((result.values.comparisons as { label: string }[]).map((c) => c.label)).toEqual([
      "sym L[Q,Q] − L_fluct[Q,Q]",
      "sym L[Q,N] − L_fluct[Q,N]",
      "sym L[N,N] − L_fluct[N,N]",
    ]);
    expect(result.status).toBe("pass");
  });

  it("is not applicable when the datasets of a sweep sit at different fields", () => {
    const ds = noWorkSweep("test:fd:fields", 100).map((d, k) => ({ ...d, config: { ...d.config, field: k === 0 ? 0.5 : 0 } }));
    expect(run(ds).reason).toBe(
      'sweep "bias-sweep": the magnetic fields differ (tilt-0: 0.5 T, tilt-1: 0 T, tilt-2: 0 T, tilt-3: 0 T, tilt-4: 0 T, tilt-5: 0 T); a sweep shares one field.',
    );
  });

  it("returns nothing when no dataset names a sweep", () => {
    const ds = noWorkSweep("test:fd:none", 50).map((d) => ({ ...d, config: { ...d.config, sweep: undefined } }));
    expect(runFluctuationDissipation(auditOf(ds), ctx)).toEqual([]);
  });
});

describe("texValue", () => {
  it("writes a value with its uncertainty in the concise notation of the GUM", () => {
    // JCGM 100:2008 (GUM) §7.2.2 (from memory): the form "100.02147(35) g", uncertainty in units of the last digits shown.
    expect(texValue(1.9578e-40, 1.589e-42)).toBe("1.958(16)\\times 10^{-40}");
    expect(texValue(0.5, 0.012)).toBe("0.500(12)");
    expect(texValue(-2.5e6, 2.6e4)).toBe("-2.500(26)\\times 10^{6}");
    expect(renderEquation(texValue(1.9578e-40, 1.589e-42))).toContain("katex");
  });
});
