import pc from "picocolors";
import { InputError } from "../errors.ts";

/** Exit statuses of the contract. */
export const EXIT = { ok: 0, failed: 1, input: 2, internal: 3 } as const;

/**
 * Print an error the way a user needs it: input errors as their message alone
 * (they already name file, row, column or key path), our own bugs with a stack
 * and a request to report them.
 */
export function reportError(err: unknown): number {
  if (err instanceof InputError) {
    process.stderr.write(`${pc.red("error:")} ${err.message}\n`);
    return EXIT.input;
  }
  const e = err as Error;
  process.stderr.write(`${pc.red("internal error")} (a bug in transport-audit; please report it with the stack below)\n${e?.stack ?? String(err)}\n`);
  return EXIT.internal;
}
