import { createHash } from "node:crypto";
import fs from "node:fs";

/** `sha256:<hex>` of some bytes. */
export function sha256Of(bytes: string | Uint8Array): string {
  return `sha256:${createHash("sha256").update(bytes).digest("hex")}`;
}

/** `sha256:<hex>` of a file's bytes. */
export function sha256OfFile(file: string): string {
  return sha256Of(fs.readFileSync(file));
}

/** Plain hex digest of a file, the form the result document uses for data files. */
export function hexSha256OfFile(file: string): string {
  return createHash("sha256").update(fs.readFileSync(file)).digest("hex");
}
