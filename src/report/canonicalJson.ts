import { createHash } from "node:crypto";

/**
 * Canonical JSON: object keys in code-point order, no insignificant white
 * space, numbers in ECMAScript's shortest round-trip form (Number.prototype.toString,
 * ECMA-262 §6.1.6.1.20), −0 written as 0, non-finite numbers as null,
 * undefined members omitted. The same value always gives the same bytes, so
 * digests of result documents can be compared across runs.
 * Follows the ordering and number rules of RFC 8785 (JSON Canonicalization Scheme).
 */
export function canonicalJson(value: unknown): string {
  if (value === null || value === undefined) return "null";
  switch (typeof value) {
    case "number":
      if (!Number.isFinite(value)) return "null";
      return Object.is(value, -0) ? "0" : String(value);
    case "boolean":
      return value ? "true" : "false";
    case "string":
      return JSON.stringify(value);
    case "bigint":
      return value.toString();
    case "object": {
      if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
        return canonicalJson(Array.from(value as unknown as ArrayLike<number>));
      }
      if (Array.isArray(value)) return `[${value.map((v) => (v === undefined ? "null" : canonicalJson(v))).join(",")}]`;
      const entries = Object.entries(value as Record<string, unknown>)
        .filter(([, v]) => v !== undefined && typeof v !== "function")
        .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
      return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(",")}}`;
    }
    default:
      throw new TypeError(`canonicalJson cannot encode a ${typeof value}`);
  }
}

/** `sha256:<hex>` of a value's canonical JSON. */
export function canonicalDigest(value: unknown): string {
  return `sha256:${createHash("sha256").update(canonicalJson(value)).digest("hex")}`;
}
