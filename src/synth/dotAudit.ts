import { synthAuditYamlHeader, type SynthAudit } from "./auditFolder.ts";
import { columnsToCsv } from "./csv.ts";
import { dotTransferDistribution } from "./dotCounting.ts";
import { affinityPerElectron, dotRates, meanCurrent, stationaryOccupation, type DotParameters } from "./dotRates.ts";
import { fermiOccupation } from "./fermi.ts";
import { gillespieDotTransfers } from "./gillespie.ts";
import { parseParameters, type SynthParameter } from "./parameters.ts";
import { betaPerMeV } from "./units.ts";
import { rngFromText } from "../stats/rng.ts";
import { InputError } from "../errors.ts";
import { countingSynthAudit } from "./countingAudit.ts";
import { cycleAffinity, dotModel } from "./dotModels.ts";
import type { ParameterValues } from "./parameters.ts";

export const DOT_REFERENCES = [
  "Gillespie, J. Comput. Phys. 22, 403 (1976): exact stochastic simulation of jump processes",
  "Bagrets & Nazarov, Phys. Rev. B 67, 085316 (2003): full counting statistics of sequential tunnelling",
  "Esposito, Harbola & Mukamel, Rev. Mod. Phys. 81, 1665 (2009): counting statistics and fluctuation theorems",
  "Seifert, Phys. Rev. Lett. 95, 040602 (2005): entropy production along a stochastic trajectory",
];

export const DOT_PARAMETERS: SynthParameter[] = [
  { name: "level", unit: "meV", description: "energy of the dot level", default: "0.1", type: "number" },
  { name: "rate-a", unit: "1/ns", description: "tunnelling rate Γ_A between the dot and lead A", default: "1", type: "number", min: 0, minExclusive: true },
  { name: "rate-b", unit: "1/ns", description: "tunnelling rate Γ_B between the dot and lead B", default: "1", type: "number", min: 0, minExclusive: true },
  { name: "temperature-a", unit: "K", description: "temperature of lead A", default: "1", type: "number", min: 0, minExclusive: true },
  { name: "temperature-b", unit: "K", description: "temperature of lead B", default: "1", type: "number", min: 0, minExclusive: true },
  { name: "mu-a", unit: "meV", description: "chemical potential of lead A", default: "0.05", type: "number" },
  { name: "mu-b", unit: "meV", description: "chemical potential of lead B", default: "0", type: "number" },
  { name: "tau", unit: "ns", description: "counting time", default: "5", type: "number", min: 0, minExclusive: true },
  {
    name: "start",
    unit: "",
    description:
      "state of the dot when counting starts: stationary (windows of one stationary trajectory, written with the dot's state at both ends, which makes the relations for the total entropy production exact at every counting time) or equilibrium-a (independent runs in equilibrium with lead A first, which makes the exchange relation for the leads alone exact)",
    default: "stationary",
    type: "choice",
    choices: ["stationary", "equilibrium-a"],
  },
  {
    name: "detector-heating",
    unit: "K",
    description:
      "temperature of a bath (a heating charge detector) that drives the transitions between the dot and lead A in place of lead A's electrons; audit.yaml still declares lead A's temperature, so the audit sees the back-action (stationary start only; none when not given)",
    default: "",
    type: "number",
    min: 0,
    minExclusive: true,
  },
  { name: "samples", unit: "trajectories", description: "number of simulated trajectories (windows of one trajectory for a stationary start)", default: "40000", type: "integer", min: 1 },
  { name: "seed", unit: "", description: "text that seeds the random numbers (same seed, same data)", default: "dot", type: "text" },
];

/**
 * The single-level dot: Gillespie trajectories counted into a histogram of the
 * net number n of electrons entering lead B (rows n, count), with the exact
 * finite-time distribution of n beside it. Energy into B is ε n; lead A and the
 * dot together lose the same, so W = 0 and the audit reads the work from the data.
 */
export function synthDot(raw: Record<string, string | undefined>): SynthAudit {
  const v = parseParameters(DOT_PARAMETERS, raw);
  const params: DotParameters = {
    level: v.level as number,
    rateA: v["rate-a"] as number,
    rateB: v["rate-b"] as number,
    beta: { A: betaPerMeV(v["temperature-a"] as number), B: betaPerMeV(v["temperature-b"] as number) },
    mu: { A: v["mu-a"] as number, B: v["mu-b"] as number },
  };
  const rates = dotRates(params);
  const start = v.start as string;
  if (start === "stationary") return stationaryDot(v, params);
  if (v["detector-heating"] !== undefined) throw new InputError("--detector-heating: needs --start stationary (the back-action is a property of the steady state)");
  const p0 = start === "stationary" ? stationaryOccupation(rates) : fermiOccupation(params.level, params.beta.A, params.mu.A);
  const tau = v.tau as number; // ns, rates in 1/ns
  const samples = v.samples as number;
  const { transferred } = gillespieDotTransfers(rates, p0, tau, samples, rngFromText(String(v.seed)));
  const counts = new Map<number, number>();
  for (const n of transferred) counts.set(n, (counts.get(n) ?? 0) + 1);
  const ns = [...counts.keys()].sort((a, b) => a - b);
  const eps = params.level;
  const exact = dotTransferDistribution(rates, p0, tau);
  let mean = 0;
  let second = 0;
  exact.probability.forEach((p, i) => {
    const n = exact.nMin + i;
    mean += p * n;
    second += p * n * n;
  });
  const affinity = affinityPerElectron(params);
  // The audit's entropy production here is Σ = A·dN (W = 0, Q = ε dN), so ⟨e^{−Σ}⟩ follows from P(n) exactly.
  let expMinusSigma = 0;
  exact.probability.forEach((p, i) => {
    expMinusSigma += p * Math.exp(-affinity * (exact.nMin + i));
  });
  const exactRelation =
    start === "equilibrium-a"
      ? "With the dot first in equilibrium with lead A, lead A and the dot form one grand-canonical reservoir and ln P(n)/P(−n) = A n holds exactly at every counting time (path reversal of the Markov process; Esposito, Harbola & Mukamel 2009), so the exchange and integral relations hold exactly."
      : "Counting starts in the stationary state: ln P(n)/P(−n) approaches A n at long times (Gallavotti–Cohen symmetry of the tilted generator; Bagrets & Nazarov 2003), with a finite-time correction from the dot's occupation at the two ends; the exact finite-time relation is Seifert's for the total entropy production, which includes that boundary term.";
  const expected = {
    model: "dot",
    about: "Exact finite-time distribution of the net number n of electrons entering lead B, from the number-resolved master equation solved by uniformisation. Energies in meV, times in ns.",
    references: DOT_REFERENCES,
    parameters: v,
    realisations: samples,
    rates_per_ns: rates,
    initial_occupation: p0,
    affinity_per_electron: affinity,
    long_time_current_per_ns: meanCurrent(params),
    relations: exactRelation,
    mean: { dN: mean, dE_B: eps * mean, dE_A: -eps * mean, W: 0 },
    exp_minus_sigma: expMinusSigma,
    variance: { dN: second - mean * mean },
    dN_distribution: { min: exact.nMin, probability: Array.from(exact.probability) },
  };
  const TA = v["temperature-a"];
  const TB = v["temperature-b"];
  const description = `Simulated electron counting through a single spinless level at ${eps} meV between leads A and B
(tunnelling rates ${params.rateA} and ${params.rateB} per ns, sequential tunnelling with Fermi-function rates),
over ${tau} ns, by Gillespie's algorithm (J. Comput. Phys. 22, 403 (1976)) with the dot starting ${start === "stationary" ? "in its stationary state" : "in equilibrium with lead A"}.
Each row is a net number dN of electrons entering B with its count; B gains the energy ε·dN and lead A together
with the dot loses it, so W = 0. The exact finite-time distribution (Bagrets & Nazarov, PRB 67, 085316 (2003);
Esposito, Harbola & Mukamel, RMP 81, 1665 (2009)) is in \`data/expected.json\`. ${exactRelation}
`;
  const yaml = synthAuditYamlHeader({
    model: "dot",
    id: "synth-dot",
    title: `Simulated electron counting through a single-level dot`,
    description,
    keywords: ["simulation", "quantum dot", "sequential tunnelling", "full counting statistics"],
  }) + `  - id: dot
    kind: samples
    file: data/dot.csv
    columns: { dE_A: dE_A, dE_B: dE_B, dN: dN, count: count }
    energy_unit: meV
    reservoirs:
      A: { T: ${TA}, mu: ${params.mu.A} }
      B: { T: ${TB}, mu: ${params.mu.B} }
    tau: ${tau * 1e-9}
    work: measured
checks: all
`;
  const rows = ns.map((n) => [-eps * n, eps * n, n, counts.get(n)!]);
  return {
    yaml,
    files: {
      "data/dot.csv": columnsToCsv(["dE_A", "dE_B", "dN", "count"], [0, 1, 2, 3].map((c) => rows.map((r) => r[c]))),
      "data/expected.json": `${JSON.stringify(expected, null, 2)}\n`,
    },
    summary: `${samples} trajectories in ${ns.length} histogram rows; exact ⟨dN⟩ = ${mean.toPrecision(4)}, affinity per electron ${affinity.toPrecision(4)}`,
  };
}

/**
 * Stationary start: windows of one stationary trajectory with the dot's occupation at both ends, so that
 * Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) obeys the exact relations at every τ (Seifert, PRL 95, 040602 (2005)).
 * With --detector-heating the A transitions follow a bath at that temperature while audit.yaml declares T_A:
 * the true affinity per electron is then β_B(ε − μ_B) − β_heat(ε − μ_A), and lead A's effective temperature
 * is exactly the bath's.
 */
function stationaryDot(v: ParameterValues, params: DotParameters): SynthAudit {
  const heatingK = v["detector-heating"] as number | undefined;
  const heatingBeta = heatingK === undefined ? null : betaPerMeV(heatingK);
  const dynamics = dotModel({ ...params, heatingBeta });
  const eps = params.level;
  const declaredAffinity = affinityPerElectron(params);
  const trueAffinity = cycleAffinity(eps, eps, heatingBeta ?? params.beta.A, params.beta.B, params.mu.A, params.mu.B, null);
  const tau = v.tau as number;
  const heated = heatingK !== undefined;
  const description = `Simulated electron counting through a single spinless level at ${eps} meV between leads A and B
(tunnelling rates ${params.rateA} and ${params.rateB} per ns, sequential tunnelling with Fermi-function rates): windows of
${tau} ns cut from one stationary trajectory simulated by Gillespie's algorithm (J. Comput. Phys. 22, 403 (1976)), ten
relaxation times apart. Each row gives the particles and energy each lead gained in a window, the dot's occupation at the
window's start and end, and how many windows did so. With the occupations, the total entropy production
Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) obeys the detailed and integral relations exactly at every counting time (Seifert,
PRL 95, 040602 (2005)). ${heated ? `A heating charge detector drives the transitions between the dot and lead A as a bath at ${heatingK} K, while the audit declares lead A at ${v["temperature-a"]} K: the relations must fail, and the effective temperature of lead A is ${heatingK} K.` : ""}
\`data/trace.csv\` holds the trajectory (time in ns, occupation after each jump); \`data/expected.json\` the exact joint law.
`;
  return countingSynthAudit({
    model: "dot",
    dynamics,
    charge: [0, 1],
    levelIn: eps,
    levelOut: eps,
    leads: { TA: v["temperature-a"] as number, TB: v["temperature-b"] as number, betaA: params.beta.A, betaB: params.beta.B, muA: params.mu.A, muB: params.mu.B },
    trueAffinity,
    declaredAffinity,
    effectiveTemperatureA: heatingK ?? null,
    tau,
    samples: v.samples as number,
    seed: String(v.seed),
    parameters: v,
    references: DOT_REFERENCES,
    title: heated ? "Simulated electron counting through a single-level dot with detector back-action" : "Simulated electron counting through a single-level dot",
    description,
    keywords: ["simulation", "quantum dot", "sequential tunnelling", "full counting statistics", "steady state"],
  });
}
