import { Gunzip as FflateGunzip } from "fflate";
import { Transform } from "./stream.ts";
import { crc32 as crc32Update } from "../../../ingest/sources/crc32.ts";

/**
 * `node:zlib` for the browser bundle: the streaming gzip inflater that
 * src/ingest/sources/fileBytes.ts uses, on fflate. fflate inflates every member
 * of a multi-member file but does not check the members' trailers, which zlib
 * does; so each member's CRC-32 and length (RFC 1952 §2.3.1) are checked here,
 * and errors carry zlib's codes (Z_BUF_ERROR for input that ends early,
 * Z_DATA_ERROR for damaged data or a trailer that does not match), which is
 * what fileBytes.ts words its message from.
 */

/** Input bytes kept for reading trailers back: far more than any member header this tool meets (10 bytes and a file name). */
const KEEP = 1 << 17;

function zlibError(code: "Z_BUF_ERROR" | "Z_DATA_ERROR", message: string): Error {
  return Object.assign(new Error(message), { code, errno: code === "Z_BUF_ERROR" ? -5 : -3 });
}

class GunzipStream extends Transform {
  private readonly inflater: FflateGunzip;
  /** CRC-32 and length (mod 2^32) of the current member's output. */
  private crc = 0;
  private size = 0;
  /** Input bytes pushed so far, and the latest chunks with their offsets (at least KEEP bytes): a member's trailer is read back from them. */
  private before = 0;
  private recent: { start: number; bytes: Uint8Array }[] = [];
  private trailerProblem: Error | null = null;

  constructor() {
    super({ highWaterMark: 4 });
    this.inflater = new FflateGunzip((data) => {
      this.crc = crc32Update(data, this.crc);
      this.size = (this.size + data.length) >>> 0;
      // fflate may hand out a view into its window: copy it before it is overwritten.
      this.push(Buffer.from(data));
    });
    // Called at the start of every member after the first: the 8 bytes before it are the previous member's trailer.
    this.inflater.onmember = (offset: number) => this.checkTrailer(offset);
  }

  /** Byte `at` of the input, from the chunks kept. */
  private byteAt(at: number): number {
    for (const chunk of this.recent) {
      if (at >= chunk.start && at < chunk.start + chunk.bytes.length) return chunk.bytes[at - chunk.start];
    }
    // Only a member header longer than KEEP bytes (file name, comment or extra field) puts the trailer out of reach.
    throw zlibError("Z_DATA_ERROR", `a gzip member header longer than ${KEEP} bytes: its member's trailer cannot be checked here`);
  }

  private checkTrailer(end: number): void {
    if (this.trailerProblem) return;
    let crc = 0;
    let isize = 0;
    for (let k = 0; k < 4; k++) crc |= this.byteAt(end - 8 + k) << (8 * k);
    for (let k = 0; k < 4; k++) isize |= this.byteAt(end - 4 + k) << (8 * k);
    if (crc >>> 0 !== this.crc) this.trailerProblem = zlibError("Z_DATA_ERROR", "incorrect data check");
    else if (isize >>> 0 !== this.size) this.trailerProblem = zlibError("Z_DATA_ERROR", "incorrect length check");
    this.crc = 0;
    this.size = 0;
  }

  /**
   * Whether the input ended at the end of a member's compressed data rather
   * than inside it. fflate's streaming inflater says nothing of input that
   * stops mid-stream, so its state is read: `f` (the final block was begun) and
   * `l` (a block's code table, cleared when the block ends); a state without
   * `f` is the fresh one it starts after a finished member. These are fflate
   * 0.8's internals; test/rerun/formats.test.ts holds the messages to zlib's.
   */
  private memberComplete(): boolean {
    const state = (this.inflater as unknown as { s: { f?: number; l?: unknown } }).s;
    return state.f === undefined || (state.f !== 0 && !state.l);
  }

  private feed(chunk: Uint8Array, final: boolean): void {
    this.recent.push({ start: this.before, bytes: chunk });
    this.before += chunk.length;
    while (this.recent.length > 1 && this.before - this.recent[1].start >= KEEP) this.recent.shift();
    try {
      this.inflater.push(chunk, final);
    } catch (err) {
      const message = (err as Error).message;
      throw zlibError(/unexpected EOF/.test(message) ? "Z_BUF_ERROR" : "Z_DATA_ERROR", message);
    }
    if (this.trailerProblem) throw this.trailerProblem;
  }

  /**
   * The chunk last written, held back one step: fflate reports input that ends
   * inside a member only when the chunk holding that end is pushed as final
   * (an empty final push after it passes silently).
   */
  private pending: Uint8Array | null = null;

  override _transform(chunk: unknown, _encoding: string, callback: (err?: Error | null) => void): void {
    try {
      if (this.pending) this.feed(this.pending, false);
      this.pending = chunk as Uint8Array;
      callback(null);
    } catch (err) {
      callback(err as Error);
    }
  }

  override _flush(callback: (err?: Error | null) => void): void {
    try {
      const last = this.pending ?? new Uint8Array(0);
      this.pending = null;
      if (this.before + last.length < 18) throw zlibError("Z_BUF_ERROR", "unexpected end of file"); // shorter than a header and a trailer (RFC 1952 §2.3)
      this.feed(last, true);
      if (!this.memberComplete()) throw zlibError("Z_BUF_ERROR", "unexpected end of file");
      this.checkTrailer(this.before);
      if (this.trailerProblem) throw this.trailerProblem;
      callback(null);
    } catch (err) {
      callback(err as Error);
    }
  }
}

export function createGunzip(_options: { chunkSize?: number } = {}): Transform {
  return new GunzipStream();
}

/**
 * zlib.crc32(data, value): the CRC-32 of RFC 1952 §8 continued from `value`, which
 * src/ingest/parquet/pageChecksums.ts checks Parquet pages with (Node ≥ 20.15 has it natively).
 */
export function crc32(data: Uint8Array | string, value = 0): number {
  return crc32Update(typeof data === "string" ? new TextEncoder().encode(data) : data, value);
}

export default { createGunzip, crc32 };
