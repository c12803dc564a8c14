import { Inflate } from "fflate";
import { FileRangeStream, type ByteStream } from "../binary/byteStream.ts";
import { crc32 } from "../crc32.ts";
import type { ZipMember } from "./zipDirectory.ts";

/** A member's bytes could not be recovered: `produced` bytes came out intact before the damage. */
export class DamagedMember extends Error {
  constructor(
    readonly member: string,
    readonly produced: number,
    readonly detail: string,
  ) {
    super(`${member}: ${detail} after ${produced} bytes`);
  }
}

/** Compressed bytes pushed into the inflater at once: with deflate's at most 1032:1 ratio, at most ~16 MiB comes out. */
const INPUT_PIECE = 16 << 10;
/** Compressed bytes per push when finding where damage begins. */
const DAMAGE_PIECE = 16;

/**
 * A zip member's uncompressed bytes, front to back: a stored member read in place, a
 * deflated one (RFC 1951) through fflate's streaming inflater, so memory stays bounded by
 * what one read asks for. Damaged deflate data give every intact byte before the damage,
 * then a DamagedMember; the CRC-32 of everything handed out is compared with the
 * directory's once the member's last byte has been read.
 */
export class ZipMemberStream implements ByteStream {
  private produced = 0;
  private crc = 0;
  private readonly raw: FileRangeStream;
  private readonly inflater: Inflate | null;
  private queue: Uint8Array[] = [];
  private queued = 0;
  private inputLeft: number;
  private damage: string | null = null;

  constructor(
    private readonly fd: number,
    private readonly member: ZipMember,
  ) {
    this.raw = new FileRangeStream(fd, member.dataStart, member.dataStart + member.compressedSize);
    this.inputLeft = member.compressedSize;
    this.inflater = member.method === 8 ? new Inflate((data) => this.enqueue(data)) : null;
  }

  async read(length: number): Promise<Uint8Array> {
    const want = Math.min(length, this.member.uncompressedSize - this.produced);
    const out = this.inflater === null ? await this.raw.read(want) : await this.inflated(want);
    this.crc = crc32(out, this.crc);
    this.produced += out.length;
    if (out.length < want) throw new DamagedMember(this.member.name, this.produced, this.damage ?? "the compressed data end early");
    if (this.produced === this.member.uncompressedSize && this.crc !== this.member.crc32) {
      throw new DamagedMember(this.member.name, this.produced, "the CRC-32 of the data does not match the one the zip directory records");
    }
    return out;
  }

  private enqueue(data: Uint8Array): void {
    this.queue.push(data);
    this.queued += data.length;
  }

  private async inflated(want: number): Promise<Uint8Array> {
    while (this.queued < want && this.inputLeft > 0) {
      const piece = await this.raw.read(Math.min(INPUT_PIECE, this.inputLeft));
      if (piece.length === 0) break;
      this.inputLeft -= piece.length;
      try {
        this.inflater!.push(piece, this.inputLeft === 0);
      } catch (err) {
        this.damage = `the deflated data are damaged (${(err as Error).message})`;
        this.inputLeft = 0;
        await this.recoverBeforeDamage();
      }
    }
    const n = Math.min(want, this.queued);
    const out = new Uint8Array(n);
    let filled = 0;
    while (filled < n) {
      const head = this.queue[0];
      const take = Math.min(head.length, n - filled);
      out.set(head.subarray(0, take), filled);
      filled += take;
      if (take === head.length) this.queue.shift();
      else this.queue[0] = head.subarray(take);
    }
    this.queued -= n;
    return out;
  }

  /**
   * fflate hands out nothing from a push that fails, so the member is inflated again
   * from its start in small pieces; the bytes after those already handed out or queued,
   * up to the damage, are queued. Only run once the data are known to be damaged.
   */
  private async recoverBeforeDamage(): Promise<void> {
    const raw = new FileRangeStream(this.fd, this.member.dataStart, this.member.dataStart + this.member.compressedSize);
    let skip = this.produced + this.queued;
    const inflater = new Inflate((data) => {
      if (skip >= data.length) skip -= data.length;
      else {
        this.enqueue(data.subarray(skip));
        skip = 0;
      }
    });
    for (let left = this.member.compressedSize; left > 0; ) {
      const piece = await raw.read(Math.min(DAMAGE_PIECE, left));
      if (piece.length === 0) return;
      left -= piece.length;
      try {
        inflater.push(piece, left === 0);
      } catch {
        return;
      }
    }
  }
}
