import { fromWords } from "./words.ts";

// Constants of fdlibm's e_exp.c (Sun Microsystems, fdlibm 5.3, 1993; the FreeBSD
// msun version V8 adopted as ieee754::exp). Hexadecimal words in the comments.
const HUGE = 1.0e300;
const TWO_M1000 = 9.33263618503218878990e-302; // 2^-1000: 0x01700000 0
const O_THRESHOLD = 7.09782712893383973096e2; // 0x40862E42 FEFA39EF
const U_THRESHOLD = -7.45133219101941108420e2; // 0xC0874910 D52D3051
const LN2_HI = 6.93147180369123816490e-1; // 0x3FE62E42 FEE00000
const LN2_LO = 1.90821492927058770002e-10; // 0x3DEA39EF 35793C76
const INV_LN2 = 1.44269504088896338700; // 0x3FF71547 652B82FE
const P1 = 1.66666666666666019037e-1; // 0x3FC55555 5555553E
const P2 = -2.77777777770155933842e-3; // 0xBF66C16C 16BEBD93
const P3 = 6.61375632143793436117e-5; // 0x3F11566A AF25DE2C
const P4 = -1.65339022054652515390e-6; // 0xBEBBBD41 C5D26BF1
const P5 = 4.13813679705723846039e-8; // 0x3E663769 72BEA4D0
const TWO_1023 = 8.98846567431158e307; // 2^1023

// fdlibm compares the high word of |x| with fixed words; for a non-negative
// double, "high word ≥ H" is exactly "|x| ≥ the double with words (H, 0)", so
// the same branches are taken by comparing values, without reading words.
const BIG = fromWords(0x40862e42, 0); // fdlibm: hx >= 0x40862E42
const HALF_LN2_UP = fromWords(0x3fd62e43, 0); // hx > 0x3fd62e42
const THREE_HALF_LN2 = fromWords(0x3ff0a2b2, 0); // hx < 0x3FF0A2B2
const TINY = fromWords(0x3e300000, 0); // hx < 0x3e300000: 2^-28

// 2^k for k = -1021 … 1023 (and the 2^(k+1000) fdlibm uses below that), exact.
const POW2_OFFSET = 1021;
const POW2 = Float64Array.from({ length: 1024 + POW2_OFFSET + 1 }, (_, i) => fromWords(0x3ff00000 + ((i - POW2_OFFSET) << 20), 0));

/**
 * e^x with the same bits in every JavaScript engine: fdlibm's algorithm
 * (argument reduction x = k ln2 + r, |r| ≤ ln2/2, then a degree-5 minimax
 * rational form for e^r; error below 1 ulp), written in plain arithmetic that
 * IEEE 754 fixes bit for bit. Engines' own Math.exp differ in the last bit
 * between releases (test/browser/arithmeticParity.test.ts); published results
 * must not depend on which engine re-runs them. Bit-identical to V8's
 * Math.exp in Node 20 to 26 (test/math/portableMath.test.ts).
 */
export function exp(x: number): number {
  if (x !== x) return x + x; // NaN
  const negative = x < 0 ? 1 : 0;
  const ax = negative ? -x : x;

  if (ax >= BIG) {
    // |x| ≥ 709.78…: overflow, underflow, or infinite.
    if (ax === Infinity) return negative === 0 ? x : 0; // e^+∞ = +∞, e^−∞ = 0
    if (x > O_THRESHOLD) return HUGE * HUGE; // +∞
    if (x < U_THRESHOLD) return TWO_M1000 * TWO_M1000; // 0
  }

  let hi = 0;
  let lo = 0;
  let k = 0;
  if (ax >= HALF_LN2_UP) {
    // |x| > ln2/2: reduce.
    if (ax < THREE_HALF_LN2) {
      // and |x| < 3 ln2/2: k = ±1. V8 returns the double nearest e for x = 1, where
      // the formula below is one ulp high (2.7182818284590455); so do we, to agree with it.
      if (x === 1) return Math.E;
      hi = negative ? x + LN2_HI : x - LN2_HI;
      lo = negative ? -LN2_LO : LN2_LO;
      k = 1 - negative - negative;
    } else {
      k = Math.trunc(INV_LN2 * x + (negative ? -0.5 : 0.5));
      hi = x - k * LN2_HI; // exact: LN2_HI has 32 significant bits
      lo = k * LN2_LO;
    }
    x = hi - lo;
  } else if (ax < TINY) {
    // |x| < 2^-28: e^x = 1 + x to within half an ulp.
    if (HUGE + x > 1) return 1 + x;
  }

  const t = x * x;
  const c = x - t * (P1 + t * (P2 + t * (P3 + t * (P4 + t * P5))));
  if (k === 0) return 1 - ((x * c) / (c - 2) - x);
  const y = 1 - (lo - (x * c) / (2 - c) - hi);
  if (k >= -1021) return k === 1024 ? y * 2 * TWO_1023 : y * POW2[k + POW2_OFFSET];
  return y * POW2[k + 1000 + POW2_OFFSET] * TWO_M1000;
}
