import { vi } from "vitest";
import { main } from "../../src/cli/program.ts";

// eslint-disable-next-line no-control-regex
export const ANSI = /\u001b\[[0-9;]*m/g;

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

/**
 * Run the command line in this process (as bin/transport-audit.js does: a
 * process per call is slow on a loaded machine), capturing both streams with
 * colour codes removed.
 */
export async function cli(args: string[]): Promise<CliRun> {
  let stdout = "";
  let stderr = "";
  const out = vi.spyOn(process.stdout, "write").mockImplementation((chunk: string | Uint8Array) => {
    stdout += String(chunk);
    return true;
  });
  const err = vi.spyOn(process.stderr, "write").mockImplementation((chunk: string | Uint8Array) => {
    stderr += String(chunk);
    return true;
  });
  try {
    const code = await main(args);
    return { code, stdout: stdout.replace(ANSI, ""), stderr: stderr.replace(ANSI, "") };
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}
