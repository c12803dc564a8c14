/**
 * Realisations needed for an interval of half-width `halfWidth` (at n
 * realisations) around an estimate `offset` from the ideal value to fit inside
 * ± margin: the half-width shrinks as 1/√n (central limit theorem), so
 * n' = n (halfWidth/(margin − |offset|))². Null when the estimate itself lies
 * at or beyond the margin, where more data cannot give a pass.
 */
export function realisationsToResolve(n: number, halfWidth: number, offset: number, margin: number): number | null {
  const room = margin - Math.abs(offset);
  if (!(room > 0) || !Number.isFinite(halfWidth)) return null;
  return Math.ceil(n * (halfWidth / room) ** 2);
}

/** The sentence an inconclusive verdict gives for it. */
export function resolveSentence(n: number, halfWidth: number, offset: number, margin: number): string {
  const needed = realisationsToResolve(n, halfWidth, offset, margin);
  return needed === null
    ? `The estimate lies at or beyond the margin of ${margin}; more realisations would decide between a violation and a pass.`
    : `About ${needed.toLocaleString("en")} realisations at this spread would resolve the margin of ${margin}.`;
}
