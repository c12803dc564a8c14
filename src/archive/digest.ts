import { createHash } from "node:crypto";
import { sha256HexOfFile } from "../ingest/fileDigest.ts";

/** `sha256:<hex>` of some bytes. */
export function sha256Of(bytes: string | Uint8Array): string {
  return `sha256:${createHash("sha256").update(bytes).digest("hex")}`;
}

/** Plain hex digest of a file, the form the result document uses for data files (read in chunks). */
export const hexSha256OfFile = sha256HexOfFile;
