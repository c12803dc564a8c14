import { Decompress } from "fzstd";
import { Xxh64 } from "./xxh64.ts";

/**
 * Zstandard decompression that checks every frame's content checksum
 * (RFC 8878 §3.1.1). The compressed bytes are walked frame by frame and
 * block by block (frame header, 3-byte block headers, the optional 4-byte
 * checksum after the last block; skippable frames passed over); each frame
 * goes through its own fzstd decompressor, so the output of a frame is
 * known and hashed as it streams. Bounded memory: one block at a time.
 */
export class CheckedZstd {
  private buffer: Uint8Array = new Uint8Array(0);
  private state: "magic" | "header" | "block" | "payload" | "checksum" | "skip" = "magic";
  private need = 4;
  private remaining = 0;
  private last = false;
  private hasChecksum = false;
  private inflater: Decompress | null = null;
  private hash = new Xxh64();
  /** Bytes of compressed input consumed (for messages). */
  consumed = 0;

  constructor(private readonly out: (data: Uint8Array) => void) {}

  /** Feed compressed bytes; throws an Error whose message says what is wrong. */
  push(bytes: Uint8Array): void {
    this.buffer = this.buffer.length ? concat(this.buffer, bytes) : bytes;
    let pos = 0;
    for (;;) {
      const avail = this.buffer.length - pos;
      if (this.state === "payload" || this.state === "skip") {
        const take = Math.min(avail, this.remaining);
        if (take === 0 && this.remaining > 0) break;
        if (this.state === "payload") this.feed(this.buffer.subarray(pos, pos + take));
        pos += take;
        this.remaining -= take;
        if (this.remaining > 0) break;
        this.state = this.state === "skip" ? "magic" : this.last ? (this.hasChecksum ? "checksum" : "magic") : "block";
        if (this.state === "magic" && this.inflater) this.endFrame(null);
        this.need = this.state === "checksum" ? 4 : this.state === "block" ? 3 : 4;
        continue;
      }
      if (avail < this.need) break;
      const b = this.buffer.subarray(pos, pos + this.need);
      if (this.state === "magic") {
        const magic = (b[0] | (b[1] << 8) | (b[2] << 16) | (b[3] << 24)) >>> 0;
        if ((magic & 0xfffffff0) === 0x184d2a50) {
          // Skippable frame: 4-byte magic, 4-byte length, content ignored.
          if (avail < 8) break;
          this.remaining = (this.buffer[pos + 4] | (this.buffer[pos + 5] << 8) | (this.buffer[pos + 6] << 16) | (this.buffer[pos + 7] << 24)) >>> 0;
          pos += 8;
          this.state = "skip";
          continue;
        }
        if (magic !== 0xfd2fb528) throw new Error(`no Zstandard frame starts at byte ${this.consumed + pos + 1}`);
        if (avail < 5) break;
        const fhd = this.buffer[pos + 4];
        const fcsFlag = fhd >> 6;
        const single = (fhd >> 5) & 1;
        this.hasChecksum = ((fhd >> 2) & 1) === 1;
        const dictBytes = [0, 1, 2, 4][fhd & 3];
        const fcsBytes = fcsFlag === 0 ? single : [0, 2, 4, 8][fcsFlag];
        this.need = 5 + (single ? 0 : 1) + dictBytes + fcsBytes;
        this.state = "header";
        this.inflater = new Decompress((data) => {
          this.hash.update(data);
          this.out(data);
        });
        this.hash = new Xxh64();
        continue;
      }
      if (this.state === "header") {
        this.feed(b);
        pos += this.need;
        this.state = "block";
        this.need = 3;
        continue;
      }
      if (this.state === "block") {
        const v = b[0] | (b[1] << 8) | (b[2] << 16);
        this.last = (v & 1) === 1;
        const type = (v >> 1) & 3;
        if (type === 3) throw new Error(`a block of the reserved type at byte ${this.consumed + pos + 1}`);
        this.feed(b);
        pos += 3;
        this.remaining = type === 1 ? 1 : v >>> 3;
        this.state = "payload";
        if (this.remaining === 0) {
          this.state = this.last ? (this.hasChecksum ? "checksum" : "magic") : "block";
          if (this.state === "magic") this.endFrame(null);
          this.need = this.state === "checksum" ? 4 : this.state === "block" ? 3 : 4;
        }
        continue;
      }
      // checksum
      this.endFrame(b);
      pos += 4;
      this.state = "magic";
      this.need = 4;
    }
    this.consumed += pos;
    this.buffer = this.buffer.subarray(pos);
  }

  /** After the last input: a frame left open means the file was cut short. */
  end(): void {
    if (this.state !== "magic" || this.buffer.length > 0) throw new Error(`the file ends inside a frame (after byte ${this.consumed + this.buffer.length}): it is truncated`);
  }

  private feed(bytes: Uint8Array): void {
    this.inflater!.push(bytes);
  }

  private endFrame(checksum: Uint8Array | null): void {
    if (checksum !== null) this.feed(checksum);
    this.inflater!.push(new Uint8Array(0), true);
    this.inflater = null;
    if (checksum === null) return;
    const [, low] = this.hash.digest();
    const stored = (checksum[0] | (checksum[1] << 8) | (checksum[2] << 16) | (checksum[3] << 24)) >>> 0;
    if (stored !== low) throw new Error("a frame's content checksum (XXH64) does not match its decompressed bytes");
  }
}

function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  const out = new Uint8Array(a.length + b.length);
  out.set(a, 0);
  out.set(b, a.length);
  return out;
}
