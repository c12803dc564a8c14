import fs from "node:fs";
import { createHash } from "node:crypto";
import zlib from "node:zlib";
import { DataError } from "../../errors.ts";

/** How the bytes on disk are compressed; told by their first bytes, not by the name. */
export type Compression = "none" | "gzip" | "zstd";

/** Read size of the block readers: large enough for system calls not to matter. */
const BLOCK = 4 << 20;

/**
 * The compression of a file from its magic number: gzip 1F 8B (RFC 1952 §2.3.1),
 * Zstandard frames 28 B5 2F FD (RFC 8878 §3.1.1).
 */
export function compressionOf(head: Uint8Array): Compression {
  if (head[0] === 0x1f && head[1] === 0x8b) return "gzip";
  if (head[0] === 0x28 && head[1] === 0xb5 && head[2] === 0x2f && head[3] === 0xfd) return "zstd";
  return "none";
}

/** The compression a file name announces (`.gz`, `.zst`), and the name without it. */
export function compressionSuffix(name: string): { compression: Compression; inner: string } {
  if (/\.gz$/i.test(name)) return { compression: "gzip", inner: name.slice(0, -3) };
  if (/\.zst$/i.test(name)) return { compression: "zstd", inner: name.slice(0, -4) };
  return { compression: "none", inner: name };
}

/** Up to `n` bytes from the start of a descriptor. */
export function headOf(fd: number, n: number): Buffer {
  const head = Buffer.allocUnsafe(n);
  let got = 0;
  while (got < n) {
    const k = fs.readSync(fd, head, got, n - got, got);
    if (k === 0) break;
    got += k;
  }
  return head.subarray(0, got);
}

/** The bytes on disk from `from` to `to`, in blocks (positional reads: the descriptor's offset is never moved). */
async function* diskBlocks(fd: number, from: number, to: number, onBytes?: (n: number) => void): AsyncGenerator<Uint8Array> {
  let offset = from;
  while (offset < to) {
    const buffer = Buffer.allocUnsafe(Math.min(BLOCK, to - offset));
    const got = fs.readSync(fd, buffer, 0, buffer.length, offset);
    if (got === 0) break;
    offset += got;
    onBytes?.(got);
    yield buffer.subarray(0, got);
  }
}

/**
 * The text of a file (decompressed when it is compressed) from text offset
 * `skip` on, in blocks of bounded size: gzip through node:zlib's streaming
 * inflater (every member of a multi-member file), Zstandard through fzstd's
 * streaming decompressor. A damaged member or frame ends the stream with a
 * DataError naming the file. `onBytes` counts bytes read from disk.
 */
export async function* textBlocks(fd: number, size: number, compression: Compression, label: string, skip = 0, onBytes?: (n: number) => void): AsyncGenerator<Uint8Array> {
  const source = compression === "none" ? diskBlocks(fd, skip, size, onBytes) : decompressed(fd, size, compression, label, onBytes);
  let toSkip = compression === "none" ? 0 : skip;
  for await (const block of source) {
    if (toSkip >= block.length) {
      toSkip -= block.length;
      continue;
    }
    yield toSkip > 0 ? block.subarray(toSkip) : block;
    toSkip = 0;
  }
}

async function* decompressed(fd: number, size: number, compression: Compression, label: string, onBytes?: (n: number) => void): AsyncGenerator<Uint8Array> {
  const what = compression === "gzip" ? "gzip" : "Zstandard";
  const damaged = (detail: string) =>
    new DataError(`${label}: the ${what} data is damaged (${detail}); the file cannot be decompressed: copy it again from its source`);
  if (compression === "zstd") {
    const { CheckedZstd } = await import("./zstdFrames.ts"); // the Zstandard decoder only for a .zst file
    const out: Uint8Array[] = [];
    const inflater = new CheckedZstd((data) => out.push(data));
    for await (const block of diskBlocks(fd, 0, size, onBytes)) {
      try {
        inflater.push(block);
      } catch (err) {
        throw damaged((err as Error).message);
      }
      while (out.length) yield out.shift()!;
    }
    try {
      inflater.end();
    } catch (err) {
      throw damaged((err as Error).message);
    }
    return;
  }
  const inflater = zlib.createGunzip({ chunkSize: 1 << 20 });
  const feed = (async () => {
    for await (const block of diskBlocks(fd, 0, size, onBytes)) {
      if (!inflater.write(block)) await new Promise((resolve) => inflater.once("drain", resolve));
    }
    inflater.end();
  })();
  feed.catch((err) => inflater.destroy(err as Error));
  try {
    for await (const piece of inflater as AsyncIterable<Buffer>) yield piece;
  } catch (err) {
    if (err instanceof DataError) throw err;
    const code = (err as NodeJS.ErrnoException).code;
    throw damaged(code === "Z_BUF_ERROR" ? "it ends before the compressed stream does: the file is truncated" : `zlib: ${code ?? (err as Error).message}, a damaged block or a check value that does not match`);
  } finally {
    inflater.destroy();
  }
}

/**
 * SHA-256 (FIPS 180-4, hex) of the bytes on disk, read through the descriptor
 * in blocks into one reused buffer. Not through diskBlocks: its consumers may
 * keep the blocks it yields, so it allocates one per block, and fresh memory
 * costs first-touch page faults (about 4 ms per MB here; DEVELOPERS.md "Large
 * data"): hashing a 208 MB file that way cost about 0.3 s more CPU while the
 * reduction workers ran. Positional reads, so the descriptor's offset is never
 * moved; synchronous ones, as before, which the browser bundle's file system
 * offers too.
 */
export async function sha256OfDescriptor(fd: number, size: number): Promise<string> {
  const hash = createHash("sha256");
  const buffer = Buffer.allocUnsafe(Math.max(1, Math.min(BLOCK, size)));
  let offset = 0;
  while (offset < size) {
    const bytesRead = fs.readSync(fd, buffer, 0, Math.min(buffer.length, size - offset), offset);
    if (bytesRead === 0) break;
    hash.update(buffer.subarray(0, bytesRead));
    offset += bytesRead;
  }
  return hash.digest("hex");
}
