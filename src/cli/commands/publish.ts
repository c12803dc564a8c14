import path from "node:path";
import type { Command } from "commander";
import { publishAudit } from "../../archive/publish.ts";
import { EXIT } from "../exit.ts";

export function registerPublish(program: Command, setExit: (code: number) => void): void {
  program
    .command("publish")
    .description("run the audit and freeze its result as the next immutable version under <audit-dir>/versions/<N>/")
    .argument("<audit-dir>", "folder holding audit.yaml and its data")
    .action(async (dir: string) => {
      if (process.stderr.isTTY) process.stderr.write(`running ${dir} before freezing it…\n`);
      const out = await publishAudit(dir);
      const failed = out.result.checks.filter((c) => c.status === "fail").length;
      process.stdout.write(
        [
          `published ${out.result.audit} version ${out.version} in ${path.join(dir, "versions", String(out.version))}`,
          `  date ${out.manifest.published}, ${out.manifest.tool.name} ${out.manifest.tool.version}, stamp ${out.result.stamp}${failed ? ` (${failed} failed check(s))` : ""}`,
          `  fingerprint ${out.manifest.fingerprint}`,
          `  previous ${out.manifest.previous ? `version ${out.manifest.previous.version}, ${out.manifest.previous.digest}` : "none (first version)"}`,
          `verify it with: transport-audit verify ${dir} --version ${out.version}`,
        ].join("\n") + "\n",
      );
      setExit(failed > 0 ? EXIT.failed : EXIT.ok);
    });
}
