/// <reference lib="dom" />
/**
 * SHA-256 digests with the Web Crypto API (FIPS 180-4), in the forms the
 * version record uses: a file's lowercase hex digest, and for a dataset of
 * several parts the digest of their `sha256sum` listing sorted by path (the
 * rule of src/ingest/sources/parts.ts, `partsDigest`).
 */

function hex(buffer: ArrayBuffer): string {
  return Array.from(new Uint8Array(buffer), (b) => b.toString(16).padStart(2, "0")).join("");
}

/** Lowercase hex SHA-256 of the bytes. */
export async function sha256Hex(bytes: Uint8Array): Promise<string> {
  return hex(await crypto.subtle.digest("SHA-256", bytes as Uint8Array<ArrayBuffer>));
}

/** The digest of a multi-part dataset: SHA-256 of `<hex>  <path>\n` per part, sorted by path in code-point order. */
export async function partsDigestHex(parts: readonly { path: string; sha256: string }[]): Promise<string> {
  const sorted = [...parts].sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
  return sha256Hex(new TextEncoder().encode(sorted.map((p) => `${p.sha256}  ${p.path}\n`).join("")));
}
