import { Gunzip as FflateGunzip } from "fflate";
import { Transform } from "./stream.ts";

/**
 * `node:zlib` for the browser bundle: the streaming gzip inflater that
 * src/ingest/sources/fileBytes.ts uses, on fflate. fflate inflates every member
 * of a multi-member file but does not check the members' trailers, which zlib
 * does; so each member's CRC-32 and length (RFC 1952 §2.3.1) are checked here,
 * and errors carry zlib's codes (Z_BUF_ERROR for input that ends early,
 * Z_DATA_ERROR for damaged data or a trailer that does not match), which is
 * what fileBytes.ts words its message from.
 */

/** CRC-32 table for the polynomial of RFC 1952 §8 (reflected 0xEDB88320). */
const CRC_TABLE = (() => {
  const table = new Int32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c;
  }
  return table;
})();

function crc32Update(crc: number, data: Uint8Array): number {
  let c = crc ^ -1;
  for (let i = 0; i < data.length; i++) c = CRC_TABLE[(c ^ data[i]) & 255] ^ (c >>> 8);
  return (c ^ -1) >>> 0;
}

function zlibError(code: "Z_BUF_ERROR" | "Z_DATA_ERROR", message: string): Error {
  return Object.assign(new Error(message), { code, errno: code === "Z_BUF_ERROR" ? -5 : -3 });
}

class GunzipStream extends Transform {
  private readonly inflater: FflateGunzip;
  /** CRC-32 and length (mod 2^32) of the current member's output. */
  private crc = 0;
  private size = 0;
  /** Input bytes pushed before the current chunk, and the last 8 of them (a trailer may straddle two chunks). */
  private before = 0;
  private tail: Uint8Array = new Uint8Array(0);
  private current: Uint8Array = new Uint8Array(0);
  private trailerProblem: Error | null = null;

  constructor() {
    super({ highWaterMark: 4 });
    this.inflater = new FflateGunzip((data) => {
      this.crc = crc32Update(this.crc, data);
      this.size = (this.size + data.length) >>> 0;
      // fflate may hand out a view into its window: copy it before it is overwritten.
      this.push(Buffer.from(data));
    });
    // Called at the start of every member after the first: the 8 bytes before it are the previous member's trailer.
    this.inflater.onmember = (offset: number) => this.checkTrailer(offset);
  }

  /** Byte `at` of the whole input (at ≥ before − 8). */
  private byteAt(at: number): number {
    return at >= this.before ? this.current[at - this.before] : this.tail[this.tail.length - (this.before - at)];
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

  private feed(chunk: Uint8Array, final: boolean): void {
    this.current = chunk;
    try {
      this.inflater.push(chunk, final);
    } catch (err) {
      const message = (err as Error).message;
      throw zlibError(/unexpected EOF/.test(message) ? "Z_BUF_ERROR" : "Z_DATA_ERROR", message);
    }
    if (this.trailerProblem) throw this.trailerProblem;
    const joined = new Uint8Array(Math.min(8, this.tail.length + chunk.length));
    const fromChunk = Math.min(chunk.length, joined.length);
    joined.set(this.tail.subarray(this.tail.length - (joined.length - fromChunk)), 0);
    joined.set(chunk.subarray(chunk.length - fromChunk), joined.length - fromChunk);
    this.tail = joined;
    this.before += chunk.length;
    this.current = new Uint8Array(0);
  }

  override _transform(chunk: unknown, _encoding: string, callback: (err?: Error | null) => void): void {
    try {
      this.feed(chunk as Uint8Array, false);
      callback(null);
    } catch (err) {
      callback(err as Error);
    }
  }

  override _flush(callback: (err?: Error | null) => void): void {
    try {
      if (this.before < 18) throw zlibError("Z_BUF_ERROR", "unexpected end of file");
      this.feed(new Uint8Array(0), true);
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

export default { createGunzip };
