/**
 * base^n for a whole n by binary exponentiation (Knuth, TAOCP vol. 2, §4.6.3):
 * a fixed sequence of IEEE 754 multiplications, so the same bits in every
 * engine, where Math.pow and ** differ between V8 releases in the last bit
 * (test/browser/arithmeticParity.test.ts). Exact whenever every intermediate
 * product is representable: powers of two, 3^n up to 3^33, 10^n up to 10^22.
 * A negative n gives 1/base^|n|, one rounding more.
 */
export function integerPower(base: number, n: number): number {
  if (!Number.isInteger(n)) throw new RangeError(`integerPower needs a whole exponent, not ${n}`);
  let k = Math.abs(n);
  let result = 1;
  let square = base;
  while (k > 0) {
    if (k & 1) result *= square;
    k = Math.floor(k / 2);
    if (k > 0) square *= square;
  }
  return n < 0 ? 1 / result : result;
}
