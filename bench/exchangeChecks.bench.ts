// Speed of the exchange-statistics checks on 10^6 raw realisations (W, Q, ΔN all present) and on the
// same law as a histogram (target: each check in seconds on two cores).
import { exactExchangeData, fixtureDataset, testContext } from "../test/checks/exchangeFixtures.ts";
import { exchangeFluctuation } from "../src/checks/exchange-fluctuation/exchangeFluctuation.ts";
import { integralFluctuation } from "../src/checks/integral-fluctuation/integralFluctuation.ts";
import { secondLaw } from "../src/checks/second-law/secondLaw.ts";
import { work } from "../src/checks/work/work.ts";
import { weightedIdentity } from "../src/checks/weighted-identity/weightedIdentity.ts";
import { uncertaintyRelation } from "../src/checks/uncertainty-relation/uncertaintyRelation.ts";

export async function run(): Promise<Record<string, unknown>> {
  const n = Number(process.env.BENCH_REALISATIONS ?? 1_000_000);
  const g = exactExchangeData({ seed: "bench:exchange", n, TA: 1.3, TB: 1, muA: 0.4, withWork: true, heat: "gaussian", sQ: 1, sW: 0.6, lN: 1.2 });
  const d = fixtureDataset({ id: "bench", TA: 1.3, TB: 1, muA: 0.4, work: "measured", ...g });
  const audit = { dir: "", definition: {} as never, datasets: [d] };
  const seconds: Record<string, number> = {};
  for (const check of [exchangeFluctuation, integralFluctuation, secondLaw, work, weightedIdentity, uncertaintyRelation]) {
    const t0 = performance.now();
    const [r] = check.run(audit, testContext());
    seconds[check.id] = (performance.now() - t0) / 1000;
    process.stdout.write(`   ${check.id.padEnd(22)} ${seconds[check.id].toFixed(2)} s  (${r.status})\n`);
  }
  return { realisations: n, seconds };
}
