// Benchmarks (not tests): `npm run bench` runs every bench/*.bench.ts in turn; each prints its
// figures and writes them to .bench/<name>.json (git-ignored). Timings vary by tens of percent
// between runs on shared machines; compare like with like.
import fs from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";

const dir = path.dirname(new URL(import.meta.url).pathname);
const only = process.argv[2];
const files = fs
  .readdirSync(dir)
  .filter((f) => f.endsWith(".bench.ts") && (!only || f.includes(only)))
  .sort();
fs.mkdirSync(path.resolve(".bench"), { recursive: true });
for (const file of files) {
  process.stdout.write(`\n== ${file}\n`);
  const mod = (await import(pathToFileURL(path.join(dir, file)).href)) as { run: () => Promise<Record<string, unknown>> };
  const result = await mod.run();
  const out = path.resolve(".bench", file.replace(/\.bench\.ts$/, ".json"));
  fs.writeFileSync(out, `${JSON.stringify({ when: new Date().toISOString(), node: process.version, ...result }, null, 2)}\n`);
  process.stdout.write(`   written to ${path.relative(process.cwd(), out)}\n`);
}
