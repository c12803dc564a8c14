import type { Rng } from "../stats/rng.ts";
import type { DotRates } from "./dotRates.ts";

/**
 * Trajectories of the sequential-tunnelling dot by Gillespie's direct method
 * (Gillespie, J. Comput. Phys. 22, 403 (1976)): exponential waiting times
 * with the total exit rate, then a channel chosen in proportion to its rate.
 * Returns the net number of electrons that entered B during [0, τ] for each
 * trajectory, and the dot's occupation at the end.
 */
export function gillespieDotTransfers(
  rates: DotRates,
  initialOccupation: number,
  tau: number,
  count: number,
  rng: Rng,
): { transferred: Int32Array; finalOccupation: Uint8Array } {
  const transferred = new Int32Array(count);
  const finalOccupation = new Uint8Array(count);
  const exitEmpty = rates.inA + rates.inB;
  const exitFull = rates.outA + rates.outB;
  for (let r = 0; r < count; r++) {
    let full = rng.uniform() < initialOccupation;
    let t = 0;
    let n = 0;
    for (;;) {
      const exit = full ? exitFull : exitEmpty;
      if (exit <= 0) break;
      t += -Math.log(1 - rng.uniform()) / exit;
      if (t > tau) break;
      const u = rng.uniform() * exit;
      if (full) {
        if (u >= rates.outA) n++; // the electron leaves to B
      } else if (u >= rates.inA) n--; // an electron arrives from B
      full = !full;
    }
    transferred[r] = n;
    finalOccupation[r] = full ? 1 : 0;
  }
  return { transferred, finalOccupation };
}
