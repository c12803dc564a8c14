import path from "node:path";
import type { Command } from "commander";
import { EXIT } from "../exit.ts";
import { refuseUnsafePdfTarget } from "../../output/pdfTarget.ts";

export function registerPdf(program: Command, setExit: (code: number) => void): void {
  program
    .command("pdf")
    .description("print an audit's report to a PDF file through headless Chromium")
    .argument("<audit-dir>", "folder holding audit.yaml and its data")
    .option("--out <file>", "PDF file to write (default: <audit-id>.pdf in the current folder); never a folder or a file of an audit folder")
    .option("--compact", "one page per dataset: verdicts, key numbers and the two most telling plots")
    .option("--chromium <file>", "Chromium executable (default: $TRANSPORT_AUDIT_CHROMIUM or /usr/bin/chromium)")
    .action(async (dir: string, opts: { out?: string; chromium?: string; compact?: boolean }) => {
      // Refused before any work; printAuditPdf checks the target again (and the default one) before writing.
      if (opts.out) refuseUnsafePdfTarget(path.resolve(opts.out), opts.out);
      // Loaded here, not at the top: playwright-core takes a few tenths of a second to load, which every other command would pay.
      const { printAuditPdf } = await import("../../report/pdf/printAuditPdf.ts");
      const outcome = await printAuditPdf({ auditDir: dir, ...(opts.out ? { out: opts.out } : {}), ...(opts.chromium ? { chromium: opts.chromium } : {}), compact: opts.compact === true });
      process.stderr.write(`printed audit ${outcome.audit.id} (overall verdict: ${outcome.audit.stampLabel.toLowerCase()})\n`);
      process.stdout.write(`${path.relative(process.cwd(), outcome.file) || outcome.file}\n`);
      setExit(EXIT.ok);
    });
}
