#!/usr/bin/env node
// Thin launcher: runs the TypeScript entry point through tsx so that
// `npx transport-audit …` works right after `npm install`, with no build step.
import { spawnSync } from "node:child_process";
import { createRequire } from "node:module";
import { fileURLToPath } from "node:url";
import path from "node:path";

const here = path.dirname(fileURLToPath(import.meta.url));
const require = createRequire(import.meta.url);
const tsxCli = require.resolve("tsx/cli");
const entry = path.join(here, "..", "src", "cli", "main.ts");
const result = spawnSync(process.execPath, [tsxCli, entry, ...process.argv.slice(2)], { stdio: "inherit" });
process.exit(result.status ?? 2);
