import fs from "node:fs";
import path from "node:path";
import type { Command } from "commander";
import { InputError } from "../../errors.ts";
import { EXIT } from "../exit.ts";

/** A commented starting point; every key is explained where it stands. */
export function scaffoldAuditYaml(id: string): string {
  return `# audit.yaml — the definition of one transport audit (see README.md, "An audit folder").
# Paths are relative to this folder and may not leave it.

id: ${id}                      # lower-case letters, digits and hyphens; unique in the archive
title: Describe the device and the measurement in one line
authors:
  - name: Your Name
    # orcid: 0000-0000-0000-0000   # optional; shown as a link in the report
    # affiliation: Your group
license: CC-BY-4.0
# device: name of the sample or simulation   # optional; used to filter the archive index
# date: ${new Date().toISOString().slice(0, 10)}                     # optional; date of the measurement (YYYY-MM-DD)
description: |
  What was measured or simulated, how, and why this audit exists. Markdown; raw HTML is shown as text.

settings:
  alpha: 0.01       # level of the tests that can fail a check (corrected across points by Holm's method)
  margin: 0.05      # equivalence margin: the size of violation the data must be able to exclude for a pass
  confidence: 0.95  # confidence level of reported intervals and equivalence tests
  seed: auto        # random steps are seeded from each dataset's SHA-256; or give an integer

datasets:
  # Repeated runs of a contact protocol between reservoirs A and B, one realisation per row, or (as in the
  # example file init wrote) a histogram: a count column gives how many realisations each row stands for.
  - id: run-1
    kind: samples
    file: data/run-1.csv
    columns: { Q: Q, dN: dN, W: W, count: count }   # role → CSV column; roles: dE_A dE_B Q dN W count
    energy_unit: meV                  # J | eV | meV | ueV | kT (kT needs reference_temperature)
    reservoirs:
      A: { T: 1.30, mu: 0.0 }         # T in kelvin (or beta per energy unit); mu in energy_unit
      B: { T: 1.00, mu: 0.0 }
    tau: 2.0e-9                       # contact time in seconds (needed for fluxes)
    work: measured                    # measured (W column or dE_A + dE_B) or zero (declared, never assumed)
    # sweep: bias-sweep               # datasets sharing a sweep name (same tau, different affinities) are
                                      # audited together by fluctuation-dissipation
    # series: contact-times           # datasets sharing a series name (different tau) feed linear-growth

  # Linear-response coefficients, one row per operating point (and field):
  # - id: gate-sweep
  #   kind: coefficients
  #   file: data/coefficients.csv
  #   form: thermoelectric            # columns G S Pi K (Pi optional), u_G … standard uncertainties; or
  #                                   # form: onsager with columns L11 L12 L21 L22 (u_L11 …)
  #   units: { G: uS, S: uV/K, Pi: uV, K: pW/K }
  #   temperature: { value: 1.2 }     # or { column: T }; kelvin
  #   field: { column: B }            # optional: pairs each +B row with the -B row at the same point
  #   point: [Vg]                     # columns that identify an operating point

  # Mean transfer against contact time, for linear-growth:
  # - id: growth
  #   kind: cumulants
  #   file: data/cumulants.csv        # columns tau, Q, dN (optional u_Q, u_dN)
  #   energy_unit: meV
  #   time_unit: ns

checks: all   # or a list of check ids, e.g. [second-law, integral-fluctuation]
`;
}

/** Boltzmann's constant in meV/K (CODATA 2018, exact: k_B / e × 10³). */
const KB_MEV_PER_K = (1.380649e-23 / 1.602176634e-19) * 1e3;

/**
 * A small example histogram for the scaffold's dataset, so that the new audit
 * runs at once: heat Q on a 0.05 meV grid between reservoirs at 1.30 K and
 * 1.00 K, no particles and no work, with multiplicities proportional to
 * exp(−Q²/2s²) · exp(a_Q Q/2). Their ratio for ±Q is exp(a_Q Q), the exchange
 * fluctuation relation (Jarzynski & Wójcik, Phys. Rev. Lett. 92, 230602
 * (2004)) with a_Q = 1/k_B T_B − 1/k_B T_A, up to rounding to whole counts.
 * Invented data, for a first run only: replace it with your own.
 */
export function exampleHistogramCsv(): string {
  const aQ = 1 / (KB_MEV_PER_K * 1.0) - 1 / (KB_MEV_PER_K * 1.3);
  const s = 0.5; // meV
  const rows = ["Q,dN,W,count"];
  for (let k = -30; k <= 30; k++) {
    const q = k * 0.05;
    const count = Math.round(20000 * Math.exp(-(q * q) / (2 * s * s) + (aQ * q) / 2));
    if (count > 0) rows.push(`${q.toFixed(2)},0,0,${count}`);
  }
  return `${rows.join("\n")}\n`;
}

export function registerInit(program: Command, setExit: (code: number) => void): void {
  program
    .command("init")
    .description("scaffold a new audit folder with a commented audit.yaml")
    .argument("<audit-dir>", "folder to create (must not already hold an audit.yaml)")
    .action((dir: string) => {
      const file = path.join(dir, "audit.yaml");
      if (fs.existsSync(file)) throw new InputError(`${file}: already exists; init never overwrites an audit`);
      const id = path
        .basename(path.resolve(dir))
        .toLowerCase()
        .replace(/[^a-z0-9]+/g, "-")
        .replace(/^-+|-+$/g, "") || "new-audit";
      fs.mkdirSync(path.join(dir, "data"), { recursive: true });
      fs.writeFileSync(file, scaffoldAuditYaml(id));
      const example = path.join(dir, "data", "run-1.csv");
      if (!fs.existsSync(example)) fs.writeFileSync(example, exampleHistogramCsv());
      process.stderr.write(`created ${file} and an example dataset ${example}; try \`transport-audit run ${dir}\`, then replace the example with your data and edit the datasets\n`);
      setExit(EXIT.ok);
    });
}
