import type { SynthAudit } from "./auditFolder.ts";
import { countingSynthAudit } from "./countingAudit.ts";
import { cycleAffinity, doubleDotModel } from "./dotModels.ts";
import { parseParameters, type SynthParameter } from "./parameters.ts";
import { betaPerMeV, JOULES_PER_MEV } from "./units.ts";
import { BOLTZMANN } from "../physics/constants.ts";

export const DOUBLE_DOT_REFERENCES = [
  "Gillespie, J. Comput. Phys. 22, 403 (1976): exact stochastic simulation of jump processes",
  "van der Wiel et al., Rev. Mod. Phys. 75, 1 (2002): electron transport through double quantum dots",
  "Fujisawa, Hayashi, Tomita & Hirayama, Science 312, 1634 (2006): bidirectional counting of single electrons",
  "Seifert, Phys. Rev. Lett. 95, 040602 (2005): entropy production along a stochastic trajectory",
  "Utsumi et al., Phys. Rev. B 81, 125331 (2010): bidirectional counting statistics and detector back-action",
];

export const DOUBLE_DOT_PARAMETERS: SynthParameter[] = [
  { name: "level", unit: "meV", description: "energy of the two dot levels (their mean when detuned)", default: "0.1", type: "number" },
  { name: "rate-a", unit: "1/ns", description: "tunnelling rate between lead A and the left dot", default: "1", type: "number", min: 0, minExclusive: true },
  { name: "rate-b", unit: "1/ns", description: "tunnelling rate between the right dot and lead B", default: "1", type: "number", min: 0, minExclusive: true },
  { name: "rate-inter", unit: "1/ns", description: "inter-dot tunnelling rate (sum of the two directions over 2)", default: "1.5", type: "number", min: 0, minExclusive: true },
  { name: "temperature-a", unit: "K", description: "temperature of lead A", default: "1", type: "number", min: 0, minExclusive: true },
  { name: "temperature-b", unit: "K", description: "temperature of lead B", default: "1", type: "number", min: 0, minExclusive: true },
  { name: "mu-a", unit: "meV", description: "chemical potential of lead A", default: "0.08", type: "number" },
  { name: "mu-b", unit: "meV", description: "chemical potential of lead B", default: "0", type: "number" },
  {
    name: "detector-heating",
    unit: "K",
    description:
      "temperature of a bath (a heating charge detector) that drives the inter-dot jumps; the levels are then detuned by --detuning and each inter-dot jump exchanges that energy with the detector, which audit.yaml does not declare (none when not given)",
    default: "",
    type: "number",
    min: 0,
    minExclusive: true,
  },
  { name: "detuning", unit: "meV", description: "left level minus right level, used with --detector-heating", default: "0.05", type: "number" },
  { name: "tau", unit: "ns", description: "window length", default: "5", type: "number", min: 0, minExclusive: true },
  { name: "samples", unit: "windows", description: "number of windows cut from one stationary trajectory", default: "40000", type: "integer", min: 1 },
  { name: "seed", unit: "", description: "text that seeds the random numbers (same seed, same data)", default: "double-dot", type: "text" },
];

/**
 * Serial double dot between leads A and B, counted by a charge detector that resolves the three charge
 * states (empty, left, right) and hence every electron's direction (Fujisawa et al., Science 312, 1634
 * (2006)). Windows of one stationary trajectory with the charge state at both ends, as `synth dot`.
 */
export function synthDoubleDot(raw: Record<string, string | undefined>): SynthAudit {
  const v = parseParameters(DOUBLE_DOT_PARAMETERS, raw);
  const heatingK = v["detector-heating"] as number | undefined;
  const heated = heatingK !== undefined;
  const detuning = heated ? (v.detuning as number) : 0;
  const level = v.level as number;
  const levelLeft = level + detuning / 2;
  const levelRight = level - detuning / 2;
  const TA = v["temperature-a"] as number;
  const TB = v["temperature-b"] as number;
  const leads = { beta: { A: betaPerMeV(TA), B: betaPerMeV(TB) }, mu: { A: v["mu-a"] as number, B: v["mu-b"] as number } };
  const interBeta = heated ? betaPerMeV(heatingK) : null;
  const dynamics = doubleDotModel({ levelLeft, levelRight, rateA: v["rate-a"] as number, rateB: v["rate-b"] as number, rateInter: v["rate-inter"] as number, ...leads, interBeta });
  const declaredAffinity = cycleAffinity(levelLeft, levelRight, leads.beta.A, leads.beta.B, leads.mu.A, leads.mu.B, null);
  const trueAffinity = cycleAffinity(levelLeft, levelRight, leads.beta.A, leads.beta.B, leads.mu.A, leads.mu.B, interBeta);
  // Lead A's temperature that gives the true affinity with everything else declared:
  // β_A,eff (ε_L − μ_A) = β_B(ε_R − μ_B) − A_true.
  let effectiveTA: number | null = null;
  if (heated && levelLeft !== leads.mu.A) {
    const betaEff = (leads.beta.B * (levelRight - leads.mu.B) - trueAffinity) / (levelLeft - leads.mu.A);
    effectiveTA = betaEff > 0 ? JOULES_PER_MEV / (BOLTZMANN * betaEff) : null;
  }
  const tau = v.tau as number;
  const description = `Simulated bidirectional electron counting through a serial double dot between leads A and B (levels
${levelLeft} and ${levelRight} meV, tunnelling rates ${v["rate-a"]}, ${v["rate-inter"]} and ${v["rate-b"]} per ns, strong Coulomb blockade):
a charge detector that resolves the three charge states sees each electron's direction. Windows of ${tau} ns are cut from
one stationary trajectory simulated by Gillespie's algorithm (J. Comput. Phys. 22, 403 (1976)); each row gives each lead's
particles and energy, the charge state at the window's start (0 empty, 1 left, 2 right) and end, and how many windows did so.
With the states, Σ_tot = Σ_res + ln p(x₀) − ln p(x_τ) obeys the exact relations at every window length (Seifert, PRL 95,
040602 (2005)). ${heated ? `The detector heats the inter-dot jumps as a bath at ${heatingK} K that supplies the detuning of ${detuning} meV, which audit.yaml does not declare: the relations must fail, and lead A's effective temperature is ${effectiveTA === null ? "not positive" : `${Number(effectiveTA.toPrecision(6))} K`}.` : ""}
\`data/trace.csv\` holds the trajectory; \`data/expected.json\` the exact joint law.
`;
  return countingSynthAudit({
    model: "double-dot",
    dynamics,
    charge: [0, 1, 1],
    levelIn: levelLeft,
    levelOut: levelRight,
    leads: { TA, TB, betaA: leads.beta.A, betaB: leads.beta.B, muA: leads.mu.A, muB: leads.mu.B },
    trueAffinity,
    declaredAffinity,
    effectiveTemperatureA: effectiveTA,
    tau,
    samples: v.samples as number,
    seed: String(v.seed),
    parameters: v,
    references: DOUBLE_DOT_REFERENCES,
    title: heated ? "Simulated bidirectional counting through a double dot with detector back-action" : "Simulated bidirectional counting through a serial double dot",
    description,
    keywords: ["simulation", "double quantum dot", "bidirectional counting", "full counting statistics", "steady state"],
  });
}
