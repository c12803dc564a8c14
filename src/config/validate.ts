import { z } from "zod";
import { ConfigError } from "../errors.ts";
import { formatKeyPath, type LocatedYaml } from "./yamlDocument.ts";
import { nearest } from "./nearest.ts";
import { MAX_QUOTED_CHARS, quoteForMessage } from "../messageText.ts";

/** What was found, as written: numbers in their source text (`9007199254740993`, not the double …992), long text shortened. */
function describeFound(value: unknown, written: string | undefined): string {
  if (value === undefined) return "nothing";
  if (typeof value === "string") return quoteForMessage(value);
  if (typeof value === "number" && written !== undefined && written.length <= MAX_QUOTED_CHARS) return written;
  if (typeof value === "number" || typeof value === "boolean" || value === null) return String(value);
  if (Array.isArray(value)) return "a list";
  return "a map";
}

function valueAt(root: unknown, path: readonly (string | number)[]): unknown {
  let v: unknown = root;
  for (const p of path) {
    if (v === null || typeof v !== "object") return undefined;
    v = (v as Record<string | number, unknown>)[p];
  }
  return v;
}

/** What a schema type expects, in the words of the audit.yaml reference. */
const EXPECTED: Record<string, string> = {
  array: "must be a list",
  object: "must be a map of keys",
  string: "must be text",
  number: "must be a number",
  integer: "must be a whole number",
  boolean: "must be true or false",
};

/**
 * The issue's message, with zod's built-in English ("Required", "Expected
 * array, received string") replaced by the wording of our own messages; the
 * schemas' own messages are kept as written.
 */
function plainMessage(issue: z.ZodIssue): string {
  if (issue.code === "invalid_type") {
    if (issue.message === "Required") return "is required";
    if (issue.message.startsWith("Expected ")) return EXPECTED[issue.expected] ?? `must be of type ${issue.expected}`;
  }
  return issue.message;
}

/** Strip wrappers (default, optional, refinements) down to the structural schema. */
function unwrap(schema: z.ZodTypeAny): z.ZodTypeAny {
  let s = schema;
  for (;;) {
    if (s instanceof z.ZodEffects) s = s.innerType();
    else if (s instanceof z.ZodDefault) s = s._def.innerType;
    else if (s instanceof z.ZodOptional || s instanceof z.ZodNullable) s = s.unwrap();
    else return s;
  }
}

/**
 * The keys an object schema accepts at a path of the document, used to suggest
 * the nearest valid key when one is misspelt.
 */
export function knownKeysAt(schema: z.ZodTypeAny, root: unknown, path: readonly (string | number)[]): string[] {
  let s = unwrap(schema);
  let v: unknown = root;
  for (const part of path) {
    if (s instanceof z.ZodDiscriminatedUnion) {
      const kind = (v as Record<string, unknown> | undefined)?.[s.discriminator];
      const option = s.optionsMap.get(kind as z.Primitive);
      if (!option) return [];
      s = unwrap(option);
    }
    if (s instanceof z.ZodObject) s = unwrap(s.shape[part as string] ?? z.never());
    else if (s instanceof z.ZodArray) s = unwrap(s.element);
    else return [];
    v = (v as Record<string | number, unknown> | undefined)?.[part];
  }
  if (s instanceof z.ZodDiscriminatedUnion) {
    const option = s.optionsMap.get((v as Record<string, unknown> | undefined)?.[s.discriminator] as z.Primitive);
    s = option ? unwrap(option) : s;
  }
  return s instanceof z.ZodObject ? Object.keys(s.shape) : [];
}

/**
 * Validate a parsed YAML document against a schema and turn every issue into a
 * line that names the file, the line, the key path, what is expected and what
 * was found: `audit.yaml:12 datasets[0].reservoirs.A.T: must be a positive
 * number of kelvin, found -1.3`. All issues are reported at once.
 */
export function validateLocated<S extends z.ZodTypeAny>(schema: S, doc: LocatedYaml): z.output<S> {
  const parsed = schema.safeParse(doc.value);
  if (parsed.success) return parsed.data;
  const lines: string[] = [];
  for (const issue of parsed.error.issues) {
    if (issue.code === "unrecognized_keys") {
      const allowed = knownKeysAt(schema, doc.value, issue.path);
      for (const key of issue.keys) {
        const path = [...issue.path, key];
        const hint = nearest(key, allowed);
        lines.push(`${doc.file}:${doc.lineOf(path) ?? "?"} ${formatKeyPath(path)}: is not a known key${hint ? ` (did you mean ${hint}?)` : ""}`);
      }
      continue;
    }
    const found = valueAt(doc.value, issue.path);
    const missing = found === undefined && issue.code === "invalid_type" && issue.received === "undefined";
    const said = plainMessage(issue);
    const message = missing ? `is missing; ${said === "is required" ? "it is required" : said}` : said;
    const quoteFound = !(issue.code === "custom" && issue.params?.quoteFound === false);
    const foundText = found === undefined || !quoteFound ? "" : `, found ${describeFound(found, doc.textAt(issue.path))}`;
    lines.push(`${doc.file}:${doc.lineOf(issue.path) ?? "?"} ${formatKeyPath(issue.path)}: ${message}${foundText}`);
  }
  throw new ConfigError(lines.join("\n"));
}
