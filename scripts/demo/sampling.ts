// Small exact samplers for the demo generator (invented scenario data only).
import type { Rng } from "../../src/stats/rng.ts";

/** Poisson deviate by Knuth's multiplication method (fine for the small means used here). */
export function poisson(rng: Rng, mean: number): number {
  if (mean > 60) throw new Error("poisson(): demo sampler meant for small means");
  const limit = Math.exp(-mean);
  let k = 0;
  let p = rng.uniform();
  while (p > limit) {
    k++;
    p *= rng.uniform();
  }
  return k;
}

/**
 * Skellam deviate N1 − N2 with N1 ~ Poisson(l e^{b/2}), N2 ~ Poisson(l e^{−b/2}).
 * It is the symmetric Skellam law (l, l) tilted by e^{b n/2}, so it obeys
 * P(n)/P(−n) = e^{b n} exactly (Skellam, J. R. Stat. Soc. 109, 296 (1946)).
 */
export function tiltedSkellam(rng: Rng, l: number, b: number): number {
  return poisson(rng, l * Math.exp(b / 2)) - poisson(rng, l * Math.exp(-b / 2));
}

/** Format a number for CSV with enough digits to round-trip the sampled value closely. */
export function cell(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toPrecision(9);
}

export function csv(header: string[], rows: number[][]): string {
  return `${header.join(",")}\n${rows.map((r) => r.map(cell).join(",")).join("\n")}\n`;
}
