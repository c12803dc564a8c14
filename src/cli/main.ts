import { main } from "./program.ts";

// Entry point: parse the arguments, run, and leave the exit status of the contract.
process.exitCode = await main(process.argv.slice(2));
