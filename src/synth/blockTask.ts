import type { Rng } from "../stats/rng.ts";
import { rngFromText } from "../stats/rng.ts";
import type { FermionModes } from "./fermionModel.ts";
import { FermionSampler } from "./fermionSampler.ts";

/**
 * A sampling job cut into blocks of realisations. Block b always draws from
 * the generator seeded with `${seed}|block ${b}`, so the output is the same
 * whether the blocks run in this thread or in any number of workers.
 * A task is plain data (typed arrays and numbers) so it can be posted to a
 * worker thread.
 */
export interface FermionTask {
  kind: "fermions";
  modes: FermionModes;
  ure: Float64Array;
  uim: Float64Array;
}

export type BlockTask = FermionTask;

/** Columns a block of each task kind returns. */
export const TASK_COLUMNS: Record<BlockTask["kind"], string[]> = {
  fermions: ["dE_A", "dE_B", "dN"],
};

export type BlockRunner = (rng: Rng, count: number) => Float64Array[];

/** Prepare a task once (allocating workspaces); the runner then draws blocks. */
export function blockRunner(task: BlockTask): BlockRunner {
  switch (task.kind) {
    case "fermions": {
      const sampler = new FermionSampler(task.modes, task.ure, task.uim);
      return (rng, count) => {
        const out = { dE_A: new Float64Array(count), dE_B: new Float64Array(count), dN: new Float64Array(count) };
        sampler.sampleInto(rng, count, out);
        return [out.dE_A, out.dE_B, out.dN];
      };
    }
  }
}

export function blockRng(seed: string, block: number): Rng {
  return rngFromText(`${seed}|block ${block}`);
}

/** The plain-data task for sampling a fermion system with evolution Ũ. */
export function fermionTask(modes: FermionModes, u: { re: Float64Array; im: Float64Array }): FermionTask {
  return {
    kind: "fermions",
    modes: { n: modes.n, nA: modes.nA, energy: modes.energy, region: modes.region, occupation: modes.occupation },
    ure: u.re,
    uim: u.im,
  };
}
