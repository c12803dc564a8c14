// Coverage of the single-lead explanations of exchange-fluctuation (not a timed test): with one lead's
// temperature misdeclared (each lead in turn), draw many datasets from the exactly tilted family
// (src/synth/tiltedFamily.ts) at the true reservoirs, audit them against the declared ones, and count how
// often each explanation's 95 % interval holds its target: the true temperature of the misdeclared lead for
// its own explanation, and for the other lead the temperature that reproduces the true a_Q with the
// misdeclared lead held at its declared value. Nominal coverage is 0.95; with R datasets the Monte Carlo
// standard error of a coverage near 0.95 is √(0.95 · 0.05 / R). Sizes: BENCH_COVERAGE_RUNS (default 200),
// BENCH_COVERAGE_N realisations per dataset (default 5000).
import { sampleTilted } from "../src/synth/tiltedFamily.ts";
import { rngFromText } from "../src/stats/rng.ts";
import { exchangeFluctuationForDataset } from "../src/checks/exchange-fluctuation/exchangeFluctuation.ts";
import { fixtureDataset, testContext } from "../test/checks/exchangeFixtures.ts";

interface Explained {
  id: string;
  consistent: boolean;
  quantities: { name: string; interval: [number | null, number | null] | null }[];
}

function covers(e: Explained | undefined, name: string, target: number): boolean {
  const q = e?.quantities.find((x) => x.name === name);
  if (!q || !q.interval) return false;
  const [lo, hi] = q.interval;
  return lo !== null && lo <= target && (hi === null || target <= hi);
}

export async function run(): Promise<Record<string, unknown>> {
  const runs = Number(process.env.BENCH_COVERAGE_RUNS ?? 200);
  const n = Number(process.env.BENCH_COVERAGE_N ?? 5000);
  const declared = { TA: 1.3, TB: 1.0 }; // temperatures in K; energies in units of k_B · 1 K (fixtureDataset's E0)
  const out: Record<string, unknown> = { runs, realisations: n, nominal: 0.95 };
  for (const lead of ["A", "B"] as const) {
    const truth = lead === "A" ? { TA: 1.45, TB: declared.TB } : { TA: declared.TA, TB: 0.9 };
    const aQ = 1 / truth.TB - 1 / truth.TA;
    const target = { A: 1 / (1 / declared.TB - aQ), B: 1 / (1 / declared.TA + aQ) };
    let coverA = 0;
    let coverB = 0;
    let bothOffered = 0;
    for (let k = 0; k < runs; k++) {
      const z = sampleTilted({ theta: { W: 0, Q: aQ, N: 0 }, spreadW: 0, spreadQ: 1.4, correlation: 0, intensity: 0 }, n, rngFromText(`bench:coverage:${lead}:${k}`));
      const r = exchangeFluctuationForDataset(fixtureDataset({ id: `cover-${lead}-${k}`, ...declared, work: "zero", W: null, Q: z.Q, dN: null }), testContext());
      const es = new Map((r.values.explanations as Explained[]).map((e) => [e.id, e]));
      if (covers(es.get("lead-A-temperature"), "T_A", target.A)) coverA++;
      if (covers(es.get("lead-B-temperature"), "T_B", target.B)) coverB++;
      if (es.get("lead-A-temperature")?.consistent && es.get("lead-B-temperature")?.consistent) bothOffered++;
    }
    const se = Math.sqrt((0.95 * 0.05) / runs);
    const line = { misdeclared: `T_${lead}`, coverage_T_A: coverA / runs, coverage_T_B: coverB / runs, both_offered: bothOffered / runs, monte_carlo_se: se, targets: target };
    out[`misdeclared_T_${lead}`] = line;
    process.stdout.write(
      `   T_${lead} misdeclared: coverage of T_A-explanation ${(coverA / runs).toFixed(3)}, of T_B-explanation ${(coverB / runs).toFixed(3)} (nominal 0.95 ± ${se.toFixed(3)}); both offered in ${(100 * bothOffered / runs).toFixed(0)} %\n`,
    );
  }
  return out;
}
