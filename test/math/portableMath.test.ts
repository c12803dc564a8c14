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
import { cbrt, exp, integerPower, log, sinPi } from "../../src/math/index.ts";

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

describe("portable cube root, sin(πx) and whole powers", () => {
  /** Distance in units in the last place (of b). */
  const ulps = (a: number, b: number) => Math.abs(a - b) / (Math.abs(b) * Number.EPSILON || Number.MIN_VALUE);

  test("cbrt: exact cubes, and within 2 ulp of Math.cbrt elsewhere", () => {
    // Exact: 27 = 3³, 0.125 = 0.5³, −1e-300 = (−1e-100)³ to rounding (common practice).
    expect(cbrt(27)).toBe(3);
    expect(cbrt(-8)).toBe(-2);
    expect(cbrt(0.125)).toBe(0.5);
    expect(cbrt(-0)).toBe(-0);
    expect(cbrt(Infinity)).toBe(Infinity);
    const xs = argumentsFor(0x3c6ef372, 20_000, 1e6);
    let worst = 0;
    for (const x of xs) if (Number.isFinite(x) && x !== 0) worst = Math.max(worst, ulps(cbrt(x), Math.cbrt(x)));
    // Tolerance: Newton's step from exp(log) leaves at most about 1 ulp; Math.cbrt is itself within 1 ulp.
    expect(worst).toBeLessThanOrEqual(2);
  });

  test("sinPi: exact points and within 2 ulp of Math.sin(πx) away from its zeros", () => {
    // sin(π/2) = 1, sin(π/6) = 1/2, sin(π) = 0 exactly (the reduction is exact; Abramowitz & Stegun 4.3.46).
    expect(sinPi(0.5)).toBe(1);
    expect(sinPi(1)).toBe(0);
    expect(sinPi(-0.5)).toBe(-1);
    expect(Math.abs(sinPi(1 / 6) - 0.5)).toBeLessThanOrEqual(Number.EPSILON / 2);
    expect(Math.abs(sinPi(2.25) - Math.SQRT1_2)).toBeLessThanOrEqual(Number.EPSILON);
    // Against Math.sin(π·x) only on (0, 1/2], where rounding π·x (half an ulp) moves sin by at most
    // half an ulp (the condition number πx·cot(πx) is at most 1 there); elsewhere it would measure π's rounding.
    let worst = 0;
    for (let i = 1; i <= 5000; i++) worst = Math.max(worst, ulps(sinPi(i / 10_000), Math.sin((Math.PI * i) / 10_000)));
    expect(worst).toBeLessThanOrEqual(3);
    // Everywhere: sin²(πx) + sin²(π(x + 1/2)) = 1 (Pythagoras) and the odd symmetry exactly. Tolerance 8ε:
    // up to 1 ulp in each value doubles in its square, plus the roundings of the squares and the sum.
    for (let i = -4000; i < 4000; i++) {
      const x = i / 997;
      expect(Math.abs(sinPi(x) ** 2 + sinPi(x + 0.5) ** 2 - 1)).toBeLessThanOrEqual(8 * Number.EPSILON);
      expect(sinPi(-x)).toBe(x === 0 || Number.isInteger(x) ? 0 : -sinPi(x));
    }
  });

  test("integerPower: exact powers of 2, 3 and 10, and reciprocals", () => {
    expect(integerPower(2, -24)).toBe(5.9604644775390625e-8); // 2^-24, exact
    expect(integerPower(3, 33)).toBe(5559060566555523); // 3^33 < 2^53, exact
    expect(integerPower(10, 22)).toBe(1e22); // the largest exact power of ten in binary64
    expect(integerPower(10, -3)).toBe(1 / 1000);
    expect(integerPower(1.5, 0)).toBe(1);
    expect(() => integerPower(2, 0.5)).toThrow(RangeError);
  });
});
