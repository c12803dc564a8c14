import fs from "node:fs";
import path from "node:path";
import type { Command } from "commander";
import { runAudit } from "../../report/runAudit.ts";
import { summaryTable } from "../summaryTable.ts";
import { EXIT } from "../exit.ts";
import { readingProgress } from "../progress.ts";
import { removeStaleVersionStaging } from "../../archive/layout.ts";

/** The audit folder named on the command line: `run my-audit/audit.yaml` means `run my-audit`. */
export function auditFolderOf(arg: string): string {
  return path.basename(arg) === "audit.yaml" && fs.existsSync(arg) && fs.statSync(arg).isFile() ? path.dirname(arg) : arg;
}

export function registerRun(program: Command, setExit: (code: number) => void): void {
  program
    .command("run")
    .description("ingest an audit folder, run every selected check and print a summary (or the result document with --json)")
    .argument("<audit-dir>", "folder holding audit.yaml and its data (or the audit.yaml itself)")
    .option("--json", "print the result document as JSON on stdout and nothing else")
    .action(async (dir: string, opts: { json?: boolean }) => {
      removeStaleVersionStaging(dir); // what a killed publish left behind
      const progress = readingProgress();
      let result;
      try {
        ({ result } = await runAudit(auditFolderOf(dir), { onProgress: progress.update }));
      } finally {
        progress.stop();
      }
      if (opts.json) process.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
      else process.stdout.write(`${summaryTable(result, process.stdout.isTTY === true, process.stdout.columns ?? 110)}\n`);
      setExit(result.checks.some((c) => c.status === "fail") ? EXIT.failed : EXIT.ok);
    });
}
