import pc from "picocolors";
import { InputError } from "../errors.ts";
import { describeSystemError, findSystemError } from "../output/systemError.ts";

/** Exit statuses of the contract. */
export const EXIT = { ok: 0, failed: 1, input: 2, internal: 3 } as const;

/**
 * Print an error the way a user needs it: input errors as their message alone
 * (they already name file, row, column or key path); errors of the machine
 * (full disk, read-only or failing file system, missing permission) as one
 * line naming the file and the cause, also exit 2, since the user's
 * environment must change, not our code; our own bugs with a stack and a
 * request to report them.
 */
export function reportError(err: unknown): number {
  if (err instanceof InputError) {
    process.stderr.write(`${pc.red("error:")} ${err.message}\n`);
    return EXIT.input;
  }
  const system = findSystemError(err);
  if (system) {
    process.stderr.write(`${pc.red("error:")} ${describeSystemError(system)}\n`);
    return EXIT.input;
  }
  const e = err as Error;
  process.stderr.write(`${pc.red("internal error")} (a bug in transport-audit; please report it with the stack below)\n${e?.stack ?? String(err)}\n`);
  return EXIT.internal;
}
