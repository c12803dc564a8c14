import { createRequire } from "node:module";

const pkg = createRequire(import.meta.url)("../package.json") as { name: string; version: string };

/** The tool's name and version, stamped into every result document and fingerprint. */
export const TOOL = Object.freeze({ name: pkg.name, version: pkg.version });
