/**
 * XXH64 (Y. Collet, xxHash specification v0.1.1, "XXH64 algorithm"), the
 * content checksum of Zstandard frames (RFC 8878 §3.1.1: the low 4 bytes of
 * XXH64 with seed 0 over the decompressed content, little-endian). fzstd
 * does not check it, so without this a damaged byte in a stored (raw) block
 * would pass as a different digit. 64-bit words are kept as two unsigned
 * 32-bit halves; products are formed from 16-bit pieces so that every
 * intermediate stays an exact double.
 */

const P1 = [0x9e3779b1, 0x85ebca87];
const P2 = [0xc2b2ae3d, 0x27d4eb4f];
const P3 = [0x165667b1, 0x9e3779f9];
const P4 = [0x85ebca77, 0xc2b2ae63];
const P5 = [0x27d4eb2f, 0x165667c5];
const TWO32 = 4294967296;

type U64 = [number, number]; // [high, low]

function add(a: U64, b: readonly number[]): U64 {
  const lo = a[1] + b[1];
  return [(a[0] + b[0] + (lo >= TWO32 ? 1 : 0)) >>> 0, lo >>> 0];
}

function sub(a: U64, b: readonly number[]): U64 {
  const lo = a[1] - b[1];
  return [(a[0] - b[0] - (lo < 0 ? 1 : 0)) >>> 0, lo >>> 0];
}

/** The low 64 bits of a·b. */
function mul(a: U64, b: readonly number[]): U64 {
  const a0 = a[1] & 0xffff;
  const a1 = a[1] >>> 16;
  const b0 = b[1] & 0xffff;
  const b1 = b[1] >>> 16;
  const mid = a0 * b1 + a1 * b0;
  const low = a0 * b0 + (mid % 65536) * 65536;
  const high = a1 * b1 + Math.floor(mid / 65536) + Math.floor(low / TWO32) + Math.imul(a[0], b[1]) + Math.imul(a[1], b[0]);
  return [high >>> 0, low >>> 0];
}

function rotl(a: U64, r: number): U64 {
  const [h, l] = r >= 32 ? [a[1], a[0]] : a;
  const s = r % 32;
  if (s === 0) return [h, l];
  return [((h << s) | (l >>> (32 - s))) >>> 0, ((l << s) | (h >>> (32 - s))) >>> 0];
}

function xor(a: U64, b: U64): U64 {
  return [(a[0] ^ b[0]) >>> 0, (a[1] ^ b[1]) >>> 0];
}

function shr(a: U64, r: number): U64 {
  return r >= 32 ? [0, a[0] >>> (r - 32)] : [a[0] >>> r, ((a[1] >>> r) | (a[0] << (32 - r))) >>> 0];
}

function round(acc: U64, input: U64): U64 {
  return mul(rotl(add(acc, mul(input, P2)), 31), P1);
}

function read64(b: Uint8Array, i: number): U64 {
  const lo = (b[i] | (b[i + 1] << 8) | (b[i + 2] << 16) | (b[i + 3] << 24)) >>> 0;
  const hi = (b[i + 4] | (b[i + 5] << 8) | (b[i + 6] << 16) | (b[i + 7] << 24)) >>> 0;
  return [hi, lo];
}

/** Streaming XXH64 with seed 0. */
export class Xxh64 {
  private v: U64[] = [add(add([0, 0], P1), P2), [...P2] as U64, [0, 0], sub([0, 0], P1)];
  private readonly stripe = new Uint8Array(32);
  private pending = 0;
  private total = 0;

  update(bytes: Uint8Array): void {
    this.total += bytes.length;
    let i = 0;
    if (this.pending > 0) {
      const take = Math.min(32 - this.pending, bytes.length);
      this.stripe.set(bytes.subarray(0, take), this.pending);
      this.pending += take;
      i = take;
      if (this.pending < 32) return;
      this.consume(this.stripe, 0);
      this.pending = 0;
    }
    for (; i + 32 <= bytes.length; i += 32) this.consume(bytes, i);
    this.stripe.set(bytes.subarray(i), 0);
    this.pending = bytes.length - i;
  }

  private consume(b: Uint8Array, i: number): void {
    const v = this.v;
    for (let k = 0; k < 4; k++) v[k] = round(v[k], read64(b, i + 8 * k));
  }

  /** The 64-bit digest as [high, low] 32-bit halves. */
  digest(): [number, number] {
    const v = this.v;
    let h: U64;
    if (this.total >= 32) {
      h = add(add(add(rotl(v[0], 1), rotl(v[1], 7)), rotl(v[2], 12)), rotl(v[3], 18));
      for (let k = 0; k < 4; k++) h = add(mul(xor(h, round([0, 0], v[k])), P1), P4);
    } else h = [...P5] as U64;
    h = add(h, [Math.floor(this.total / TWO32), this.total >>> 0]);
    const b = this.stripe;
    let i = 0;
    for (; i + 8 <= this.pending; i += 8) h = add(mul(rotl(xor(h, round([0, 0], read64(b, i))), 27), P1), P4);
    if (i + 4 <= this.pending) {
      const w = (b[i] | (b[i + 1] << 8) | (b[i + 2] << 16) | (b[i + 3] << 24)) >>> 0;
      h = add(mul(rotl(xor(h, mul([0, w], P1)), 23), P2), P3);
      i += 4;
    }
    for (; i < this.pending; i++) h = mul(rotl(xor(h, mul([0, b[i]], P5)), 11), P1);
    h = mul(xor(h, shr(h, 33)), P2);
    h = mul(xor(h, shr(h, 29)), P3);
    h = xor(h, shr(h, 32));
    return h;
  }
}
