import { exp, log } from "../math/index.ts";
/**
 * Standard normal distribution.
 * cdf: via the complementary error function with W. J. Cody's rational
 * Chebyshev approximations, Math. Comp. 23, 631 (1969), accurate to about
 * 1e-16 relative on each of its three intervals (the far tail included, where
 * 1 − Phi computed by subtraction would lose every digit).
 * quantile: Wichura, "Algorithm AS 241", Appl. Stat. 37, 477 (1988), PPND16,
 * relative accuracy about 1e-16.
 */

// Cody (1969) coefficients for erf/erfc on three intervals.
const A = [3.1611237438705656, 113.864154151050156, 377.485237685302021, 3209.37758913846947, 0.185777706184603153];
const B = [23.6012909523441209, 244.024637934444173, 1282.61652607737228, 2844.23683343917062];
const C = [
  0.564188496988670089, 8.88314979438837594, 66.1191906371416295, 298.635138197400131, 881.95222124176909, 1712.04761263407058,
  2051.07837782607147, 1230.33935479799725, 2.15311535474403846e-8,
];
const D = [15.7449261107098347, 117.693950891312499, 537.181101862009858, 1621.38957456669019, 3290.79923573345963, 4362.61909014324716, 3439.36767414372164, 1230.33935480374942];
const P = [0.305326634961232344, 0.360344899949804439, 0.125781726111229246, 0.0160837851487422766, 6.58749161529837803e-4, 0.0163153871373020978];
const Q = [2.56852019228982242, 1.87295284992346725, 0.527905102951428412, 0.0605183413124413191, 0.00233520497626869185];
const SQRPI = 0.56418958354775628695; // 1/sqrt(pi)

/** Complementary error function erfc(x), Cody (1969). */
export function erfc(x: number): number {
  const y = Math.abs(x);
  let result: number;
  if (y <= 0.46875) {
    const ysq = y > 1.11e-16 ? y * y : 0;
    let num = A[4] * ysq;
    let den = ysq;
    for (let i = 0; i < 3; i++) {
      num = (num + A[i]) * ysq;
      den = (den + B[i]) * ysq;
    }
    const erfv = (x * (num + A[3])) / (den + B[3]);
    return 1 - erfv;
  } else if (y <= 4) {
    let num = C[8] * y;
    let den = y;
    for (let i = 0; i < 7; i++) {
      num = (num + C[i]) * y;
      den = (den + D[i]) * y;
    }
    result = (num + C[7]) / (den + D[7]);
    const ysq = Math.trunc(y * 16) / 16;
    const del = (y - ysq) * (y + ysq);
    result = exp(-ysq * ysq) * exp(-del) * result;
  } else {
    if (y >= 26.6) result = 0;
    else {
      const ysq = 1 / (y * y);
      let num = P[5] * ysq;
      let den = ysq;
      for (let i = 0; i < 4; i++) {
        num = (num + P[i]) * ysq;
        den = (den + Q[i]) * ysq;
      }
      result = (ysq * (num + P[4])) / (den + Q[4]);
      result = (SQRPI - result) / y;
      const ysq2 = Math.trunc(y * 16) / 16;
      const del = (y - ysq2) * (y + ysq2);
      result = exp(-ysq2 * ysq2) * exp(-del) * result;
    }
  }
  return x < 0 ? 2 - result : result;
}

/** Phi(z) = P(Z <= z). */
export function normalCdf(z: number): number {
  return 0.5 * erfc(-z / Math.SQRT2);
}

/** 1 − Phi(z), accurate in the far upper tail. */
export function normalSf(z: number): number {
  return 0.5 * erfc(z / Math.SQRT2);
}

/** Two-sided p-value of a z statistic. */
export function normalTwoSidedP(z: number): number {
  return Math.min(1, 2 * normalSf(Math.abs(z)));
}

/** Phi^{-1}(p), Wichura AS 241 (PPND16). */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) {
    if (p === 0) return -Infinity;
    if (p === 1) return Infinity;
    throw new RangeError(`normalQuantile needs p in [0, 1], got ${p}`);
  }
  const q = p - 0.5;
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q;
    return (
      (q *
        (((((((r * 2509.0809287301226727 + 33430.575583588128105) * r + 67265.770927008700853) * r + 45921.953931549871457) * r +
          13731.693765509461125) *
          r +
          1971.5909503065514427) *
          r +
          133.14166789178437745) *
          r +
          3.387132872796366608)) /
      (((((((r * 5226.495278852545925 + 28729.085735721942674) * r + 39307.89580009271061) * r + 21213.794301586595867) * r +
        5394.1960214247511077) *
        r +
        687.1870074920579083) *
        r +
        42.313330701600911252) *
        r +
        1)
    );
  }
  let r = q < 0 ? p : 1 - p;
  r = Math.sqrt(-log(r));
  let value: number;
  if (r <= 5) {
    r -= 1.6;
    value =
      (((((((r * 7.7454501427834140764e-4 + 0.0227238449892691845833) * r + 0.24178072517745061177) * r + 1.27045825245236838258) * r +
        3.64784832476320460504) *
        r +
        5.7694972214606914055) *
        r +
        4.6303378461565452959) *
        r +
        1.42343711074968357734) /
      (((((((r * 1.05075007164441684324e-9 + 5.475938084995344946e-4) * r + 0.0151986665636164571966) * r + 0.14810397642748007459) * r +
        0.68976733498510000455) *
        r +
        1.6763848301838038494) *
        r +
        2.05319162663775882187) *
        r +
        1);
  } else {
    r -= 5;
    value =
      (((((((r * 2.01033439929228813265e-7 + 2.71155556874348757815e-5) * r + 0.0012426609473880784386) * r + 0.026532189526576123093) * r +
        0.29656057182850489123) *
        r +
        1.7848265399172913358) *
        r +
        5.4637849111641143699) *
        r +
        6.6579046435011037772) /
      (((((((r * 2.04426310338993978564e-15 + 1.4215117583164458887e-7) * r + 1.8463183175100546818e-5) * r + 7.868691311456132591e-4) * r +
        0.0148753612908506148525) *
        r +
        0.13692988092273580531) *
        r +
        0.59983220655588793769) *
        r +
        1);
  }
  return q < 0 ? -value : value;
}
