/**
 * Fermi–Dirac occupation 1/(1 + e^{beta (e − mu)}), written so that neither
 * branch overflows for large |beta (e − mu)|.
 */
export function fermiOccupation(energy: number, beta: number, mu: number): number {
  const x = beta * (energy - mu);
  if (x > 0) {
    const t = Math.exp(-x);
    return t / (1 + t);
  }
  return 1 / (1 + Math.exp(x));
}
