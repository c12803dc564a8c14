import { Command, CommanderError, Help } from "commander";
import { TOOL } from "../version.ts";
import { EXIT, reportError } from "./exit.ts";

/** What a command module exports: it declares the command (options, help, action) on the program. */
export type RegisterCommand = (program: Command, setExit: (code: number) => void) => void;

/**
 * One command of the tool: its line in the tool's help (`term` as the help
 * shows it, then the summary) and the module that declares it. The module is
 * imported only when its command runs (or its own help is asked for), so that
 * `run` never loads Eleventy, `--version` loads no command at all, and so on.
 * test/cli/program.test.ts checks each line below against its module.
 */
export interface LazyCommand {
  term: string;
  summary: string;
  load: () => Promise<RegisterCommand>;
}

/** Every command, in the order the help lists them. A new command is one more line here. */
export const COMMANDS: readonly LazyCommand[] = [
  { term: "run [options] <audit-dir>", summary: "ingest an audit folder, run every selected check and print a summary (or the result document with --json)", load: async () => (await import("./commands/run.ts")).registerRun },
  { term: "build [options]", summary: "run every audit under <root>/audits and render the static report site; exit status 1 when an audit has a failed check (unless --allow-fail), 2 when one could not be audited or its published versions are damaged", load: async () => (await import("./commands/build.ts")).registerBuild },
  { term: "init <audit-dir>", summary: "scaffold a new audit folder with a commented audit.yaml", load: async () => (await import("./commands/init.ts")).registerInit },
  { term: "publish <audit-dir>", summary: "run the audit and freeze its result as the next immutable version under <audit-dir>/versions/<N>/", load: async () => (await import("./commands/publish.ts")).registerPublish },
  { term: "verify [options] <audit-dir>", summary: "re-run a published version from the data and confirm it is reproduced exactly (hash chain, data digests, every result digit)", load: async () => (await import("./commands/verify.ts")).registerVerify },
  { term: "pdf [options] <audit-dir>", summary: "print an audit's report to a PDF file through headless Chromium", load: async () => (await import("./commands/pdf.ts")).registerPdf },
  { term: "summarise [options] <part>", summary: "summarise one part of a large samples dataset into its cells (<part>.summary), on the grid its audit.yaml gives, so that an audit can name the summary instead of the part", load: async () => (await import("./commands/summarise.ts")).registerSummarise },
  { term: "synth", summary: "write a simulated dataset with known exact properties as a ready audit folder", load: async () => (await import("./commands/synth.ts")).registerSynth },
];

/** The command's name: the first word of its help term. */
export function commandName(command: LazyCommand): string {
  return command.term.split(" ")[0];
}

/**
 * The command the arguments ask for (`run …`, or `help run`), or undefined
 * for the tool's own options (`--version`, `--help`), no arguments, or a word
 * that names no command (Commander then reports it, with the closest names).
 * The tool has no option that takes a value, so the first word that is not an
 * option is the command.
 */
export function requestedCommand(argv: readonly string[]): LazyCommand | undefined {
  const words = argv.filter((a) => !a.startsWith("-"));
  const name = words[0] === "help" ? words[1] : words[0];
  return COMMANDS.find((c) => commandName(c) === name);
}

/** Help terms of the placeholders, which carry no options or arguments of their own. */
const placeholderTerms = new WeakMap<Command, string>();

/** A command as the tool's help lists it, without loading its module (only ever listed, never run). */
function addPlaceholder(program: Command, command: LazyCommand): void {
  const placeholder = program.command(commandName(command)).description(command.summary);
  placeholderTerms.set(placeholder, command.term);
}

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
    .showHelpAfterError()
    .configureHelp({
      subcommandTerm: (cmd) => placeholderTerms.get(cmd) ?? new Help().subcommandTerm(cmd),
    });
  try {
    const requested = requestedCommand(argv);
    if (requested) (await requested.load())(program, setExit);
    else for (const command of COMMANDS) addPlaceholder(program, command);
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
