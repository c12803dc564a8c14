/**
 * Node and the browser must compute the checks alike, to the last bit, before a
 * reader's browser can re-run a published audit and call it reproduced; so must
 * one Node release and the next, before `verify` can succeed on a referee's
 * machine. All run V8, but its floating-point library (an fdlibm port, then
 * other algorithms), Math.pow and friends have changed between releases. This
 * test evaluates the same arguments in Node and in Debian's Chromium:
 * - the portable functions of src/math must agree bit for bit;
 * - every built-in function found to differ is named, and the code that
 *   computes results (checks, statistics, physics, ingestion) must not call it.
 */
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { build } from "esbuild";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { launchChromium, type LaunchedBrowser } from "../../src/report/pdf/launchChromium.ts";
import * as portable from "../../src/math/index.ts";

const HERE = path.dirname(fileURLToPath(import.meta.url));
const ROOT = path.resolve(HERE, "../..");
const PROBE_SOURCE = fs.readFileSync(path.join(HERE, "arithmeticProbe.js"), "utf8");
type Results = Record<string, string[]>;

/** The built-in probe run in this process (Node's V8). */
const builtinsInNode = (): Results => new Function(PROBE_SOURCE)() as Results;

/**
 * Runs every portable function on a fixed argument list, returning bit patterns.
 * Written as source text because it runs in both engines; `fns` is src/math's exports.
 */
const PORTABLE_RUNNER = `(function (fns, n) {
  let s = 0x1234567;
  const next = () => { s ^= s << 13; s ^= s >>> 17; s ^= s << 5; return s >>> 0; };
  const f = new Float64Array(1), u = new Uint32Array(f.buffer);
  const hex = (x) => { if (x !== x) return "nan"; f[0] = x; return u[1].toString(16).padStart(8, "0") + u[0].toString(16).padStart(8, "0"); };
  const args = [0, -0, 1, -1, 0.5, 2, 5e-324, 1.7976931348623157e308, Infinity, -Infinity, NaN, 709.782712893384, -745.1332191019411];
  for (let i = 0; i < n; i++) { u[0] = next(); u[1] = next(); args.push(f[0]); }
  for (let i = 0; i < n; i++) args.push((next() / 4294967296 - 0.5) * 1500);
  for (let i = 0; i < n; i++) args.push((next() / 4294967296) * 2.2);
  const out = {};
  for (const name of Object.keys(fns).sort()) if (fns[name].length === 1) out[name] = args.map((x) => hex(fns[name](x)));
  out.integerPower = [];
  for (const base of [10, 3, 2, 1.5, 0.1, 7.3, 123.456, -2.5]) for (let n = -40; n <= 40; n++) out.integerPower.push(hex(fns.integerPower(base, n)));
  return out;
})`;
const N_PORTABLE = 30_000;

let chromium: LaunchedBrowser;
let builtinsInBrowser: Results;
let portableInBrowser: Results;

beforeAll(async () => {
  chromium = await launchChromium();
  const page = await chromium.browser.newPage();
  try {
    builtinsInBrowser = (await page.evaluate(`(function () {\n${PROBE_SOURCE}\n})()`)) as Results;
    const bundle = await build({ entryPoints: [path.join(ROOT, "src/math/index.ts")], bundle: true, write: false, format: "iife", globalName: "portableMath", platform: "browser" });
    await page.addScriptTag({ content: bundle.outputFiles[0].text });
    portableInBrowser = (await page.evaluate(`${PORTABLE_RUNNER}(portableMath, ${N_PORTABLE})`)) as Results;
  } finally {
    await page.close();
  }
});
afterAll(async () => {
  await chromium?.close();
});

/** Names of the built-ins whose results differ between this Node and the browser. */
function differingBuiltins(): string[] {
  const node = builtinsInNode();
  return Object.keys(node).filter((name) => node[name].some((v, i) => v !== builtinsInBrowser[name][i]));
}

/** Source files whose arithmetic ends up in a result document. */
function resultSources(): string[] {
  const dirs = ["src/checks", "src/stats", "src/physics", "src/linalg", "src/ingest", "src/math"];
  const files: string[] = [];
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (p.endsWith(".ts")) files.push(p);
    }
  };
  for (const d of dirs) walk(path.join(ROOT, d));
  return [...files, path.join(ROOT, "src/report/runAudit.ts")];
}

describe("floating-point arithmetic in Node and in Chromium", () => {
  test("the portable functions of src/math give identical bits in both engines", () => {
    const node = (new Function(`return ${PORTABLE_RUNNER}`)() as (f: object, n: number) => Results)(portable, N_PORTABLE);
    expect(Object.keys(portableInBrowser).sort()).toEqual(Object.keys(node).sort());
    for (const name of Object.keys(node)) {
      const first = node[name].findIndex((v, i) => v !== portableInBrowser[name][i]);
      expect(first === -1 ? "identical" : `${name}: first difference at argument ${first}`).toBe("identical");
    }
  });

  test("no built-in that differs between the engines is called by code that computes results", () => {
    const differing = differingBuiltins().filter((name) => /^[a-z0-9]+$/i.test(name) && name in Math);
    // Found by this probe (Chromium 156 against Node 20.20): exp, log, pow, cbrt and the trigonometric and
    // hyperbolic functions differ in the last bit on some arguments; Node 24 and 26 differ from 20 in pow.
    console.log(`built-ins that differ between Node ${process.version} and this Chromium: ${differing.join(", ") || "none"}`);
    const calls: string[] = [];
    for (const file of resultSources()) {
      const text = fs.readFileSync(file, "utf8").replace(/\/\*[\s\S]*?\*\/|\/\/.*$|"(?:[^"\\\n]|\\.)*"|`(?:[^`\\]|\\.)*`/gm, '""');
      for (const name of differing) if (new RegExp(`Math\\.${name}\\(`).test(text)) calls.push(`${path.relative(ROOT, file)}: Math.${name}`);
      // x ** y is Math.pow under another name. Allowed: squares (every pow returns the rounded x·x)
      // and constants with whole literal operands (exact); anything else goes through src/math.
      if (differing.includes("pow")) {
        for (const m of text.matchAll(/(\S*)\s*\*\*\s*(\S+)/g)) {
          const square = /^2\b/.test(m[2]);
          const literal = /\b\d+n?$/.test(m[1]) && /^\d+n?\b/.test(m[2]); // BigInt literals too
          if (!square && !literal) calls.push(`${path.relative(ROOT, file)}: ${m[0].trim()}`);
        }
      }
    }
    expect(calls).toEqual([]);
  });

  test("number printing and parsing agree (the result document is JSON)", () => {
    const node = builtinsInNode();
    for (const name of ["toString", "toPrecision17", "toExponential6", "toFixed6", "parse", "jsonNumbers", "sort"]) {
      expect(node[name], name).toEqual(builtinsInBrowser[name]);
    }
  });
});
