import { SYSTEM_CAUSES, systemError } from "./systemError.ts";

/**
 * Fault injection for the tests of failures that cannot be staged cheaply:
 * `TRANSPORT_AUDIT_FAULT=<step>:<code>` makes the named step fail with that
 * error of the operating system (ENOSPC, EIO, EACCES, EROFS, …) on the file in
 * hand, as a full disk would; `<step>:pause` prints `paused at <step>` on
 * stderr and waits a minute, so that a test can send a signal at a known
 * point. Steps: `build:rendered` (the new site is written aside, not yet in
 * place), `publish:<PublishStep>`, `pdf:printed`.
 */
export const FAULT_ENV = "TRANSPORT_AUDIT_FAULT";

export async function faultPoint(step: string, file: string): Promise<void> {
  const wanted = process.env[FAULT_ENV];
  if (!wanted || !wanted.startsWith(`${step}:`)) return;
  const what = wanted.slice(step.length + 1);
  if (what === "pause") {
    process.stderr.write(`paused at ${step}\n`);
    await new Promise((resolve) => setTimeout(resolve, 60_000));
    return;
  }
  if (what in SYSTEM_CAUSES) throw systemError(what, "write", file);
  throw new Error(`${FAULT_ENV}=${wanted}: unknown fault "${what}"; use an errno code such as ENOSPC, or pause`);
}
