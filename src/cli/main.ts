import { main } from "./program.ts";
import { installInterruptHandlers } from "../interrupt/cancellation.ts";

// Entry point: parse the arguments, run, and leave the exit status of the contract.
// Ctrl-C and SIGTERM remove unfinished output and exit 130 / 143 (interrupt/cancellation.ts).
installInterruptHandlers();
process.exitCode = await main(process.argv.slice(2));
