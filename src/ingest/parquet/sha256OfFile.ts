import fs from "node:fs";
import { createHash } from "node:crypto";

/** SHA-256 (hex) of a file's bytes, streamed so that memory stays bounded. */
export async function sha256OfFile(filePath: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of fs.createReadStream(filePath, { highWaterMark: 1 << 20 })) hash.update(chunk as Buffer);
  return hash.digest("hex");
}
