/**
 * Shared pieces of the robustness tests: a small valid audit to mutate, the
 * command line run in-process (exit status and the two output streams), and
 * the same through the real launcher in a child process.
 */
import { spawnSync } from "node:child_process";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { tempAudit } from "../helpers/tempAudit.ts";
import { ANSI, type CliRun } from "../helpers/cliInProcess.ts";

export const REPO = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
export const BIN = path.join(REPO, "bin", "transport-audit.js");

/** A samples dataset with every required key: heat and particles, no work. */
export const VALID_YAML = `id: demo-audit
title: A demo
authors:
  - { name: "A. Person" }
datasets:
  - id: run-1
    kind: samples
    file: data/run.csv
    columns: { Q: q, dN: n }
    energy_unit: meV
    reservoirs:
      A: { T: 1.3, mu: 0 }
      B: { T: 1.0, mu: 0 }
    tau: 2.0e-9
    work: zero
`;

/** A short valid data file for VALID_YAML (heat in meV, particles). */
export const VALID_CSV = "q,n\n0.12,1\n-0.05,0\n0.31,1\n-0.02,-1\n0.08,0\n";

/** An audit folder holding VALID_YAML (or the given text) and data/run.csv (or the given files). */
export function auditWith(yaml = VALID_YAML, files: Record<string, string> = { "data/run.csv": VALID_CSV }): string {
  return tempAudit(yaml, files);
}

export { cli } from "../helpers/cliInProcess.ts";

/** Run the real launcher in a child process (a fresh Node, as a user's shell would). */
export function cliProcess(args: string[]): CliRun {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: REPO, encoding: "utf8", env: { ...process.env, NO_COLOR: "1" } });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr.replace(ANSI, "") };
}

/** Lines of a stack trace as Node prints them. */
export const STACK_LINE = /^\s+at /m;
