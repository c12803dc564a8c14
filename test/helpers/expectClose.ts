import { expect } from "vitest";

export interface Tolerance {
  /** absolute tolerance */
  atol?: number;
  /** relative tolerance */
  rtol?: number;
  /** where the expected value comes from, printed on failure */
  source: string;
}

/**
 * Assert |actual − expected| <= atol + rtol·|expected| and, on failure, print
 * actual, expected, difference, tolerance and the source of the expected value.
 */
export function expectClose(actual: number, expected: number, tol: Tolerance): void {
  const atol = tol.atol ?? 0;
  const rtol = tol.rtol ?? 0;
  const diff = Math.abs(actual - expected);
  const allowed = atol + rtol * Math.abs(expected);
  const ok = Number.isFinite(actual) && diff <= allowed;
  expect(
    ok,
    `actual ${actual}, expected ${expected}, difference ${diff.toExponential(3)}, tolerance ${allowed.toExponential(3)} (atol ${atol}, rtol ${rtol}); source: ${tol.source}`,
  ).toBe(true);
}
