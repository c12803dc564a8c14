/**
 * Issue 9, numerics: inputs at the edge of floating point or of the design of
 * an experiment end in a verdict with a reason (inconclusive, not-applicable)
 * or in an input error — never in an exception, an Infinity or a NaN passed
 * off as a result.
 *
 * Also covered elsewhere: a sweep with two datasets, and affinity vectors on one
 * line built directly as datasets (test/checks/fluctuation-dissipation.test.ts);
 * Σ that vanishes in every realisation (test/checks/equilibriumGuard.test.ts).
 */
import { describe, expect, it } from "vitest";
import { fmt } from "../../src/checks/helpers.ts";
import type { CheckResult } from "../../src/checks/types.ts";
import { ConfigError, DataError } from "../../src/errors.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import type { SamplesDataset } from "../../src/ingest/types.ts";
import { canonicalJson } from "../../src/report/canonicalJson.ts";
import { runAudit, runChecks } from "../../src/report/runAudit.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";
import { auditWith, cli, VALID_YAML } from "./harness.ts";

const STATUSES = ["pass", "fail", "inconclusive", "not-applicable", "info"];

/** A samples dataset (heat Q in meV, particles n) with the given reservoirs and options. */
function samplesYaml(id: string, file: string, reservoirs: string, extra = ""): string {
  return `  - id: ${id}
    kind: samples
    file: ${file}
    columns: { Q: q, dN: n }
    energy_unit: meV
    reservoirs: ${reservoirs}
    tau: 1.0e-6
    work: zero
${extra}`;
}

function audit(datasets: string, files: Record<string, string>, checks = ""): string {
  return auditWith(`id: numerics\ntitle: Numerics\nauthors: [{ name: "A. Person" }]\ndatasets:\n${datasets}${checks}`, files);
}

function table(rows: number, row: (i: number) => string): string {
  return `q,n\n${Array.from({ length: rows }, (_, i) => row(i)).join("\n")}\n`;
}

const HOT_LEFT = "{ A: { T: 1.3, mu: 0 }, B: { T: 1.0, mu: 0 } }";

function resultOf(results: CheckResult[], check: string, dataset?: string): CheckResult {
  const r = results.find((x) => x.check === check && (dataset === undefined || x.dataset === dataset));
  if (!r) throw new Error(`no result of ${check}`);
  return r;
}

describe("entropy productions that overflow exp", () => {
  // ±1 eV of heat between 1.3 K and 1.0 K: |Σ| ≈ 2.7e3 k_B, and e^{2.7e3} exceeds double precision (max ≈ e^{709.78});
  // below the ingest bound of 10^6 k_B (src/ingest/samplesRows.ts, SIGMA_LIMIT), so the checks work in log space.
  const dir = audit(samplesYaml("hot", "data/hot.csv", HOT_LEFT), { "data/hot.csv": table(400, (i) => `${i % 2 ? 1000 : -1000},0`) });

  it("computes ln⟨e^−Σ⟩ in log space and fails the integral relation, with no Infinity or NaN in the result", async () => {
    const ingested = await ingestAudit(dir);
    const S = Math.abs((ingested.datasets[0] as SamplesDataset).sigma[0]);
    expect(S).toBeGreaterThan(710);
    const results = runChecks(ingested);
    const integral = resultOf(results, "integral-fluctuation");
    expect(integral.status).toBe("fail");
    // Exact: half the realisations have Σ = −S, half Σ = +S, so ⟨e^−Σ⟩ = (e^S + e^−S)/2 and
    // ln⟨e^−Σ⟩ = S − ln 2 + ln(1 + e^−2S) = S − ln 2 to double precision (e^−2S underflows).
    // Tolerance: a few roundings of numbers of size S ≈ 2.7e3.
    expectClose(integral.values.log_mean as number, S - Math.LN2, { rtol: 1e-13, source: "exact arithmetic on a two-valued Σ" });
    expect(integral.values.mean).toBeNull();
    const logMean = integral.values.log_mean as number;
    expect(integral.summary).toBe(
      `ln⟨e^−Σ⟩ = ${fmt(logMean)} (⟨e^−Σ⟩ ≈ 10^${fmt(logMean / Math.LN10)}, beyond double precision; computed in log space), above 0 in every one of 2000 bootstrap resamples (p ≤ 5e-4 ≤ α = 0.01): the integral relation is violated, or the declared affinities or energy unit do not describe the data.`,
    );
    for (const r of results) {
      expect(STATUSES).toContain(r.status);
      expect(r.summary).not.toMatch(/Infinity|NaN/);
    }
  });

  it("prints a result document without Infinity through the command line, with exit status 1 for the failed check", async () => {
    const r = await cli(["run", dir, "--json"]);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe("");
    expect(r.stdout).not.toMatch(/Infinity|NaN/);
    const doc = JSON.parse(r.stdout);
    expect(doc.checks.find((c: CheckResult) => c.check === "integral-fluctuation").status).toBe("fail");
  });
});

describe("all realisations on one side", () => {
  it("is inconclusive, not a crash, when Σ > 0 in every realisation (no mirrored events)", async () => {
    const dir = audit(samplesYaml("forward", "data/f.csv", HOT_LEFT), { "data/f.csv": table(400, (i) => `${(0.01 + (i % 13) * 0.05).toFixed(2)},0`) });
    const results = (await runAudit(dir)).result.checks;
    const exchange = resultOf(results, "exchange-fluctuation");
    expect(exchange.status).toBe("inconclusive");
    expect(exchange.summary).toBe("Only 0 of 400 realisations have Σ < 0: too few to estimate the slope of ln P(Σ)/P(−Σ).");
    expect(resultOf(results, "second-law").status).toBe("pass");
  });

  it("is inconclusive, saying which side is empty, when Σ < 0 in every realisation; the second law fails", async () => {
    const dir = audit(samplesYaml("backward", "data/b.csv", HOT_LEFT), { "data/b.csv": table(400, (i) => `${(-0.01 - (i % 13) * 0.05).toFixed(2)},0`) });
    const results = (await runAudit(dir)).result.checks;
    const exchange = resultOf(results, "exchange-fluctuation");
    expect(exchange.status).toBe("inconclusive");
    expect(exchange.summary).toBe("No realisation has Σ > 0 while 400 have Σ < 0: without mirrored events the slope of ln P(Σ)/P(−Σ) cannot be estimated.");
    expect(exchange.reason).toBe(
      "The ratio needs realisations of both signs. Σ < 0 in nearly every run contradicts the declared affinities (are reservoirs A and B, or the sign of Q, swapped?); the second-law check judges the mean.",
    );
    expect(resultOf(results, "second-law").status).toBe("fail");
  });
});

describe("a singular sweep design", () => {
  const rng = rngFromText("robustness:numerics:sweep");
  const noise = () => table(300, () => `${((rng.uniform() - 0.5) * 0.2).toFixed(4)},${rng.int(3) - 1}`);

  it("is not applicable when every dataset of the sweep has the same affinities", async () => {
    const datasets = ["a", "b", "c"].map((id) => samplesYaml(id, `data/${id}.csv`, HOT_LEFT, "    sweep: flat\n")).join("");
    const dir = audit(datasets, { "data/a.csv": noise(), "data/b.csv": noise(), "data/c.csv": noise() }, "checks: [fluctuation-dissipation]\n");
    const [r] = (await runAudit(dir)).result.checks;
    expect(r.status).toBe("not-applicable");
    expect(r.reason).toBe(
      'sweep "flat": a_Q and a_N take the same value in every dataset, so the response to them cannot be separated from the spontaneous flux; vary a_Q and a_N between datasets.',
    );
  });

  it("is not applicable when the affinity vectors lie on one line (the design matrix has rank 2 of 3)", async () => {
    // (a_Q, a_N) = t·(u, v) for t = 1, 2, 3: β_A = β_B (1 − 0.01 t) and β_A μ_A = 0.001 t per k_B K … collinear by construction.
    const datasets = [1, 2, 3]
      .map((t) => {
        const TA = 1 / (1 - 0.01 * t);
        return samplesYaml(`t${t}`, `data/t${t}.csv`, `{ A: { T: ${TA}, mu: ${0.001 * t * TA} }, B: { T: 1.0, mu: 0 } }`, "    sweep: line\n");
      })
      .join("");
    const dir = audit(datasets, { "data/t1.csv": noise(), "data/t2.csv": noise(), "data/t3.csv": noise() }, "checks: [fluctuation-dissipation]\n");
    const [r] = (await runAudit(dir)).result.checks;
    expect(r.status).toBe("not-applicable");
    expect(r.reason).toBe(
      'sweep "line": the affinity vectors (a_Q, a_N) lie on one line, so they do not span the plane and the two columns of the response matrix cannot be separated; add a dataset off that line.',
    );
  });
});

describe("zero or negative contact time", () => {
  it("refuses tau: 0 and a negative tau in audit.yaml", async () => {
    await expect(ingestAudit(auditWith(VALID_YAML.replace("tau: 2.0e-9", "tau: 0")))).rejects.toThrow(
      new ConfigError("audit.yaml:14 datasets[0].tau: must be a positive number of seconds, found 0"),
    );
    await expect(ingestAudit(auditWith(VALID_YAML.replace("tau: 2.0e-9", "tau: -2.0e-9")))).rejects.toThrow(
      // Quoted as written in audit.yaml, not as JavaScript prints the number.
      new ConfigError("audit.yaml:14 datasets[0].tau: must be a positive number of seconds, found -2.0e-9"),
    );
  });

  it("refuses zero and negative contact times in a cumulants table, naming line and column", async () => {
    const yaml = "id: growth\ntitle: Growth\nauthors: [{ name: \"A. Person\" }]\ndatasets:\n  - id: g\n    kind: cumulants\n    file: data/g.csv\n";
    await expect(ingestAudit(auditWith(yaml, { "data/g.csv": "tau,Q\n0,0.1\n1,0.2\n-2,0.3\n" }))).rejects.toThrow(
      new DataError('data/g.csv:2, column "tau": expected a positive contact time, found "0"\ndata/g.csv:4, column "tau": expected a positive contact time, found "-2"'),
    );
  });
});

describe("mean-transfer tables at the ends of double precision (found by fuzzing)", () => {
  const growth = (timeUnit: string) =>
    `id: growth\ntitle: Growth\nauthors: [{ name: "A. Person" }]\ndatasets:\n  - id: g\n    kind: cumulants\n    file: data/g.csv\n    energy_unit: meV\n    time_unit: ${timeUnit}\n`;

  it("refuses uncertainties whose square, the weight of the fit, under- or overflows", async () => {
    await expect(ingestAudit(auditWith(growth("s"), { "data/g.csv": "tau,Q,u_Q,dN,u_dN\n1,0.1,0.01,1,5e-324\n2,0.2,0.01,2,0.1\n3,0.3,1e200,3,0.1\n" }))).rejects.toThrow(
      new DataError(
        'data/g.csv:2, column "u_dN": standard uncertainty "5e-324" cannot weight the fit: its square in SI units is below the range of double precision\n' +
          'data/g.csv:4, column "u_Q": standard uncertainty "1e200" cannot weight the fit: its square in SI units is beyond the range of double precision',
      ),
    );
  });

  it("refuses a mean transfer whose square, or whose square in units of its uncertainty, overflows", async () => {
    await expect(ingestAudit(auditWith(growth("s"), { "data/g.csv": "tau,Q,u_Q\n1,0.1,0.01\n2,1e308,0.01\n" }))).rejects.toThrow(
      new DataError('data/g.csv:3, column "Q": mean transfer "1e308" is beyond the range a least-squares fit can square in double precision; check the unit'),
    );
    await expect(ingestAudit(auditWith(growth("s"), { "data/g.csv": "tau,Q,u_Q\n1,0.1,0.01\n2,1e160,0.01\n" }))).rejects.toThrow(
      new DataError(
        'data/g.csv:3, column "Q": mean transfer "1e160" is 1.00e+162 times its standard uncertainty "0.01", beyond what a weighted fit can square in double precision; check the value and its uncertainty',
      ),
    );
  });

  it("refuses a contact time that is zero seconds once converted", async () => {
    await expect(ingestAudit(auditWith(growth("fs"), { "data/g.csv": "tau,Q\n1e-320,0.1\n2,0.2\n" }))).rejects.toThrow(
      new DataError('data/g.csv:2, column "tau": contact time "1e-320" fs is 0 s in double precision; give it in a larger time unit'),
    );
  });
});

describe("magnitudes at the ends of double precision", () => {
  const cases: Record<string, { yaml: string; csv: string }> = {
    "heat of 1e-300 meV (subnormal in joules)": { yaml: HOT_LEFT, csv: table(60, (i) => `${i % 2 ? 1e-300 : -1e-300},0`) },
    // 60 meV between 1.3 and 1.0 K: Σ ≈ 161 k_B, far into the tail and well inside the ingest bound of ±1e6 k_B.
    "one realisation beside a crowd at 1e-3": { yaml: HOT_LEFT, csv: table(60, (i) => `${i === 0 ? 60 : (i % 2 ? 1 : -1) * 1e-3},${(i % 3) - 1}`) },
  };
  for (const [name, c] of Object.entries(cases)) {
    it(`gives every check a status and a JSON-safe result: ${name}`, async () => {
      const results = runChecks(await ingestAudit(audit(samplesYaml("edge", "data/e.csv", c.yaml), { "data/e.csv": c.csv })));
      expect(results.length).toBeGreaterThan(0);
      for (const r of results) expect(STATUSES).toContain(r.status);
      // The canonical form is what is frozen on publish; it must exist and parse back.
      expect(() => JSON.parse(canonicalJson(results))).not.toThrow();
    });
  }

  it("refuses heat of 1e300 meV (Σ about 1e300 k_B, finite but beyond ±1e6 k_B), naming the row", async () => {
    const csv = table(60, (i) => `${i % 2 ? 1e300 : -5e299},${(i % 3) - 1}`);
    await expect(ingestAudit(audit(samplesYaml("edge", "data/e.csv", HOT_LEFT), { "data/e.csv": csv }))).rejects.toThrow(
      /^data\/e\.csv:2, column "q": dataset "edge": the entropy production of this row, Σ = -1\.34e300 k_B, is beyond ±1e6 k_B, /,
    );
  });

  it("refuses a histogram count above 2^53, where whole numbers stop being exact (IEEE 754 binary64)", async () => {
    const yaml = samplesYaml("counts", "data/c.csv", HOT_LEFT).replace("columns: { Q: q, dN: n }", "columns: { Q: q, dN: n, count: c }");
    const csv = `q,n,c\n${Array.from({ length: 40 }, (_, i) => `${i % 2 ? 0.1 : -0.1},${(i % 3) - 1},${i === 0 ? 1e300 : 5}`).join("\n")}\n`;
    await expect(ingestAudit(audit(yaml, { "data/c.csv": csv }))).rejects.toThrow(
      // The cell as written (the template literal wrote 1e300 as "1e+300"), not the double it became.
      'data/c.csv:2, column "c": expected a count (a whole number from 0 to 9007199254740991), found "1e+300"',
    );
  });
});
