import { InputError } from "../errors.ts";
import { synthAuditYamlHeader, type SynthAudit } from "./auditFolder.ts";
import { fermionTask } from "./blockTask.ts";
import { columnsToCsv } from "./csv.ts";
import { exactMoments, transformMoments, WORK_HEAT_PARTICLES } from "./exactMoments.ts";
import { buildFermionSystem, type FermionSetup } from "./fermionModel.ts";
import type { LatticeKind, LatticeSpec } from "./lattice.ts";
import { parseParameters, type ParameterValues, type SynthParameter } from "./parameters.ts";
import { particleCountingDistribution } from "./particleCounting.ts";
import { betaPerMeV, fieldForPeierlsPhase, secondsToHbarPerMeV } from "./units.ts";
import { runBlocks, runBlocksInThread } from "./workerPool.ts";

/** Published sources of the model and the methods, cited in the code, the audit.yaml and expected.json. */
export const FERMION_REFERENCES = [
  "Hough, Krishnapur, Peres & Virág, Probab. Surveys 3, 206 (2006): exact sampling of determinantal point processes",
  "Klich, in Quantum Noise in Mesoscopic Physics, ed. Nazarov (Kluwer 2003): determinant formula for the counting statistics of free fermions",
  "Schönhammer, Phys. Rev. B 75, 205329 (2007): full counting statistics of finite free-fermion systems",
  "Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11, 043014 (2009): exact exchange fluctuation relation",
  "Campisi, Hänggi & Talkner, Rev. Mod. Phys. 83, 771 (2011): two-point measurement and fluctuation relations",
  "Peierls, Z. Phys. 80, 763 (1933): phase of the hopping in a magnetic field",
];

/** Largest system (modes of A plus B) for which the exact distribution of dN is written. */
export const KLICH_MAX_MODES = 400;

const side = (s: "A" | "B", defaults: { lattice: string; size: string; T: string; mu: string }): SynthParameter[] => [
  { name: `lattice-${s.toLowerCase()}`, unit: "", description: `lattice of reservoir ${s}: chain, ring or grid`, default: defaults.lattice, type: "choice", choices: ["chain", "ring", "grid"] },
  { name: `size-${s.toLowerCase()}`, unit: "sites", description: `sites of reservoir ${s}: N for a chain or ring, LxW for a grid (L along the contact direction)`, default: defaults.size, type: "text" },
  { name: `hopping-${s.toLowerCase()}`, unit: "meV", description: `nearest-neighbour hopping J in reservoir ${s}`, default: "1", type: "number", min: 0, minExclusive: true },
  { name: `onsite-${s.toLowerCase()}`, unit: "meV", description: `on-site energy of every site of reservoir ${s}`, default: "0", type: "number" },
  { name: `temperature-${s.toLowerCase()}`, unit: "K", description: `temperature of reservoir ${s}`, default: defaults.T, type: "number", min: 0, minExclusive: true },
  { name: `mu-${s.toLowerCase()}`, unit: "meV", description: `chemical potential of reservoir ${s}`, default: defaults.mu, type: "number" },
];

export const FERMION_PARAMETERS: SynthParameter[] = [
  ...side("A", { lattice: "chain", size: "60", T: "12", mu: "0.4" }),
  ...side("B", { lattice: "chain", size: "40", T: "8", mu: "0" }),
  { name: "contact", unit: "meV", description: "hopping amplitude of each contact bond while the contact is on", default: "0.5", type: "number", min: 0, minExclusive: true },
  { name: "bonds", unit: "bonds", description: "number of contact bonds between facing sites", default: "1", type: "integer", min: 1 },
  { name: "flux", unit: "rad", description: "Peierls phase 2πΦ/Φ₀ through each loop of two neighbouring contact bonds (breaks time reversal; needs --bonds ≥ 2)", default: "0", type: "number" },
  { name: "lattice-constant", unit: "nm", description: "lattice constant, used only to state the flux as a magnetic field in audit.yaml", default: "10", type: "number", min: 0, minExclusive: true },
  { name: "tau", unit: "ps", description: "contact time", default: "15", type: "number", min: 0, minExclusive: true },
  { name: "samples", unit: "realisations", description: "number of simulated runs of the protocol", default: "30000", type: "integer", min: 1 },
  { name: "seed", unit: "", description: "text that seeds the random numbers (same seed, same data)", default: "fermions", type: "text" },
];

function latticeFrom(v: ParameterValues, s: "a" | "b"): LatticeSpec {
  const kind = v[`lattice-${s}`] as LatticeKind;
  const size = String(v[`size-${s}`]).trim();
  const grid = /^(\d+)\s*[x×]\s*(\d+)$/.exec(size);
  let length: number;
  let width = 1;
  if (kind === "grid") {
    if (!grid) throw new InputError(`--size-${s}: a grid needs LxW (e.g. 8x4), found "${size}"`);
    length = Number(grid[1]);
    width = Number(grid[2]);
  } else {
    if (!/^\d+$/.test(size)) throw new InputError(`--size-${s}: a ${kind} needs a whole number of sites, found "${size}"`);
    length = Number(size);
  }
  const least = kind === "ring" ? 3 : 1;
  if (length < least || width < 1) throw new InputError(`--size-${s}: a ${kind} needs at least ${least} site(s) along its length, found "${size}"`);
  return { kind, length, width, hopping: v[`hopping-${s}`] as number, onsite: v[`onsite-${s}`] as number };
}

const describeLattice = (l: LatticeSpec) => (l.kind === "grid" ? `${l.length}×${l.width} grid` : `${l.length}-site ${l.kind}`);

export interface RunOptions {
  workers?: number;
  onProgress?: (done: number, total: number) => void;
}

/** Simulate with worker threads (as the command line does). */
export async function synthFermions(raw: Record<string, string | undefined>, options: RunOptions = {}): Promise<SynthAudit> {
  const plan = planFermions(raw);
  const columns = await runBlocks(plan.task, plan.samples, plan.seed, { workers: options.workers, onProgress: options.onProgress });
  return plan.finish(columns);
}

/** Simulate in this thread, synchronously; the same data as synthFermions for the same parameters. */
export function synthFermionsInThread(raw: Record<string, string | undefined>): SynthAudit {
  const plan = planFermions(raw);
  return plan.finish(runBlocksInThread(plan.task, plan.samples, plan.seed));
}

interface FermionPlan {
  task: ReturnType<typeof fermionTask>;
  samples: number;
  seed: string;
  finish(columns: Float64Array[]): SynthAudit;
}

/** Everything but the sampling: parameters, the model, its exact expectations; `finish` writes the audit. */
function planFermions(raw: Record<string, string | undefined>): FermionPlan {
  const v = parseParameters(FERMION_PARAMETERS, raw);
  const A = latticeFrom(v, "a");
  const B = latticeFrom(v, "b");
  const bonds = v.bonds as number;
  const flux = v.flux as number;
  if (flux !== 0 && bonds < 2) throw new InputError(`--flux: a Peierls phase needs a loop, so --bonds must be at least 2 (found ${bonds})`);
  const TA = v["temperature-a"] as number;
  const TB = v["temperature-b"] as number;
  const muA = v["mu-a"] as number;
  const muB = v["mu-b"] as number;
  const setup: FermionSetup = {
    A,
    B,
    contact: { strength: v.contact as number, bonds, flux },
    thermo: { A: { beta: betaPerMeV(TA), mu: muA }, B: { beta: betaPerMeV(TB), mu: muB } },
  };
  let system;
  try {
    system = buildFermionSystem(setup);
  } catch (err) {
    if (err instanceof RangeError) throw new InputError(`--bonds: ${err.message}`);
    throw err;
  }
  const tauSeconds = (v.tau as number) * 1e-12;
  const u = system.propagator.at(secondsToHbarPerMeV(tauSeconds));
  const moments = exactMoments(system, u);
  const whn = transformMoments(moments, WORK_HEAT_PARTICLES);
  // Klich's formula costs (n + 1)/2 determinants of order n; beyond a few hundred modes it is left out.
  const counting = system.n <= KLICH_MAX_MODES ? particleCountingDistribution(system, u) : null;
  const samples = v.samples as number;
  return {
    task: fermionTask(system, u),
    samples,
    seed: String(v.seed),
    finish: ([dE_A, dE_B, dN]) => {
      const a = 1e-9 * (v["lattice-constant"] as number);
      const field = flux !== 0 ? fieldForPeierlsPhase(flux, a * a) : null;
      const affinity = {
        beta_bar_per_meV: (betaPerMeV(TA) + betaPerMeV(TB)) / 2,
        a_Q_per_meV: betaPerMeV(TB) - betaPerMeV(TA),
        a_N: betaPerMeV(TA) * muA - betaPerMeV(TB) * muB,
      };
      const se = (i: number) => Math.sqrt(moments.covariance[i][i] / samples);
      const expected = {
        model: "fermions",
        about:
          "Exact expectations of the simulated two-point measurement, computed from single-particle matrices without sampling. Energies in meV, dN in particles gained by B, W = dE_A + dE_B, Q = (dE_B − dE_A)/2.",
        references: FERMION_REFERENCES,
        parameters: v,
        realisations: samples,
        affinities: affinity,
        field_tesla: field,
        relations:
          field === null
            ? "Time-reversal symmetric protocol from grand-canonical reservoirs: the exchange fluctuation relation P(W,Q,dN)/P(−W,−Q,−dN) = exp(Σ), the integral relation and the second law hold exactly at this contact time."
            : "The Peierls phase breaks time reversal: the detailed relation links this field to the reversed one and cannot be tested on this dataset alone; the integral relation ⟨exp(−Σ)⟩ = 1 and the second law still hold exactly.",
        mean: { dE_A: moments.mean[0], dE_B: moments.mean[1], dN: moments.mean[2], W: whn.mean[0], Q: whn.mean[1] },
        standard_error_of_sample_mean: { dE_A: se(0), dE_B: se(1), dN: se(2) },
        covariance: { order: ["dE_A", "dE_B", "dN"], matrix: moments.covariance },
        covariance_work_heat_particles: { order: ["W", "Q", "dN"], matrix: whn.covariance },
        dN_distribution: counting
          ? {
              method: "Klich determinant formula, inverted exactly on a grid of counting fields",
              min: counting.qMin,
              probability: Array.from(counting.probability, (p) => Math.max(0, p)),
            }
          : { method: `left out: more than ${KLICH_MAX_MODES} modes`, min: null, probability: [] },
      };
      const muLine = (x: number) => String(x);
      const fieldLine = field !== null ? `    field: ${field}\n` : "";
      const description = `Simulated two-point energy and particle-number measurements on two finite reservoirs of
non-interacting spinless fermions: A is a ${describeLattice(A)} (hopping ${A.hopping} meV, on-site ${A.onsite} meV),
B a ${describeLattice(B)} (hopping ${B.hopping} meV, on-site ${B.onsite} meV), each prepared grand-canonically,
joined by ${bonds} contact bond(s) of ${v.contact} meV${flux !== 0 ? ` with a Peierls phase of ${flux} rad per contact loop (field ${field!.toPrecision(4)} T for a lattice constant of ${v["lattice-constant"]} nm)` : ""}
for ${v.tau} ps, then separated. Switching the contact on and off does work, so \`W = dE_A + dE_B\` is measured.

Exact sampling: Fermi-weighted Bernoulli occupations of the isolated reservoirs' eigenmodes, evolution of the
occupied orbitals with the full single-particle Hamiltonian, and the final measurement sampled as a projection
determinantal point process (Hough, Krishnapur, Peres & Virág, Probab. Surveys 3, 206 (2006)). Exact means,
covariances and the distribution of dN (Klich's determinant formula; Schönhammer, PRB 75, 205329 (2007)) are in
\`data/expected.json\`. ${expected.relations}
`;
      const yaml = synthAuditYamlHeader({
    model: "fermions",
    id: "synth-fermions",
    title: `Simulated exchange between two tight-binding reservoirs (${describeLattice(A)} and ${describeLattice(B)})`,
    description,
    keywords: ["simulation", "free fermions", "two-point measurement", "exchange fluctuation relation"],
  }) + `  - id: fermions
    kind: samples
    file: data/fermions.csv
    columns: { dE_A: dE_A, dE_B: dE_B, dN: dN }
    energy_unit: meV
    reservoirs:
      A: { T: ${TA}, mu: ${muLine(muA)} }
      B: { T: ${TB}, mu: ${muLine(muB)} }
    tau: ${tauSeconds}
    work: measured
${fieldLine}checks: all
`;
      return {
        yaml,
        files: {
          "data/fermions.csv": columnsToCsv(["dE_A", "dE_B", "dN"], [dE_A, dE_B, dN]),
          "data/expected.json": `${JSON.stringify(expected, null, 2)}\n`,
        },
        summary: `${samples} realisations; exact ⟨dN⟩ = ${moments.mean[2].toPrecision(4)}, ⟨W⟩ = ${whn.mean[0].toPrecision(4)} meV`,
      };
    },
  };
}
