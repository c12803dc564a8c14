import type { SamplesDataset } from "../../ingest/types.ts";
import { blockHotelling, type BlockHotelling } from "../../stats/blockHotelling.ts";
import { exp, log } from "../../math/index.ts";
import { influenceSums } from "../countingCovariance.ts";
import { binOfEachRow, type LogRatio } from "./binnedLogRatio.ts";

/**
 * The binned test of ln P(Σ)/P(−Σ) = Σ for windows cut from one trajectory, where the windows are not
 * independent and Pearson's χ² (one binomial per bin pair) understates the spread.
 *
 * Integrating the relation over a bin pair gives one exact moment condition per bin, whatever the bin
 * width: E[1(Σ ∈ B⁺)] = E[1(Σ ∈ B⁻) e^{−Σ}], so the residual r_ik = 1(Σ_i ∈ B⁺_k) − 1(Σ_i ∈ B⁻_k) e^{−Σ_i}
 * has mean zero in every window (derived here from the relation; it is the identity the binned points'
 * x coordinate rests on, binnedLogRatio.ts). The residuals are summed over the same blocks of
 * consecutive windows as every interval on these data, with the effect of the estimated p on e^{−Σ}
 * (influenceSums), and Hotelling's T² of the block sums, referred to F(K, B − K), tests that all K
 * bins balance at once (blockHotelling.ts: batch means, Carlstein 1986, Künsch 1989, Hotelling 1931).
 * Neighbouring bins are pooled (residuals add) when there are too few blocks for K bins.
 *
 * The bins' error bars likewise come from the block sums of each window's influence on
 * y_k = ln n⁺_k − ln n⁻_k, 1(B⁺_k)/n⁺_k − 1(B⁻_k)/n⁻_k, whose sum of squares over independent
 * realisations is the Poisson 1/n⁺ + 1/n⁻ used for independent data.
 */
export interface BlockBinnedTest extends BlockHotelling {
  /** Bins of the log-ratio, and the groups of neighbouring bins tested (fewer when pooled). */
  bins: number;
  groups: number;
  /** Per bin of the log-ratio: the standard error of y from block sums. */
  yErr: number[];
}

/** At least this many blocks per tested group, so that the covariance of the block sums is well estimated. */
const BLOCKS_PER_GROUP = 5;

export function blockBinnedTest(d: SamplesDataset, ratio: LogRatio): BlockBinnedTest | null {
  if (!d.windows || ratio.bins.length === 0) return null;
  const K = ratio.bins.length;
  const B = d.windows.blocks;
  const groups = Math.max(1, Math.min(K, Math.floor((B - 1) / BLOCKS_PER_GROUP)));
  // Consecutive bins (ascending |Σ|) into `groups` groups of nearly equal size.
  const groupOf = (k: number) => Math.floor((k * groups) / K);
  const sigma = d.sigma;
  const n = sigma.length;
  const bin = binOfEachRow(sigma, d.weight, ratio);
  const residual = Array.from({ length: groups }, () => new Float64Array(n));
  const dResidual = Array.from({ length: groups }, () => new Float64Array(n));
  const influence = Array.from({ length: K }, () => new Float64Array(n));
  for (let i = 0; i < n; i++) {
    const k = bin[i];
    if (k < 0) continue;
    const b = ratio.bins[k];
    const g = groupOf(k);
    // Residuals in units of the bin's positive count, so that the groups are of comparable size.
    if (sigma[i] > 0) {
      residual[g][i] = 1 / b.nPositive;
      influence[k][i] = 1 / b.nPositive;
    } else {
      // e^{−Σ}/n⁺ computed as e^{−Σ − x}·e^{x − ln n⁺}, both factors of order one.
      const e = exp(-sigma[i] - b.x) * exp(b.x - log(b.nPositive));
      residual[g][i] = -e;
      dResidual[g][i] = e; // ∂(−e^{−Σ})/∂b = e^{−Σ}: Σ carries b with unit slope
      influence[k][i] = -1 / b.nNegative;
    }
  }
  const test = blockHotelling(influenceSums(d, residual, dResidual).sums);
  const perBin = influenceSums(d, influence, null).sums;
  const yErr = ratio.bins.map((_, k) => {
    let ss = 0;
    for (const s of perBin) ss += s[k] * s[k];
    return Math.sqrt(ss);
  });
  return { ...test, bins: K, groups, yErr };
}
