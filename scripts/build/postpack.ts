// Run after `npm pack` and `npm publish` (postpack): removes the npm-shrinkwrap.json
// that prepack.ts wrote for the tarball, which in a clone would stand in for package-lock.json.
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

fs.rmSync(path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..", "npm-shrinkwrap.json"), { force: true });
