import { createHash } from "node:crypto";

/** `sha256:<hex>` of some bytes. */
export function sha256Of(bytes: string | Uint8Array): string {
  return `sha256:${createHash("sha256").update(bytes).digest("hex")}`;
}
