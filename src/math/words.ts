/**
 * The two 32-bit halves of a double, as fdlibm's __HI and __LO macros read and
 * write them (Sun Microsystems, fdlibm 5.3, 1993). One shared scratch double:
 * the functions that use it are synchronous and never re-entrant.
 */
const scratch = new Float64Array(1);
const halves = new Int32Array(scratch.buffer);
// Every platform Node and the browsers run on stores doubles little-endian; the
// word order below depends on it, so a big-endian host is refused outright.
if (new Uint8Array(new Float64Array([1]).buffer)[7] !== 0x3f) throw new Error("src/math assumes a little-endian platform");
const HIGH = 1;
const LOW = 0;

/** High word of x (sign, exponent and the top 20 bits of the fraction), signed. */
export function highWord(x: number): number {
  scratch[0] = x;
  return halves[HIGH];
}

/** Low word of x (the bottom 32 bits of the fraction), unsigned. */
export function lowWord(x: number): number {
  scratch[0] = x;
  return halves[LOW] >>> 0;
}

/** The double whose high word is `hi` and low word `lo`. */
export function fromWords(hi: number, lo: number): number {
  halves[HIGH] = hi | 0;
  halves[LOW] = lo | 0;
  return scratch[0];
}

/** x with its high word replaced, the low word kept. */
export function withHighWord(x: number, hi: number): number {
  scratch[0] = x;
  halves[HIGH] = hi | 0;
  return scratch[0];
}
