// False-failure rates of the verdict-bearing statistics on windows cut from simulated traces (a benchmark,
// not a test): every trace obeys the exact relations (a stationary Markov dot whose rates obey local
// detailed balance; Seifert, PRL 95, 040602 (2005)), so a FAIL is a false failure, and at α = 0.01 with
// Holm's correction over a check's tests a calibrated check fails at most about 1 % of the traces.
//
// 1. exchange-fluctuation on short windows of a slow dot (windows far shorter than the dwell times, so
//    neighbouring windows share the dot's state): the check's FAIL rate, and for comparison the rejection
//    rates of the binned χ² and the cubic score test as they were computed before (each window an
//    independent realisation) and as they are now (block sums; blockBinnedTest.ts, countingScoreTest).
// 2. steady-state-counting on four window lengths cut from one trace of a dot: FAIL rate and the coverage of
//    the exact A_∞ by its 95 % interval, now (joint block bootstrap of the time axis, generalised least
//    squares) and as before (slopes treated as independent, weighted least squares), and the FAIL rate with
//    a heating detector (the power to see a real violation).
// `npm run bench -- traceVerdicts`; TRACE_VERDICT_TRACES (default 200) sets the number of traces,
// TRACE_VERDICT_RESAMPLES (default 2000, as audits use) the bootstrap resamples of part 2,
// TRACE_VERDICT_PART ("exchange" or "counting") runs one part only.
import { traceWindowDatasets, type TraceSetting } from "../test/helpers/traceWindows.ts";
import { testContext } from "../test/checks/exchangeFixtures.ts";
import { exchangeFluctuationForDataset } from "../src/checks/exchange-fluctuation/exchangeFluctuation.ts";
import { binnedLogRatio } from "../src/checks/exchange-fluctuation/binnedLogRatio.ts";
import { steadyStateCountingForSeries } from "../src/checks/steady-state-counting/steadyStateCounting.ts";
import { withCountingCovariance } from "../src/checks/countingCovariance.ts";
import { fitExchangeLogistic, logisticScoreTest } from "../src/stats/logisticFit.ts";
import { weightedFit } from "../src/stats/weightedLeastSquares.ts";
import { stationaryDistribution } from "../src/synth/countingModel.ts";
import { cycleAffinity, dotModel } from "../src/synth/dotModels.ts";
import { betaPerMeV } from "../src/synth/units.ts";
import { rngFromText } from "../src/stats/rng.ts";

const ALPHA = 0.01;

function dotSetting(rateA: number, rateB: number, taus: number[], windowsOfShortest: number, heatingK: number | null = null): TraceSetting {
  const beta = betaPerMeV(1);
  const model = dotModel({ level: 0.1, rateA, rateB, beta: { A: beta, B: beta }, mu: { A: 0.2, B: 0 }, heatingBeta: heatingK === null ? null : betaPerMeV(heatingK) });
  return { model, stationary: stationaryDistribution(model), reservoirs: { A: { T: 1, mu: 0.2 }, B: { T: 1, mu: 0 } }, duration: windowsOfShortest * taus[0], taus };
}

function exchangePart(traces: number): Record<string, number> {
  // Γ_A = 1/ns, Γ_B = 0.1/ns, windows of 0.2 ns: the dot's state lives for 1–10 ns, 5–50 windows.
  const setting = dotSetting(1, 0.1, [0.2], 10000);
  const c = { fail: 0, binnedBefore: 0, binnedNow: 0, cubicBefore: 0, cubicNow: 0, blockLength: 0 };
  for (let k = 0; k < traces; k++) {
    const [d] = traceWindowDatasets(setting, rngFromText(`trace verdicts exchange ${k}`));
    c.blockLength += d.windows!.blockLength / traces;
    const before = binnedLogRatio(d.sigma, null, 10);
    if (before.pValue <= ALPHA) c.binnedBefore++;
    const fit = withCountingCovariance(d, fitExchangeLogistic([d.sigma], null), [d.sigma], "features");
    if (logisticScoreTest(fit, [d.sigma], [d.sigma.map((s) => s * s * s)], null).pValue <= ALPHA) c.cubicBefore++;
    const r = exchangeFluctuationForDataset(d, testContext());
    if (r.status === "fail") c.fail++;
    const tests = (r.values as { tests: { test: string; p_value: number }[] }).tests;
    if (tests.some((t) => t.test === "binned" && t.p_value <= ALPHA)) c.binnedNow++;
    if (tests.some((t) => t.test === "cubic" && t.p_value <= ALPHA)) c.cubicNow++;
  }
  return c;
}

function countingPart(traces: number, resamples: number, heatingK: number | null): Record<string, number> {
  // From Γτ = 2 on: at Γτ = 1 the slope has not reached its 1/τ approach, which the fit's lack-of-fit test sees.
  const taus = [2, 4, 8, 16];
  const setting = dotSetting(1, 1, taus, 20000, heatingK);
  const beta = betaPerMeV(1);
  const truth = cycleAffinity(0.1, 0.1, heatingK === null ? beta : betaPerMeV(heatingK), beta, 0.2, 0, null);
  const ctx = testContext();
  ctx.settings.resamples = resamples;
  const c = { fail: 0, covered: 0, failBefore: 0, coveredBefore: 0 };
  for (let k = 0; k < traces; k++) {
    const ds = traceWindowDatasets(setting, rngFromText(`trace verdicts counting ${heatingK ?? "none"} ${k}`), "dot");
    const r = steadyStateCountingForSeries("dot", ds, ctx);
    if (r.status === "fail") c.fail++;
    const v = r.values as { ci?: [number, number]; declared_affinity: number };
    if (v.ci && v.ci[0] <= truth && truth <= v.ci[1]) c.covered++;
    // As before: each τ's slope with its block sandwich error, the slopes independent, weighted least squares.
    const slopes = ds.map((d) => withCountingCovariance({ ...d, states: null }, fitExchangeLogistic([d.dN], null), [d.dN], "offset"));
    const se = slopes.map((f) => f.standardErrors[0]);
    const y = slopes.map((f) => f.coefficients[0]);
    const inv = weightedFit(taus.map((t) => [1, 1 / t]), y, se);
    const sqrt = weightedFit(taus.map((t) => [1, 1 / Math.sqrt(t)]), y, se);
    const u = Math.hypot(inv.standardErrors[0], sqrt.coefficients[0] - inv.coefficients[0]);
    const lo = inv.coefficients[0] - 1.959964 * u;
    const hi = inv.coefficients[0] + 1.959964 * u;
    if (lo <= truth && truth <= hi) c.coveredBefore++;
    const z = (inv.coefficients[0] - v.declared_affinity) / u;
    if (Math.abs(z) >= 2.575829) c.failBefore++; // two-sided at α = 0.01
  }
  return c;
}

export async function run(): Promise<Record<string, unknown>> {
  const traces = Number(process.env.TRACE_VERDICT_TRACES ?? 200);
  const resamples = Number(process.env.TRACE_VERDICT_RESAMPLES ?? 2000);
  const part = process.env.TRACE_VERDICT_PART ?? "all";
  const started = performance.now();
  const none = { fail: 0, covered: 0, failBefore: 0, coveredBefore: 0, binnedBefore: 0, binnedNow: 0, cubicBefore: 0, cubicNow: 0, blockLength: 0 };
  const ex = part === "counting" ? none : exchangePart(traces);
  const valid = part === "exchange" ? none : countingPart(traces, resamples, null);
  const heated = part === "exchange" ? none : countingPart(Math.max(20, Math.round(traces / 4)), resamples, 2.5);
  const rate = (x: number, n = traces) => x / n;
  // Binomial standard error of a rate near 0.01 over `traces` traces: √(0.01·0.99/traces).
  const se = Math.sqrt(0.0099 / traces);
  process.stdout.write(
    `   ${traces} traces; at α = ${ALPHA} a calibrated test rejects ${ALPHA} ± ${se.toFixed(3)} of them\n` +
      `   exchange-fluctuation, slow dot, 10000 windows of 0.2 ns (mean block ${ex.blockLength.toFixed(1)} windows):\n` +
      `     FAIL ${rate(ex.fail).toFixed(3)}; binned test rejects: before ${rate(ex.binnedBefore).toFixed(3)}, now ${rate(ex.binnedNow).toFixed(3)}; cubic score test: before ${rate(ex.cubicBefore).toFixed(3)}, now ${rate(ex.cubicNow).toFixed(3)}\n` +
      `   steady-state-counting, dot, τ = 2, 4, 8, 16 ns from one trace of 40000 ns (${resamples} resamples):\n` +
      `     FAIL ${rate(valid.fail).toFixed(3)} (before ${rate(valid.failBefore).toFixed(3)}); 95 % interval covers A_∞: ${rate(valid.covered).toFixed(3)} (before ${rate(valid.coveredBefore).toFixed(3)})\n` +
      `     with a detector heating lead A's transitions to 2.5 K: FAIL ${rate(heated.fail, Math.max(20, Math.round(traces / 4))).toFixed(3)} of ${Math.max(20, Math.round(traces / 4))} traces\n`,
  );
  return {
    traces,
    alpha: ALPHA,
    exchange: { ...ex, fail_rate: rate(ex.fail) },
    counting: { ...valid, fail_rate: rate(valid.fail), coverage: rate(valid.covered), coverage_before: rate(valid.coveredBefore) },
    counting_heated: heated,
    seconds: (performance.now() - started) / 1000,
  };
}
