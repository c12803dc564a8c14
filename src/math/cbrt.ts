import { exp } from "./exp.ts";
import { log } from "./log.ts";

/**
 * Real cube root with the same bits in every engine: e^(ln|x|/3) from the
 * portable exp and log, refined by one Newton step for y³ = x (quadratic
 * convergence: from a start within a few ulp the step leaves about 1 ulp).
 * Math.cbrt differs between V8 releases (test/browser/arithmeticParity.test.ts).
 */
export function cbrt(x: number): number {
  if (x === 0 || !Number.isFinite(x)) return x;
  const a = Math.abs(x);
  let y = exp(log(a) / 3);
  y -= (y * y * y - a) / (3 * y * y);
  return x < 0 ? -y : y;
}
