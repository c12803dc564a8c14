/**
 * sin(πx) with the same bits in every engine, for the reflection formula of
 * the gamma function. x is reduced exactly, then sin or cos of π r with r ≤ 1/4 comes
 * from its Taylor series (Abramowitz & Stegun 4.3.65–66) summed to 1e-20
 * relative, well past double precision for |πr| ≤ π/4. Math.sin differs
 * between V8 releases (test/browser/arithmeticParity.test.ts).
 */
export function sinPi(x: number): number {
  if (!Number.isFinite(x)) return NaN;
  if (x < 0) {
    // Odd (and the reduction below is exact only for x ≥ 0); +0 at the integers.
    const s = sinPi(-x);
    return s === 0 ? 0 : -s;
  }
  // x − 2⌊x/2⌋ and every fold below subtract numbers within a factor 2 of each
  // other, so they are exact (Sterbenz's lemma).
  let r = x - 2 * Math.floor(x / 2); // in [0, 2)
  let sign = 1;
  if (r >= 1) {
    r -= 1;
    sign = -1;
  }
  if (r > 0.5) r = 1 - r; // sin(π(1 − r)) = sin(πr)
  const s = r <= 0.25 ? sinSeries(Math.PI * r) : cosSeries(Math.PI * (0.5 - r));
  return s === 0 ? 0 : sign * s; // sin(πn) = +0 at every integer
}

function sinSeries(t: number): number {
  const t2 = t * t;
  let term = t;
  let sum = t;
  for (let k = 1; k <= 12; k++) {
    term *= -t2 / ((2 * k) * (2 * k + 1));
    sum += term;
  }
  return sum;
}

function cosSeries(t: number): number {
  const t2 = t * t;
  let term = 1;
  let sum = 1;
  for (let k = 1; k <= 12; k++) {
    term *= -t2 / ((2 * k - 1) * (2 * k));
    sum += term;
  }
  return sum;
}
