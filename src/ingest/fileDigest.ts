import fs from "node:fs";
import { createHash } from "node:crypto";

/**
 * SHA-256 (FIPS 180-4) of a file's bytes as hex, the form the result document
 * and the version records use for data files. Both forms read the file in
 * pieces, so memory stays flat however large the file is.
 */

const CHUNK = 1 << 20;

/** Hex SHA-256 of a file, read in 1 MiB chunks in this thread. */
export function sha256HexOfFile(file: string): string {
  const hash = createHash("sha256");
  const buffer = Buffer.allocUnsafe(CHUNK);
  const fd = fs.openSync(file, "r");
  try {
    for (;;) {
      const n = fs.readSync(fd, buffer, 0, CHUNK, null);
      if (n === 0) break;
      hash.update(buffer.subarray(0, n));
    }
  } finally {
    fs.closeSync(fd);
  }
  return hash.digest("hex");
}

/** Hex SHA-256 of a file, streamed: this thread stays free while it is read (worker threads read alongside). */
export async function sha256HexOfFileAsync(file: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of fs.createReadStream(file, { highWaterMark: 4 * CHUNK })) hash.update(chunk as Buffer);
  return hash.digest("hex");
}
