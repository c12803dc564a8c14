import { createHash } from "node:crypto";
import { log } from "../math/index.ts";

/**
 * A seeded pseudo-random generator. Every random step of an audit takes one of
 * these, seeded from the content it works on, so that a re-run reproduces the
 * numbers to the last digit.
 */
export interface Rng {
  /** Uniform on [0, 1) with 53 random bits. */
  uniform(): number;
  /** Standard normal deviate. */
  normal(): number;
  /** Uniform integer in [0, n). */
  int(n: number): number;
  /** Raw 32-bit output. */
  nextUint32(): number;
}

/**
 * xoshiro128** by Blackman & Vigna, "Scrambled linear pseudorandom number
 * generators", ACM Trans. Math. Softw. 47, 36 (2021). Four 32-bit words of
 * state, period 2^128 − 1; 32-bit arithmetic keeps it fast in JavaScript.
 */
export function xoshiro128ss(state: Uint32Array): Rng {
  if (state.length !== 4 || (state[0] | state[1] | state[2] | state[3]) === 0) {
    throw new Error("xoshiro128** needs four 32-bit words of state, not all zero");
  }
  const s = Uint32Array.from(state);
  const rotl = (x: number, k: number) => ((x << k) | (x >>> (32 - k))) >>> 0;
  const nextUint32 = (): number => {
    const result = Math.imul(rotl(Math.imul(s[1], 5) >>> 0, 7), 9) >>> 0;
    const t = (s[1] << 9) >>> 0;
    s[2] ^= s[0];
    s[3] ^= s[1];
    s[1] ^= s[2];
    s[0] ^= s[3];
    s[2] ^= t;
    s[3] = rotl(s[3], 11);
    return result;
  };
  const uniform = (): number => {
    const hi = nextUint32() >>> 5; // 27 bits
    const lo = nextUint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  };
  let spare: number | null = null;
  // Marsaglia & Bray polar method (SIAM Review 6, 260 (1964)): two normals per accepted pair.
  const normal = (): number => {
    if (spare !== null) {
      const v = spare;
      spare = null;
      return v;
    }
    for (;;) {
      const u = 2 * uniform() - 1;
      const v = 2 * uniform() - 1;
      const r2 = u * u + v * v;
      if (r2 > 0 && r2 < 1) {
        const f = Math.sqrt((-2 * log(r2)) / r2);
        spare = v * f;
        return u * f;
      }
    }
  };
  const int = (n: number): number => {
    if (!(n >= 1) || !Number.isInteger(n)) throw new Error(`rng.int needs a positive integer bound, got ${n}`);
    // Rejection keeps the draw exactly uniform for any n below 2^53.
    const limit = Math.floor(9007199254740992 / n) * n;
    for (;;) {
      const x = uniform() * 9007199254740992;
      if (x < limit) return x % n;
    }
  };
  return { uniform, normal, int, nextUint32 };
}

/** Seed a generator from any text (a data digest, a digest plus a stream name) via SHA-256. */
export function rngFromText(seedText: string): Rng {
  const digest = createHash("sha256").update(seedText).digest();
  const state = new Uint32Array(4);
  for (let i = 0; i < 4; i++) state[i] = digest.readUInt32LE(4 * i);
  if ((state[0] | state[1] | state[2] | state[3]) === 0) state[0] = 1;
  return xoshiro128ss(state);
}
