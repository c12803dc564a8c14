import fs from "node:fs";

/**
 * Bytes read front to back, a piece at a time: a byte range of a file, or a member of
 * a zip file inflated as it is read. `read(n)` gives exactly n bytes, fewer only where
 * the stream ends.
 */
export interface ByteStream {
  read(length: number): Promise<Uint8Array>;
}

/** Bytes [start, end) of an open file descriptor, read with positioned reads (the descriptor's offset never moves). */
export class FileRangeStream implements ByteStream {
  private done = 0;
  constructor(
    private readonly fd: number,
    private readonly start: number,
    private readonly end: number,
  ) {}

  async read(length: number): Promise<Uint8Array> {
    const want = Math.max(0, Math.min(length, this.end - this.start - this.done));
    const out = new Uint8Array(want);
    let filled = 0;
    while (filled < want) {
      const got = fs.readSync(this.fd, out, filled, want - filled, this.start + this.done + filled);
      if (got === 0) break; // the file is shorter than the range: the caller sees a short read
      filled += got;
    }
    this.done += filled;
    return filled === want ? out : out.subarray(0, filled);
  }
}
