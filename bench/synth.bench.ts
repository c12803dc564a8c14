// Speed of the simulators: exact sampling of 10^5 two-point measurements on reservoirs of 60 and 40
// sites on the worker threads (target: well under a minute on two cores), plus the exact moments,
// Klich's distribution and the dot's Gillespie trajectories.
import os from "node:os";
import { buildFermionSystem } from "../src/synth/fermionModel.ts";
import { exactMoments } from "../src/synth/exactMoments.ts";
import { particleCountingDistribution } from "../src/synth/particleCounting.ts";
import { fermionTask } from "../src/synth/blockTask.ts";
import { runBlocks } from "../src/synth/workerPool.ts";
import { betaPerMeV, secondsToHbarPerMeV } from "../src/synth/units.ts";
import { dotRates, stationaryOccupation } from "../src/synth/dotRates.ts";
import { gillespieDotTransfers } from "../src/synth/gillespie.ts";
import { rngFromText } from "../src/stats/rng.ts";

function timed<T>(f: () => T): [T, number] {
  const t0 = performance.now();
  const v = f();
  return [v, (performance.now() - t0) / 1000];
}

export async function run(): Promise<Record<string, unknown>> {
  const realisations = Number(process.env.BENCH_SYNTH_REALISATIONS ?? 100_000);
  const workers = Math.min(2, os.availableParallelism());
  // The `synth fermions` defaults: 60- and 40-site chains, 12 K / 8 K, 0.4 meV bias, 0.5 meV contact, 15 ps.
  const [system, tBuild] = timed(() =>
    buildFermionSystem({
      A: { kind: "chain", length: 60, width: 1, hopping: 1, onsite: 0 },
      B: { kind: "chain", length: 40, width: 1, hopping: 1, onsite: 0 },
      contact: { strength: 0.5, bonds: 1, flux: 0 },
      thermo: { A: { beta: betaPerMeV(12), mu: 0.4 }, B: { beta: betaPerMeV(8), mu: 0 } },
    }),
  );
  const u = system.propagator.at(secondsToHbarPerMeV(15e-12));
  const [, tMoments] = timed(() => exactMoments(system, u));
  const [, tKlich] = timed(() => particleCountingDistribution(system, u));
  // CPU cost per realisation in this thread (less sensitive to other load than wall time).
  const probe = 2000;
  const probeCpu0 = process.cpuUsage();
  await runBlocks(fermionTask(system, u), probe, "bench probe", { workers: 0 });
  const probeCpu = process.cpuUsage(probeCpu0);
  const cpuPerRealisation = (probeCpu.user + probeCpu.system) / 1e6 / probe;
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const cols = await runBlocks(fermionTask(system, u), realisations, "bench", { workers });
  const tSample = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  const meanDN = cols[2].reduce((s, x) => s + x, 0) / realisations;
  const rates = dotRates({ level: 0.1, rateA: 1, rateB: 1, beta: { A: betaPerMeV(1), B: betaPerMeV(1) }, mu: { A: 0.05, B: 0 } });
  const [, tDot] = timed(() => gillespieDotTransfers(rates, stationaryOccupation(rates), 5, 100_000, rngFromText("bench dot")));
  const result = {
    fermions: {
      sites: [60, 40],
      realisations,
      workers,
      build_seconds: tBuild,
      exact_moments_seconds: tMoments,
      klich_distribution_seconds: tKlich,
      sampling_wall_seconds: tSample,
      realisations_per_second: realisations / tSample,
      main_thread_cpu_seconds: (cpu.user + cpu.system) / 1e6,
      cpu_seconds_per_realisation: cpuPerRealisation,
      projected_two_core_seconds: (cpuPerRealisation * realisations) / 2,
      sample_mean_dN: meanDN,
    },
    dot: { trajectories: 100_000, gillespie_seconds: tDot },
    load_average: os.loadavg(),
  };
  process.stdout.write(
    `   fermions 60+40 sites: ${realisations} exact realisations in ${tSample.toFixed(1)} s wall on ${workers} worker(s) ` +
      `(${(realisations / tSample).toFixed(0)}/s); set-up ${tBuild.toFixed(2)} s, exact moments ${tMoments.toFixed(2)} s, Klich ${tKlich.toFixed(2)} s\n` +
      `   CPU per realisation ${(cpuPerRealisation * 1e3).toFixed(3)} ms, so ${((cpuPerRealisation * realisations) / 2).toFixed(1)} s on two otherwise idle cores\n` +
      `   dot: 10^5 Gillespie trajectories in ${tDot.toFixed(2)} s\n` +
      `   load average ${os.loadavg().map((x) => x.toFixed(1)).join(" ")} (timings on a busy machine are longer)\n`,
  );
  return result;
}
