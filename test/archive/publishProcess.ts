// A separate process that publishes one audit, for the tests of concurrent and killed publishes.
// Lighter than the whole CLI (no site generator loaded), so the tests stay quick.
import { InputError } from "../../src/errors.ts";
import { publishAudit } from "../../src/archive/publish.ts";

try {
  const out = await publishAudit(process.argv[2]);
  process.stdout.write(`published version ${out.version}\n`);
} catch (err) {
  process.stderr.write(`${(err as Error).message}\n`);
  process.exitCode = err instanceof InputError ? 2 : 3;
}
