/**
 * Issue 9, property-based fuzzing (fast-check) of configuration loading and
 * ingestion: whatever audit.yaml text or data bytes a user supplies, the tool
 * ends either in a result or in an InputError (exit status 2) whose message
 * names the file — never in another exception (which the command line would
 * print with a stack trace and exit status 3).
 *
 * Seeds are fixed so that every run explores the same inputs; numRuns are kept
 * modest so that the file takes seconds on a slow two-core machine. A failure
 * prints the shrunk counter-example and the seed to replay it.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import fc from "fast-check";
import { stringify } from "yaml";
import { afterAll, describe, expect, it } from "vitest";
import { parseAuditDefinition } from "../../src/config/loadAudit.ts";
import { InputError } from "../../src/errors.ts";
import { ingestAudit } from "../../src/ingest/loadAudit.ts";
import { runChecks } from "../../src/report/runAudit.ts";
import { cliProcess, STACK_LINE } from "./harness.ts";

const SEED = 20261202;
const made: string[] = [];
afterAll(() => {
  for (const dir of made) fs.rmSync(dir, { recursive: true, force: true });
});

function folder(yaml: string, files: Record<string, string | Uint8Array>): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ta-fuzz-"));
  made.push(dir);
  fs.writeFileSync(path.join(dir, "audit.yaml"), yaml);
  for (const [name, content] of Object.entries(files)) {
    const target = path.join(dir, name);
    if (!target.startsWith(dir + path.sep)) continue; // the fuzzer never writes outside its folder
    fs.mkdirSync(path.dirname(target), { recursive: true });
    fs.writeFileSync(target, content);
  }
  return dir;
}

/** The data files a definition names, when it validates; messages must name one of them or audit.yaml. */
function namedFiles(yaml: string): string[] {
  try {
    return parseAuditDefinition(yaml).datasets.map((d) => d.file);
  } catch {
    return [];
  }
}

/**
 * The property: ingestion (and, when it succeeds, every check) completes, or
 * fails with an InputError whose message is non-empty and names audit.yaml or
 * a data file of the definition.
 */
async function endsInResultOrInputError(dir: string, yaml: string): Promise<void> {
  let audit;
  try {
    audit = await ingestAudit(dir);
  } catch (err) {
    if (!(err instanceof InputError)) throw err;
    const named = ["audit.yaml", ...namedFiles(yaml)];
    expect(named.some((f) => err.message.includes(f)), err.message).toBe(true);
    return;
  }
  try {
    runChecks(audit);
  } catch (err) {
    // An unknown check id is found only when checks are selected; it is an input error too.
    if (!(err instanceof InputError) || !err.message.startsWith("audit.yaml checks[")) throw err;
  }
}

// ---------------------------------------------------------------- audit.yaml

const BASE = {
  id: "fuzz-audit",
  title: "Fuzzed",
  authors: [{ name: "A. Person" }],
  settings: { resamples: 200 },
  datasets: [
    {
      id: "run-1",
      kind: "samples",
      file: "data/run.csv",
      columns: { Q: "q", dN: "n" },
      energy_unit: "meV",
      reservoirs: { A: { T: 1.3, mu: 0 }, B: { T: 1.0, mu: 0 } },
      tau: 2e-9,
      work: "zero",
    },
  ],
  checks: ["second-law", "integral-fluctuation", "exchange-fluctuation"],
};
const GOOD_CSV = "q,n\n0.12,1\n-0.05,0\n0.31,1\n-0.02,-1\n0.08,0\n0.2,1\n-0.11,-1\n0.04,0\n";

/** Key paths of BASE that a mutation may replace, delete or add beside. */
const PATHS: (string | number)[][] = [
  ["id"], ["title"], ["authors"], ["authors", 0], ["authors", 0, "name"], ["settings"], ["settings", "resamples"], ["settings", "alpha"],
  ["datasets"], ["datasets", 0], ["datasets", 0, "id"], ["datasets", 0, "kind"], ["datasets", 0, "file"], ["datasets", 0, "columns"],
  ["datasets", 0, "columns", "Q"], ["datasets", 0, "columns", "count"], ["datasets", 0, "columns", "W"], ["datasets", 0, "energy_unit"],
  ["datasets", 0, "reservoirs"], ["datasets", 0, "reservoirs", "A", "T"], ["datasets", 0, "reservoirs", "B", "beta"], ["datasets", 0, "reservoirs", "A", "mu"],
  ["datasets", 0, "tau"], ["datasets", 0, "work"], ["datasets", 0, "sweep"], ["datasets", 0, "field"], ["datasets", 1], ["checks"], ["checks", 0], ["description"],
];

/** Values that probe the edges: wrong types, impossible numbers, hostile paths and texts. */
const oddValue: fc.Arbitrary<unknown> = fc.oneof(
  fc.constantFrom(0, -1, 1e-300, 1e308, -0, Number.NaN, Number.POSITIVE_INFINITY, 2 ** 53, 0.5, 200, 1999),
  fc.constantFrom("", "../outside.csv", "/etc/passwd", "data", "data/run.csv", "data/missing.csv", "meV", "kT", "J", "erg", "coefficients", "cumulants", "samples"),
  fc.constantFrom("zero", "measured", "all", "reciprocty", "second-law", "<script>alert(1)</script>", "q", "n", "c"),
  fc.constantFrom(null, true, [], {}, [1, 2], { x: 1 }, [{ name: "B" }], { T: 1 }, { column: "T" }),
  fc.double(),
  fc.string({ maxLength: 12 }),
);

function setAt(root: unknown, keyPath: (string | number)[], value: unknown, remove: boolean): void {
  let node = root as Record<string | number, unknown>;
  for (const key of keyPath.slice(0, -1)) {
    if (node[key] === null || typeof node[key] !== "object") node[key] = typeof key === "number" ? [] : {};
    node = node[key] as Record<string | number, unknown>;
  }
  const last = keyPath[keyPath.length - 1];
  if (remove) delete node[last];
  else node[last] = value;
}

const mutation = fc.record({ path: fc.constantFrom(...PATHS), value: oddValue, remove: fc.boolean(), extraKey: fc.option(fc.constantFrom("titel", "tua", "colour", "energy_units", "__proto__", "constructor"), { nil: undefined }) });

/** Mutations that keep a definition valid more often than not: optional keys removed, valid alternatives set. */
const gentleMutation = fc.oneof(
  fc.record({ path: fc.constantFrom<(string | number)[]>(["datasets", 0, "tau"], ["checks"], ["settings"], ["datasets", 0, "columns", "dN"], ["description"]), value: fc.constant(undefined), remove: fc.constant(true), extraKey: fc.constant(undefined) }),
  fc.record({
    path: fc.constant<(string | number)[]>(["datasets", 0, "reservoirs", "A", "T"]),
    value: fc.double({ noNaN: true, min: 0.01, max: 10 }),
    remove: fc.constant(false),
    extraKey: fc.constant(undefined),
  }),
  fc.record({ path: fc.constant<(string | number)[]>(["datasets", 0, "energy_unit"]), value: fc.constantFrom("J", "eV", "meV", "ueV", "µeV"), remove: fc.constant(false), extraKey: fc.constant(undefined) }),
  fc.record({ path: fc.constant<(string | number)[]>(["datasets", 0, "work"]), value: fc.constantFrom("zero", "measured"), remove: fc.constant(false), extraKey: fc.constant(undefined) }),
  fc.record({ path: fc.constant<(string | number)[]>(["checks"]), value: fc.constantFrom("all", ["work"], ["weighted-identity", "uncertainty-relation"]), remove: fc.constant(false), extraKey: fc.constant(undefined) }),
);

const mutatedYaml = fc.array(fc.oneof({ weight: 2, arbitrary: mutation }, { weight: 3, arbitrary: gentleMutation }), { minLength: 1, maxLength: 4 }).map((mutations) => {
  const doc = structuredClone(BASE) as Record<string, unknown>;
  for (const m of mutations) {
    setAt(doc, m.path, m.value, m.remove);
    if (m.extraKey) setAt(doc, [...m.path.slice(0, -1), m.extraKey], m.value, false);
  }
  return stringify(doc);
});

/** Lines built from the schema's own words, indented at random: text that is often almost valid YAML. */
const WORDS = ["id", "title", "authors", "datasets", "kind", "file", "columns", "energy_unit", "reservoirs", "A", "B", "T", "mu", "tau", "work", "checks", "settings", "- name", "- id", "Q", "dN", "count"];
const SCALARS = ["fuzz", "samples", "data/run.csv", "{ Q: q, dN: n }", "[second-law]", "1.3", "-1", "meV", "zero", "&a x", "*a", "!!binary AA==", "|", ">-", "'unclosed", '"x\\q"', "{", "[", ":", "~", ".nan", "0x1F"];
const yamlishLines = fc
  .array(fc.tuple(fc.integer({ min: 0, max: 4 }), fc.constantFrom(...WORDS), fc.constantFrom(...SCALARS), fc.boolean()), { maxLength: 14 })
  .map((lines) => lines.map(([indent, key, value, tab]) => `${tab && indent > 0 ? "\t" : " ".repeat(indent * 2)}${key}: ${value}`).join("\n") + "\n");

/** Characters that matter to YAML, for raw strings. */
const YAML_CHARS = [..."abcdefgT01 -:{}[],&*!|>#'\"\n\t\\%@`?"];
const yamlishText = fc.string({ unit: fc.constantFrom(...YAML_CHARS), maxLength: 120 });

describe("configuration loading under fuzzing", () => {
  it("ends in a result or an input error naming the file, for structured mutations of a valid definition", async () => {
    await fc.assert(
      fc.asyncProperty(mutatedYaml, async (yaml) => {
        await endsInResultOrInputError(folder(yaml, { "data/run.csv": GOOD_CSV }), yaml);
      }),
      { numRuns: 150, seed: SEED },
    );
  });

  it("ends in a result or an input error naming the file, for YAML-like lines and raw text", async () => {
    await fc.assert(
      fc.asyncProperty(fc.oneof(yamlishLines, yamlishText), async (yaml) => {
        await endsInResultOrInputError(folder(yaml, { "data/run.csv": GOOD_CSV }), yaml);
      }),
      { numRuns: 200, seed: SEED + 1 },
    );
  });
});

// ---------------------------------------------------------------- data files

const HISTOGRAM_YAML = stringify({ ...BASE, datasets: [{ ...BASE.datasets[0], columns: { Q: "q", dN: "n", count: "c" } }] });

/** Cells as instruments, spreadsheets and broken exports write them. */
const cell: fc.Arbitrary<string> = fc.oneof(
  { weight: 6, arbitrary: fc.double({ noNaN: true, min: -5, max: 5 }).map((x) => String(x)) },
  { weight: 3, arbitrary: fc.integer({ min: -3, max: 40 }).map(String) },
  {
    weight: 3,
    arbitrary: fc.constantFrom("", " ", "NaN", "nan", "Infinity", "-inf", "1e308", "1e309", "-1e-320", "1,5", '"1,5"', '"', '""', "0x10", "1.2.3", "seven", "\u0000", "\uFEFF1", "µ", "2.5e", "+.5", "1_000"),
  },
  { weight: 1, arbitrary: fc.string({ maxLength: 6 }) },
);

/** A plausible row of q (meV), n (particles) and c (count), mostly valid so that the checks run too. */
const goodRow = fc
  .tuple(fc.double({ noNaN: true, min: -2, max: 2 }), fc.integer({ min: -3, max: 3 }), fc.integer({ min: 0, max: 50 }))
  .map(([q, n, c]) => [q.toPrecision(4), String(n), String(c)]);

const csvText = fc
  .record({
    header: fc.oneof({ weight: 5, arbitrary: fc.constant(["q", "n", "c"]) }, { weight: 1, arbitrary: fc.array(fc.constantFrom("q", "n", "c", "x", "", "q ", "Q"), { maxLength: 5 }) }),
    rows: fc.array(fc.oneof({ weight: 12, arbitrary: goodRow }, { weight: 1, arbitrary: fc.array(cell, { maxLength: 5 }) }), { maxLength: 40 }),
    delimiter: fc.constantFrom(",", ",", ",", ",", ",", ",", ";", "\t"),
    lineEnd: fc.constantFrom("\n", "\n", "\r\n", "\r"),
    bom: fc.boolean(),
    comment: fc.boolean(),
  })
  .map(({ header, rows, delimiter, lineEnd, bom, comment }) => {
    const lines = [header.join(delimiter), ...rows.map((r) => r.join(delimiter))];
    if (comment) lines.unshift("# exported by a fuzzer");
    return (bom ? "\uFEFF" : "") + lines.join(lineEnd) + lineEnd;
  });

/** A well-formed header over random bytes, and random bytes alone. */
const csvBytes = fc.oneof(
  fc.uint8Array({ maxLength: 300 }),
  fc.uint8Array({ maxLength: 300 }).map((b) => Buffer.concat([Buffer.from("q,n,c\n"), Buffer.from(b)])),
);

describe("ingestion under fuzzing", () => {
  it("ends in a result or an input error naming the data file, for CSV text with every kind of cell, delimiter and line end", async () => {
    await fc.assert(
      fc.asyncProperty(csvText, fc.boolean(), async (csv, histogram) => {
        const yaml = histogram ? HISTOGRAM_YAML : stringify(BASE);
        await endsInResultOrInputError(folder(yaml, { "data/run.csv": csv }), yaml);
      }),
      { numRuns: 250, seed: SEED + 2 },
    );
  });

  it("ends in a result or an input error naming the data file, for arbitrary bytes", async () => {
    await fc.assert(
      fc.asyncProperty(csvBytes, async (bytes) => {
        await endsInResultOrInputError(folder(HISTOGRAM_YAML, { "data/run.csv": bytes }), HISTOGRAM_YAML);
      }),
      { numRuns: 150, seed: SEED + 3 },
    );
  });
});

/** Coefficient tables (both forms, with field pairing) and mean-transfer tables, each with the columns its roles name. */
const TABLE_DEFINITIONS = [
  {
    dataset: { id: "onsager", kind: "coefficients", file: "data/run.csv", form: "onsager", temperature: { column: "T" }, field: { column: "B" }, point: ["Vg"] },
    columns: ["Vg", "B", "T", "L11", "L12", "L21", "L22", "u_L11", "u_L12", "u_L21", "u_L22"],
  },
  {
    dataset: { id: "thermo", kind: "coefficients", file: "data/run.csv", form: "thermoelectric", temperature: { value: 4.2 }, field: { column: "B" }, point: ["Vg"], units: { G: "uS", S: "uV/K", Pi: "uV", K: "pW/K" } },
    columns: ["Vg", "B", "G", "S", "Pi", "K", "u_G", "u_S", "u_Pi", "u_K"],
  },
  { dataset: { id: "growth", kind: "cumulants", file: "data/run.csv", energy_unit: "meV" }, columns: ["tau", "Q", "dN", "u_Q", "u_dN"] },
];

/** A table over (mostly) the definition's own columns: numbers of either sign, repeated operating points and fields. */
const coefficientAudit = fc.constantFrom(...TABLE_DEFINITIONS).chain((def) =>
  fc
    .record({
      header: fc.oneof({ weight: 4, arbitrary: fc.constant(def.columns) }, { weight: 1, arbitrary: fc.shuffledSubarray(def.columns) }),
      rows: fc.array(
        fc.tuple(
          ...def.columns.map((c) =>
            fc.oneof(
              // Temperatures, contact times and uncertainties are mostly positive, as the loaders require.
              { weight: 12, arbitrary: /^(T|tau|u_)/.test(c) ? fc.double({ min: 0.01, max: 10, noNaN: true }).map((x) => x.toPrecision(3)) : fc.constantFrom("0", "1", "-1", "0.5", "2", "-0.5", "3") },
              { weight: 1, arbitrary: cell },
            ),
          ),
        ),
        { maxLength: 12 },
      ),
    })
    .map(({ header, rows }) => ({
      yaml: stringify({ ...BASE, datasets: [def.dataset], checks: "all" }),
      csv: [header.join(","), ...rows.map((r) => r.slice(0, header.length).join(","))].join("\n") + "\n",
    })),
);

describe("coefficient and mean-transfer tables under fuzzing", () => {
  it("end in a result or an input error naming the file", async () => {
    await fc.assert(
      fc.asyncProperty(coefficientAudit, async ({ yaml, csv }) => {
        await endsInResultOrInputError(folder(yaml, { "data/run.csv": csv }), yaml);
      }),
      { numRuns: 200, seed: SEED + 5 },
    );
  });
});

describe("the command line under fuzzing", () => {
  it("exits 0, 1 or 2 and never prints a stack trace, for a handful of fuzzed audits run by the real launcher", async () => {
    const audits = fc.tuple(fc.oneof(mutatedYaml, yamlishLines), csvText);
    await fc.assert(
      fc.asyncProperty(audits, async ([yaml, csv]) => {
        const r = cliProcess(["run", folder(yaml, { "data/run.csv": csv }), "--json"]);
        expect([0, 1, 2], r.stderr).toContain(r.code);
        expect(r.stderr).not.toMatch(STACK_LINE);
        if (r.code === 2) expect(r.stdout).toBe("");
        else expect(() => JSON.parse(r.stdout)).not.toThrow();
      }),
      { numRuns: 4, seed: SEED + 4 },
    );
  }, 120_000);
});
