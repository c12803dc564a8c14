import { createHash } from "node:crypto";

/**
 * The digest a version record must carry, computed here independently of the
 * archive code: SHA-256 (node:crypto, FIPS 180-4) of the record without its
 * `digest` field, written with object keys in code-point order and no white
 * space. A record holds only text, whole numbers, null, lists and maps, for
 * which JSON.stringify writes exactly the form RFC 8785 (JSON Canonicalization
 * Scheme, Rundgren, Jordan and Erdtman, 2020, §3.2.2) prescribes.
 */
export function expectedRecordDigest(record: Record<string, unknown>): string {
  const { digest: _self, ...fields } = record;
  const sorted = (v: unknown): unknown =>
    Array.isArray(v)
      ? v.map(sorted)
      : v !== null && typeof v === "object"
        ? Object.fromEntries(Object.keys(v).sort().map((k) => [k, sorted((v as Record<string, unknown>)[k])]))
        : v;
  return `sha256:${createHash("sha256").update(JSON.stringify(sorted(fields))).digest("hex")}`;
}
