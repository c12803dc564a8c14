/**
 * The portable exp and log (src/math) against Node's Math.exp and Math.log.
 * Node 20 to 26 compute both with V8's port of fdlibm (ieee754::exp and ::log);
 * ours are ports of the same algorithms, so on every argument they must give
 * the same double, bit for bit: then moving the checks onto them changes no
 * published number, while a browser or a later engine whose own Math.exp
 * differs in the last bit (test/browser/arithmeticParity.test.ts) no longer
 * changes ours.
 */
import { describe, expect, test } from "vitest";
import { exp, log } from "../../src/math/index.ts";

/** xorshift32 (Marsaglia, J. Stat. Softw. 8(14), 2003): a fixed stream of 32-bit words. */
function words(seed: number): () => number {
  let s = seed | 0;
  return () => {
    s ^= s << 13;
    s ^= s >>> 17;
    s ^= s << 5;
    return s >>> 0;
  };
}

/** Arguments: every bit pattern class (random words), the ranges the checks use, and edge values. */
function argumentsFor(seed: number, n: number, scale: number): Float64Array {
  const next = words(seed);
  const out = new Float64Array(3 * n);
  const halves = new Uint32Array(out.buffer);
  for (let i = 0; i < n; i++) {
    halves[2 * i] = next();
    halves[2 * i + 1] = next();
  }
  // Half over ±scale/2, half over ±1.1 (the k = ±1 reduction branch and below).
  for (let i = n; i < 3 * n; i++) out[i] = (next() / 2 ** 32 - 0.5) * (i < 2 * n ? scale : 2.2);
  return out;
}

const EDGES = [0, -0, 1, -1, 0.5, 2, Math.LN2, 5e-324, 2.2250738585072014e-308, 1.7976931348623157e308, Infinity, -Infinity, 709.782712893384, 709.7827128933841, -745.1332191019411, -745.1332191019412, 2 ** -28, -(2 ** -28), 1 - 2 ** -53, 1 + 2 ** -52, 0.34657359027997264, 1.0397207708399179];

function firstDifference(f: (x: number) => number, g: (x: number) => number, xs: ArrayLike<number>): string {
  for (let i = 0; i < xs.length; i++) {
    const a = f(xs[i]);
    const b = g(xs[i]);
    if (!Object.is(a, b) && !(Number.isNaN(a) && Number.isNaN(b))) return `x = ${xs[i]}: ours ${a}, Math ${b}`;
  }
  return "none";
}

describe("portable exp and log", () => {
  test("exp equals V8's fdlibm Math.exp bit for bit on 6·10^5 arguments and the edge values", () => {
    expect(firstDifference(exp, Math.exp, EDGES)).toBe("none");
    expect(firstDifference(exp, Math.exp, argumentsFor(0x2545f491, 200_000, 1500))).toBe("none");
  });

  test("log equals V8's fdlibm Math.log bit for bit on 6·10^5 arguments and the edge values", () => {
    expect(firstDifference(log, Math.log, EDGES)).toBe("none");
    expect(firstDifference(log, Math.log, argumentsFor(0x6c078965, 200_000, 1e6).map(Math.abs))).toBe("none");
  });

  test("known values: e, ln 2, and the limits", () => {
    // IEEE 754 binary64 nearest e is 0x4005BF0A8B145769 = 2.718281828459045 and nearest ln 2 is
    // 0x3FE62E42FEFA39EF = 0.6931471805599453 (common practice; both printed by any correctly rounded table).
    expect(exp(1)).toBe(2.718281828459045);
    expect(log(2)).toBe(0.6931471805599453);
    expect(exp(0)).toBe(1);
    expect(log(1)).toBe(0);
    expect(exp(-Infinity)).toBe(0);
    expect(exp(710)).toBe(Infinity);
    expect(log(0)).toBe(-Infinity);
    expect(Number.isNaN(log(-1))).toBe(true);
    // Subnormal arguments and results: log(2^-1074) = -1074 ln 2 = -744.4400719213812 (correctly rounded value).
    expect(log(5e-324)).toBe(-744.4400719213812);
    expect(exp(-744.4400719213812)).toBe(5e-324);
  });
});
