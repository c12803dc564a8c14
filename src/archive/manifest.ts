import { z } from "zod";
import { ArchiveError } from "../errors.ts";
import { canonicalDigest } from "../report/canonicalJson.ts";
import { sha256Of } from "./digest.ts";

/**
 * Record formats. Format 1 (tool 0.1.0) has no digest of its own: the next
 * version links to the digest of its bytes, so an edit of the newest format-1
 * record is found only where a field can be compared with result.json. Format
 * 2 carries `digest`, the SHA-256 of the canonical JSON of the whole record
 * without that one field, so an edit of any field of any record is found, and
 * the next version links to that digest.
 */
export const MANIFEST_FORMAT_1 = "transport-audit-version/1";
export const MANIFEST_FORMAT = "transport-audit-version/2";
/** The newest tool version that wrote format-1 records: a format-1 record claiming a later one was rewritten. */
export const LAST_FORMAT_1_TOOL_VERSION = "0.1.0";

const digest = z.string().regex(/^sha256:[0-9a-f]{64}$/, "must be sha256:<64 hex digits>");

const recordFields = {
  audit: z.string(),
  version: z.number().int().positive(),
  /** ISO 8601 UTC timestamp of the publication: the only clock reading in the tool. */
  published: z.string().regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}Z$/, "must be a UTC timestamp such as 2026-12-01T22:30:00Z"),
  tool: z.object({ name: z.string(), version: z.string() }).strict(),
  fingerprint: digest,
  stamp: z.enum(["pass", "fail", "inconclusive"]),
  inputs: z.array(z.object({ id: z.string(), file: z.string(), sha256: z.string(), rows: z.number() }).strict()),
  /** Digests of the other files of the version folder. */
  files: z.object({ "result.json": digest, "audit.yaml": digest }).strict(),
  /** The previous version and its chain digest (see chainDigestOf): the hash chain. */
  previous: z.object({ version: z.number().int().positive(), digest }).strict().nullable(),
};

const format1Schema = z.object({ format: z.literal(MANIFEST_FORMAT_1), ...recordFields }).strict();
const format2Schema = z.object({ format: z.literal(MANIFEST_FORMAT), ...recordFields, digest }).strict();

/** The publication record of one version, stored as versions/<N>/version.json. */
export const manifestSchema = z.discriminatedUnion("format", [format1Schema, format2Schema], {
  errorMap: (issue, ctx) =>
    issue.code === "invalid_union_discriminator" ? { message: `must be ${MANIFEST_FORMAT} or ${MANIFEST_FORMAT_1}` } : { message: ctx.defaultError },
});

export type VersionManifest = z.output<typeof manifestSchema>;
/** A record as publish writes it today (format 2). */
export type CurrentManifest = z.output<typeof format2Schema>;

/** Parse version.json text; `label` names the file in messages. */
export function parseManifest(text: string, label: string): VersionManifest {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    throw new ArchiveError(`${label}: not valid JSON (${(err as Error).message})`);
  }
  const parsed = manifestSchema.safeParse(raw);
  if (!parsed.success) {
    const issues = parsed.error.issues.map((i) => `${i.path.join(".") || "(top level)"}: ${i.message}`);
    throw new ArchiveError(`${label}: not a valid version record: ${issues.join("; ")}`);
  }
  return parsed.data;
}

/** The digest a format-2 record carries: canonical JSON (RFC 8785 order) of every field but `digest`. */
export function recordDigest(m: Omit<CurrentManifest, "digest"> | VersionManifest): string {
  const { digest: _self, ...fields } = m as CurrentManifest;
  return canonicalDigest(fields);
}

/** A record with its own digest filled in. */
export function sealManifest(m: Omit<CurrentManifest, "digest">): CurrentManifest {
  return { ...m, digest: recordDigest(m) };
}

/**
 * What the next version links to: for format 2 the digest of the record's
 * fields as they now read, for format 1 the digest of the file's bytes.
 */
export function chainDigestOf(m: VersionManifest, text: string): string {
  return m.format === MANIFEST_FORMAT ? recordDigest(m) : sha256Of(text);
}

/** Manifest text: keys sorted, two-space indent, so that the same record always gives the same bytes. */
export function manifestText(m: VersionManifest): string {
  return `${JSON.stringify(sortKeys(m), null, 2)}\n`;
}

function sortKeys(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(sortKeys);
  if (v !== null && typeof v === "object") {
    return Object.fromEntries(
      Object.keys(v as object)
        .sort()
        .map((k) => [k, sortKeys((v as Record<string, unknown>)[k])]),
    );
  }
  return v;
}

/** `2026-12-01T22:30:00Z` → `2026-12-01`. */
export function publicationDate(m: Pick<VersionManifest, "published">): string {
  return m.published.slice(0, 10);
}
