import { z } from "zod";
import { ArchiveError, MAX_REPORTED_PROBLEMS } from "../errors.ts";
import type { ResultDocument } from "../report/resultDocument.ts";
import { isUnitText, type UnitSpec } from "../checks/valueUnits.ts";

/**
 * The shape every result document has, fresh from a run or frozen in
 * `versions/<N>/result.json`. A frozen document is read back as data from
 * disk, where anyone may have edited it, and its fields become file names,
 * links and page text of the site: so it is checked against this schema before
 * any use. Objects may carry members this schema does not name (later tool
 * versions add some), but every number anywhere must be finite.
 */

/** Ids that become URL path segments and file names (the audit.yaml rule for `id`). */
const slug = z.string({ invalid_type_error: "must be text" }).regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "must use only lower-case letters, digits and single hyphens, e.g. dot-junction-sweep");
/** Dataset ids, as audit.yaml allows them. */
const datasetId = z.string({ invalid_type_error: "must be text" }).regex(/^[A-Za-z0-9][A-Za-z0-9_-]*$/, "must start with a letter or digit and use only letters, digits, '-' and '_'");
const text = z.string({ invalid_type_error: "must be text" });
const hex64 = z.string({ invalid_type_error: "must be text" }).regex(/^[0-9a-f]{64}$/, "must be a SHA-256 digest (64 lower-case hexadecimal digits)");

/** A data file's path as audit.yaml names it: relative, below the audit folder, `/`-separated. */
export function isConfinedRelativePath(p: string): boolean {
  if (p === "" || p.includes("\0") || p.includes("\\") || p.startsWith("/") || /^[A-Za-z]:/.test(p)) return false;
  return p.split("/").every((segment) => segment !== "..");
}
const relativeFile = z
  .string({ invalid_type_error: "must be text" })
  .refine(isConfinedRelativePath, "must be a path relative to the audit folder that stays inside it (no '..', not absolute, '/' between folders)");

const STATUSES = ["pass", "fail", "inconclusive", "not-applicable", "info"] as const;
const STAMPS = ["pass", "fail", "inconclusive"] as const;
const listOf = <T extends z.ZodTypeAny>(item: T) => z.array(item, { invalid_type_error: "must be a list" });
const objectOf = <T extends z.ZodRawShape>(shape: T) => z.object(shape, { invalid_type_error: "must be an object" }).passthrough();

/**
 * A value's unit specification (src/checks/valueUnits.ts): a unit written as
 * SI symbols with powers ("J^-1", "W K^-1", "1"), null for a value that holds
 * no number, or a list or object of such specifications mirroring the value.
 */
const unitSpec: z.ZodType<UnitSpec> = z.lazy(() =>
  z.union([
    z.string().refine(isUnitText, 'must be a unit written as SI symbols with integer powers separated by spaces ("J^-1", "W K^-1"), "1" or "as written"'),
    z.null(),
    z.array(unitSpec),
    z.record(unitSpec),
  ], { errorMap: () => ({ message: "must be a unit, null, or a list or object of units" }) }),
);

const checkSchema = objectOf({
  check: slug,
  dataset: text.min(1, "must not be empty"),
  status: z.enum(STATUSES, { errorMap: () => ({ message: `must be one of ${STATUSES.join(", ")}` }) }),
  summary: text,
  reason: text.optional(),
  values: z.record(z.unknown(), { invalid_type_error: "must be an object" }),
  // Absent from the results of earlier tool versions, which stay valid.
  units: z.record(unitSpec, { invalid_type_error: "must be an object" }).optional(),
  criteria: z.record(z.unknown(), { invalid_type_error: "must be an object" }),
  assumptions: listOf(text),
  references: listOf(text),
  equations: listOf(text).optional(),
  tables: listOf(objectOf({ id: text, title: text, columns: listOf(objectOf({ key: text, label: text, unit: text.optional() })), rows: listOf(z.record(z.unknown())) })).optional(),
  plots: listOf(z.record(z.unknown())).optional(),
});

export const resultDocumentSchema = objectOf({
  audit: slug,
  title: text,
  authors: listOf(objectOf({ name: text, orcid: text.optional(), affiliation: text.optional() })),
  license: text.optional(),
  description: text.optional(),
  device: text.optional(),
  date: text.optional(),
  doi: text.optional(),
  tool: objectOf({ name: text, version: text }),
  fingerprint: z.string({ invalid_type_error: "must be text" }).regex(/^sha256:[0-9a-f]{64}$/, "must be sha256: followed by 64 lower-case hexadecimal digits"),
  stamp: z.enum(STAMPS, { errorMap: () => ({ message: `must be one of ${STAMPS.join(", ")}` }) }),
  settings: z.record(z.unknown(), { invalid_type_error: "must be an object" }),
  datasets: listOf(objectOf({ id: datasetId, file: relativeFile, sha256: hex64, rows: z.number({ invalid_type_error: "must be a number" }).int("must be a whole number").nonnegative("must not be negative") })),
  checks: listOf(checkSchema),
});

/** `checks[2].values.slope`: a key path as the messages write it. */
export function keyPath(path: readonly (string | number)[]): string {
  return path.map((p, i) => (typeof p === "number" ? `[${p}]` : i === 0 ? p : `.${p}`)).join("") || "(document)";
}

function found(value: unknown): string {
  if (value === undefined) return "nothing";
  if (typeof value === "string") return JSON.stringify(value.length > 80 ? `${value.slice(0, 77)}…` : value);
  if (typeof value === "number" || typeof value === "boolean" || value === null) return String(value);
  return Array.isArray(value) ? "a list" : "an object";
}

function valueAt(root: unknown, path: readonly (string | number)[]): unknown {
  let v = root;
  for (const p of path) v = v !== null && typeof v === "object" ? (v as Record<string, unknown>)[p] : undefined;
  return v;
}

/** Paths of the numbers that are not finite (JSON allows 1e999, which reads as Infinity). */
function nonFiniteNumbers(value: unknown, path: (string | number)[] = [], out: (string | number)[][] = []): (string | number)[][] {
  if (typeof value === "number" && !Number.isFinite(value)) out.push([...path]);
  else if (Array.isArray(value)) value.forEach((v, i) => nonFiniteNumbers(v, [...path, i], out));
  else if (value !== null && typeof value === "object") for (const [k, v] of Object.entries(value)) nonFiniteNumbers(v, [...path, k], out);
  return out;
}

/**
 * Check a parsed result document; `label` names its file in messages
 * (`versions/1/result.json`). Throws ArchiveError listing each problem as
 * `file: key.path: what is expected, found …`.
 */
export function validateResultDocument(value: unknown, label: string): ResultDocument {
  const problems: string[] = [];
  const parsed = resultDocumentSchema.safeParse(value);
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const message = issue.code === "invalid_type" && issue.message === "Required" ? "is required" : issue.message;
      problems.push(`${label}: ${keyPath(issue.path)}: ${message}, found ${found(valueAt(value, issue.path))}`);
    }
  }
  for (const path of nonFiniteNumbers(value)) problems.push(`${label}: ${keyPath(path)}: must be a finite number, found ${found(valueAt(value, path))}`);
  if (problems.length > 0) {
    const shown = problems.slice(0, MAX_REPORTED_PROBLEMS);
    if (problems.length > shown.length) shown.push(`… and ${problems.length - shown.length} more problem(s) in ${label}`);
    throw new ArchiveError(shown.join("\n"));
  }
  return value as ResultDocument;
}
