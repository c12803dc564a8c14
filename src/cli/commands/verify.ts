import { InvalidArgumentError, type Command } from "commander";
import { formatVerifyReport, verifyVersion } from "../../archive/verify.ts";
import { EXIT } from "../exit.ts";

function versionNumber(text: string): number {
  if (!/^[1-9]\d*$/.test(text)) throw new InvalidArgumentError(`expected a version number 1, 2, 3, …, found ${JSON.stringify(text)}`);
  return Number(text);
}

export function registerVerify(program: Command, setExit: (code: number) => void): void {
  program
    .command("verify")
    .description("re-run a published version from the data and confirm it is reproduced exactly (hash chain, data digests, every result digit)")
    .argument("<audit-dir>", "folder holding audit.yaml, its data and versions/")
    .option("--version <N>", "the version to verify (default: the latest)", versionNumber)
    .option("--json", "print the verification report as JSON on stdout")
    .action(async (dir: string, opts: { version?: number; json?: boolean }) => {
      if (process.stderr.isTTY) process.stderr.write(`re-running ${dir} from its data…\n`);
      const report = await verifyVersion(dir, { version: opts.version });
      if (opts.json) process.stdout.write(`${JSON.stringify(report, null, 2)}\n`);
      else process.stdout.write(`${formatVerifyReport(report, dir)}\n`);
      setExit(report.reproduced ? EXIT.ok : EXIT.failed);
    });
}
