import path from "node:path";
import { InvalidArgumentError, type Command } from "commander";
import { buildSite } from "../../report/buildSite.ts";
import { RESULT_CACHE_FOLDER } from "../../report/resultCache.ts";
import { EXIT } from "../exit.ts";
import { progressBar } from "../progress.ts";

export function registerBuild(program: Command, setExit: (code: number) => void): void {
  program
    .command("build")
    .description("run every audit under <root>/audits and render the static report site")
    .option("--root <dir>", "archive root holding audits/ (and archive.yaml)", ".")
    .option("--out <dir>", "output folder for the site", "site")
    .option("--no-cache", "recompute every audit instead of reusing stored results of unchanged ones (the new results are stored)")
    .option("--threads <n>", "worker threads running the audits (default: one a core, at most 4; 1 runs them one after another in this thread)", parseThreads)
    .action(async (opts: { root: string; out: string; cache: boolean; threads?: number }) => {
      const bar = progressBar("auditing");
      const outcome = await buildSite({
        root: path.resolve(opts.root),
        out: path.resolve(opts.out),
        onProgress: bar.update,
        cache: opts.cache ? "use" : "refresh",
        threads: opts.threads,
      });
      bar.stop();
      for (const b of outcome.broken) process.stderr.write(`could not audit ${b.folder}:\n${b.error}\n`);
      const failed = outcome.audits.filter((a) => a.stamp === "fail").length;
      const { reused, unstored } = outcome.cache;
      if (unstored > 0) process.stderr.write(`note: ${unstored} result(s) could not be stored in ${path.join(opts.root, RESULT_CACHE_FOLDER)}; the next build recomputes them\n`);
      process.stderr.write(
        `built ${outcome.audits.length} audit report(s)${failed ? `, ${failed} with a failed check` : ""}${reused ? `; ${reused} unchanged audit(s) taken from the result cache` : ""}\n`,
      );
      const relative = path.relative(process.cwd(), outcome.index);
      process.stdout.write(`site index: ${relative.startsWith("..") ? outcome.index : relative}\n`);
      setExit(outcome.broken.length > 0 ? EXIT.input : EXIT.ok);
    });
}

function parseThreads(text: string): number {
  const n = Number(text);
  if (!Number.isInteger(n) || n < 1) throw new InvalidArgumentError(`must be a whole number of threads, 1 or more; found ${JSON.stringify(text)}`);
  return n;
}
