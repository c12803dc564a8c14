import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { rngFromText } from "../../src/stats/rng.ts";

/**
 * A small archive for tests of publish, verify and the versioned site: one
 * audit of heat and electron exchange with 400 realisations (invented demo
 * numbers, seeded), checked by second-law only so that the tests stay fast
 * and do not move when other checks are added.
 */
export interface TempArchive {
  root: string;
  auditDir: string;
  dataFile: string;
  /** Rewrite the data: `scale` multiplies every heat and particle number (−1 reverses the flow). */
  writeData(rows?: number, scale?: number, seedText?: string): void;
}

export const TEST_AUDIT_ID = "dot-lab-exchange";

export function auditYaml(extra = ""): string {
  return `id: ${TEST_AUDIT_ID}
title: "Heat & electron exchange through test dot T-1"
authors:
  - { name: "Ilse Varga", orcid: "0000-0002-1825-0097", affiliation: "Varga Cryogenic Transport Laboratory, Lindqvist" }
  - { name: "Jan van der Berg" }
license: CC-BY-4.0
device: T-1
settings: { alpha: 0.01, margin: 0.05, confidence: 0.95, seed: auto }
datasets:
  - id: pulse
    kind: samples
    file: data/exchange.csv
    columns: { Q: q_meV, dN: n }
    energy_unit: meV
    reservoirs:
      A: { T: 0.3, mu: 0.004 }
      B: { T: 0.25, mu: 0 }
    tau: 4.0e-8
    work: zero
checks: [second-law]
${extra}`;
}

export function makeTempArchive(options: { archiveYaml?: string | null } = {}): TempArchive {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), "ta-archive-"));
  if (options.archiveYaml !== null) {
    fs.writeFileSync(
      path.join(root, "archive.yaml"),
      options.archiveYaml ??
        "name: Test archive\npublisher: Varga Cryogenic Transport Laboratory, Institute for Mesoscopic Physics, Lindqvist\nbase_url: https://audits.example.org/\nlicense: CC-BY-4.0\n",
    );
  }
  const auditDir = path.join(root, "audits", TEST_AUDIT_ID);
  fs.mkdirSync(path.join(auditDir, "data"), { recursive: true });
  fs.writeFileSync(path.join(auditDir, "audit.yaml"), auditYaml());
  const dataFile = path.join(auditDir, "data", "exchange.csv");
  const writeData = (rows = 400, scale = 1, seedText = "test-archive") => {
    const rng = rngFromText(seedText);
    const lines = ["q_meV,n"];
    for (let i = 0; i < rows; i++) {
      // Heat with a positive mean and a comparable spread; electron numbers −1…+1 leaning positive.
      const q = (0.2 + 0.3 * rng.normal()) * scale;
      const u = rng.uniform();
      const n = (u < 0.2 ? -1 : u < 0.6 ? 0 : 1) * scale;
      lines.push(`${q.toFixed(6)},${n}`);
    }
    fs.writeFileSync(dataFile, `${lines.join("\n")}\n`);
  };
  writeData();
  return { root, auditDir, dataFile, writeData };
}

/** A clock that reads a fixed instant (publication dates in tests must not depend on the day). */
export const fixedClock = (iso: string) => () => new Date(iso);
