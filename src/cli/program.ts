import { Command, CommanderError } from "commander";
import { TOOL } from "../version.ts";
import { EXIT, reportError } from "./exit.ts";
import { registerRun } from "./commands/run.ts";
import { registerBuild } from "./commands/build.ts";
import { registerInit } from "./commands/init.ts";
import { registerPublish } from "./commands/publish.ts";
import { registerVerify } from "./commands/verify.ts";
import { registerPdf } from "./commands/pdf.ts";
import { registerSynth } from "./commands/synth.ts";

/** The transport-audit command line: argument parsing and exit codes only; the work lives below. */
export async function main(argv: string[]): Promise<number> {
  let exitCode: number = EXIT.ok;
  const setExit = (code: number) => {
    exitCode = code;
  };
  const program = new Command()
    .name(TOOL.name)
    .version(TOOL.version)
    .description("Audit heat and particle transport data against the laws of linear and non-linear transport.")
    .exitOverride()
    // Options after a subcommand belong to it (`verify … --version N` is not the tool's --version).
    .enablePositionalOptions()
    .showHelpAfterError();
  registerRun(program, setExit);
  registerBuild(program, setExit);
  registerInit(program, setExit);
  registerPublish(program, setExit);
  registerVerify(program, setExit);
  registerPdf(program, setExit);
  registerSynth(program, setExit);
  try {
    await program.parseAsync(argv, { from: "user" });
  } catch (err) {
    if (err instanceof CommanderError) {
      // --help and --version end here with exit code 0; usage errors are input errors.
      return err.exitCode === 0 ? EXIT.ok : EXIT.input;
    }
    return reportError(err);
  }
  return exitCode;
}

