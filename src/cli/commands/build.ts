import path from "node:path";
import type { Command } from "commander";
import { buildSite } from "../../report/buildSite.ts";
import { EXIT } from "../exit.ts";
import { progressBar } from "../progress.ts";

export function registerBuild(program: Command, setExit: (code: number) => void): void {
  program
    .command("build")
    .description("run every audit under <root>/audits and render the static report site")
    .option("--root <dir>", "archive root holding audits/ (and archive.yaml)", ".")
    .option("--out <dir>", "output folder for the site", "site")
    .action(async (opts: { root: string; out: string }) => {
      const bar = progressBar("auditing");
      const outcome = await buildSite({ root: path.resolve(opts.root), out: path.resolve(opts.out), onProgress: bar.update });
      bar.stop();
      for (const b of outcome.broken) process.stderr.write(`could not audit ${b.folder}:\n${b.error}\n`);
      const failed = outcome.audits.filter((a) => a.stamp === "fail").length;
      process.stderr.write(`built ${outcome.audits.length} audit report(s)${failed ? `, ${failed} with a failed check` : ""}\n`);
      const relative = path.relative(process.cwd(), outcome.index);
      process.stdout.write(`site index: ${relative.startsWith("..") ? outcome.index : relative}\n`);
      setExit(outcome.broken.length > 0 ? EXIT.input : EXIT.ok);
    });
}
