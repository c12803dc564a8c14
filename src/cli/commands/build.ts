import path from "node:path";
import { InvalidArgumentError, type Command } from "commander";
import { buildSite, type BuildOutcome } from "../../report/buildSite.ts";
import { RESULT_CACHE_FOLDER } from "../../report/resultCache.ts";
import { EXIT } from "../exit.ts";
import { progressBar } from "../progressBar.ts";
import { BYTE_SIZE_FORM, parseByteSize } from "../../report/format/byteSize.ts";

export function registerBuild(program: Command, setExit: (code: number) => void): void {
  program
    .command("build")
    .description(
      "run every audit under <root>/audits and render the static report site; exit status 1 when an audit has a failed check (unless --allow-fail), 2 when one could not be audited or its published versions are damaged",
    )
    .option("--root <dir>", "archive root holding audits/ (and archive.yaml)", ".")
    .option("--out <dir>", "output folder for the site, replaced whole once the new site is complete (never inside the archive's audits)", "site")
    .option("--force", "replace the output folder even when it holds files build did not write")
    .option("--allow-fail", "exit 0 when the site is built although an audit has a failed check")
    .option("--no-cache", "recompute every audit instead of reusing stored results of unchanged ones (the new results are stored)")
    .option(
      "--data-size-limit <size>",
      "data copied into the site per audit, all versions together, for re-running a version in the browser (default 300MB; versions past it link to their data instead)",
      parseDataSizeLimit,
    )
    .option("--threads <n>", "worker threads running the audits (default: one a core, at most 4; 1 runs them one after another in this thread)", parseThreads)
    .action(async (opts: { root: string; out: string; cache: boolean; threads?: number; force?: boolean; allowFail?: boolean; dataSizeLimit?: number }) => {
      const bar = progressBar("auditing");
      let outcome: BuildOutcome;
      try {
        outcome = await buildSite({
          root: path.resolve(opts.root),
          out: path.resolve(opts.out),
          onProgress: bar.update,
          cache: opts.cache ? "use" : "refresh",
          threads: opts.threads,
          force: opts.force === true,
          ...(opts.dataSizeLimit !== undefined ? { dataSizeLimit: opts.dataSizeLimit } : {}),
        });
      } finally {
        bar.stop();
      }
      process.stderr.write(buildSummary(outcome, path.join(opts.root, RESULT_CACHE_FOLDER), opts.allowFail === true));
      const relative = path.relative(process.cwd(), outcome.index);
      process.stdout.write(`site index: ${relative.startsWith("..") ? outcome.index : relative}\n`);
      setExit(buildExitStatus(outcome, opts.allowFail === true));
    });
}

/** 2 when an audit could not be audited or its versions are damaged; else 1 when one failed (unless allowed); else 0. */
export function buildExitStatus(outcome: Pick<BuildOutcome, "broken" | "damaged" | "failed">, allowFail: boolean): number {
  if (outcome.broken.length > 0 || outcome.damaged.length > 0) return EXIT.input;
  if (outcome.failed.length > 0 && !allowFail) return EXIT.failed;
  return EXIT.ok;
}

/**
 * The build's report on stderr. The first line counts what a script or a
 * person looks for first: reports built, audits failed, audits that could not
 * be audited or have damaged versions; the details follow.
 */
export function buildSummary(outcome: BuildOutcome, cacheFolder: string, allowFail: boolean): string {
  const { broken, damaged, failed } = outcome;
  const { reused, unstored } = outcome.cache;
  const counts = [`${failed.length} failed`];
  if (broken.length) counts.push(`${broken.length} could not be audited`);
  if (damaged.length) counts.push(`${damaged.length} with damaged versions`);
  const lines = [`built ${outcome.audits.length} audit report(s): ${counts.join(", ")}${reused ? `; ${reused} unchanged audit(s) taken from the result cache` : ""}`];
  if (failed.length) lines.push(`failed: ${failed.join(", ")}`);
  for (const b of broken) lines.push(`could not audit ${b.folder}:`, ...b.error.split("\n").map((l) => `  ${l}`));
  for (const d of damaged) lines.push(`damaged versions in ${d.folder}:`, ...d.problems.flatMap((p) => p.split("\n")).map((l) => `  ${l}`));
  if (unstored > 0) lines.push(`note: ${unstored} result(s) could not be stored in ${cacheFolder}; the next build recomputes them`);
  if (failed.length && !allowFail && !broken.length && !damaged.length) lines.push("exit status 1 because an audit failed; pass --allow-fail to exit 0 when the site is built");
  return `${lines.join("\n")}\n`;
}

/** `--data-size-limit`: a size with its unit (commander names the option and the value before this message). */
export function parseDataSizeLimit(text: string): number {
  const bytes = parseByteSize(text);
  if (bytes === null) throw new InvalidArgumentError(`--data-size-limit must be ${BYTE_SIZE_FORM}; found ${JSON.stringify(text)}`);
  return bytes;
}

function parseThreads(text: string): number {
  const n = Number(text);
  if (!Number.isInteger(n) || n < 1) throw new InvalidArgumentError(`must be a whole number of threads, 1 or more; found ${JSON.stringify(text)}`);
  return n;
}
