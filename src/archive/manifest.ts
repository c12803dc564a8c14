import { z } from "zod";
import { ArchiveError } from "../errors.ts";

export const MANIFEST_FORMAT = "transport-audit-version/1";

const digest = z.string().regex(/^sha256:[0-9a-f]{64}$/, "must be sha256:<64 hex digits>");

/** The publication record of one version, stored as versions/<N>/version.json. */
export const manifestSchema = z
  .object({
    format: z.literal(MANIFEST_FORMAT),
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
    /** The previous version and the digest of its version.json: the hash chain. */
    previous: z.object({ version: z.number().int().positive(), digest }).strict().nullable(),
  })
  .strict();

export type VersionManifest = z.output<typeof manifestSchema>;

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
