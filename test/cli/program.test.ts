// The command table of src/cli/program.ts: each command's module is loaded only when that command
// runs, so the tool's own help is written from the table. These tests hold the table to the modules:
// every line must read exactly as the help of the module itself would print it.
import { Command, Help } from "commander";
import { describe, expect, it } from "vitest";
import { COMMANDS, commandName, main, requestedCommand } from "../../src/cli/program.ts";

describe("the command table", () => {
  for (const entry of COMMANDS) {
    it(`lists ${commandName(entry)} as its module declares it`, async () => {
      const program = new Command();
      (await entry.load())(program, () => {});
      expect(program.commands.map((c) => c.name())).toEqual([commandName(entry)]);
      const [declared] = program.commands;
      expect(entry.term).toBe(new Help().subcommandTerm(declared));
      expect(entry.summary).toBe(declared.description());
    });
  }

  it("finds the command in the arguments, also after `help`, and none for the tool's own options", () => {
    expect(requestedCommand(["run", "audits/x", "--json"])?.term).toBe("run [options] <audit-dir>");
    expect(requestedCommand(["help", "verify"])?.term).toBe("verify [options] <audit-dir>");
    expect(requestedCommand(["--version"])).toBeUndefined();
    expect(requestedCommand(["--help"])).toBeUndefined();
    expect(requestedCommand(["frob"])).toBeUndefined();
    expect(requestedCommand([])).toBeUndefined();
  });
});

/** Run main() and keep what it writes to stdout and stderr. */
async function capture(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = "";
  let err = "";
  const write = { out: process.stdout.write.bind(process.stdout), err: process.stderr.write.bind(process.stderr) };
  process.stdout.write = ((chunk: string | Uint8Array) => ((out += String(chunk)), true)) as typeof process.stdout.write;
  process.stderr.write = ((chunk: string | Uint8Array) => ((err += String(chunk)), true)) as typeof process.stderr.write;
  try {
    return { code: await main(argv), out, err };
  } finally {
    process.stdout.write = write.out;
    process.stderr.write = write.err;
  }
}

describe("the tool's help without loading the commands", () => {
  it("lists every command with its arguments and summary, as the modules would", async () => {
    const fromTable = await capture(["--help"]);
    expect(fromTable.code).toBe(0);
    // The same help from a program with every module loaded.
    const full = new Command().name("transport-audit").description("Audit heat and particle transport data against the laws of linear and non-linear transport.");
    full.version("0.0.0");
    for (const entry of COMMANDS) (await entry.load())(full, () => {});
    const listed = (help: string) => help.slice(help.indexOf("Commands:"));
    expect(listed(fromTable.out)).toBe(listed(full.helpInformation()));
  });

  it("reports an unknown command as a usage error (exit 2) with the list of commands", async () => {
    const r = await capture(["frob"]);
    expect(r.code).toBe(2);
    expect(r.err).toContain("error: unknown command 'frob'");
    expect(r.err).toContain("run [options] <audit-dir>");
  });
});
