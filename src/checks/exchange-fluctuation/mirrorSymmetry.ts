/**
 * The exchange relation at a point where Σ vanishes in every realisation (identical reservoirs and no
 * work: the zero-affinity point of a sweep). There P(W, Q, ΔN)/P(−W, −Q, −ΔN) = e^Σ = 1, so the
 * relation is the mirror symmetry P(z) = P(−z) (Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11,
 * 043014 (2009); Jarzynski & Wójcik, Phys. Rev. Lett. 92, 230602 (2004)): a prediction the data can
 * confirm or refute, not a triviality. Each current is tested by the exact sign test (its non-zero values
 * are positive with probability 1/2) and by the mean (zero by symmetry), all in one Holm family; a pass
 * needs the sign asymmetry of every current within ± margin by exact two one-sided binomial tests.
 */
import type { SamplesDataset } from "../../ingest/types.ts";
import { holm } from "../../stats/holm.ts";
import { normalCdf, normalQuantile, normalSf, normalTwoSidedP } from "../../stats/normal.ts";
import { signTest, type SignTest } from "../../stats/signTest.ts";
import { resolveSentence } from "../../stats/sampleSize.ts";
import { histogram, linearEdges } from "../../stats/histogram.ts";
import { currentMoments, fmt, notApplicableResult } from "../helpers.ts";
import { resamplingUnits, unitMean } from "../resamplingUnits.ts";
import type { CheckResult, Status, TableSpec } from "../types.ts";
import type { PlotSpec, Series } from "../plotSpec.ts";

export const SYMMETRY_REFERENCES = [
  "D. Andrieux, P. Gaspard, T. Monnai and S. Tasaki, New J. Phys. 11, 043014 (2009)",
  "C. Jarzynski and D. K. Wójcik, Phys. Rev. Lett. 92, 230602 (2004)",
  "W. J. Dixon and A. M. Mood, J. Am. Stat. Assoc. 41, 557 (1946)",
  "S. Holm, Scand. J. Stat. 6, 65 (1979)",
  "D. J. Schuirmann, J. Pharmacokinet. Biopharm. 15, 657 (1987)",
];

export const SYMMETRY_EQUATIONS = [
  String.raw`\Sigma \equiv 0: \qquad P(W, Q, \Delta N) = P(-W, -Q, -\Delta N)`,
  String.raw`k^{+} \sim \mathrm{Binomial}\!\left(k^{+} + k^{-}, \tfrac12\right), \qquad A = \frac{k^{+} - k^{-}}{k^{+} + k^{-}}, \quad |A| < m`,
];

interface CurrentChannel {
  key: "W" | "Q" | "dN";
  symbol: string;
  x: Float64Array;
  /** Joules per unit shown (the dataset's energy unit for energies, 1 for counts). */
  unit: { name: string; factor: number };
}

function currentsOf(d: SamplesDataset): CurrentChannel[] {
  const energy = { name: d.energyUnit.name, factor: d.energyUnit.joules };
  const out: CurrentChannel[] = [];
  if (d.config.work === "measured") out.push({ key: "W", symbol: "W", x: d.W, unit: energy });
  out.push({ key: "Q", symbol: "Q", x: d.Q, unit: energy });
  if (d.hasParticleColumn) out.push({ key: "dN", symbol: "ΔN", x: d.dN, unit: { name: "", factor: 1 } });
  return out.filter((c) => c.x.some((v) => v !== 0));
}

interface ChannelResult {
  channel: CurrentChannel;
  sign: SignTest;
  mean: number;
  meanSe: number;
  meanZ: number;
  meanP: number;
}

function testChannel(d: SamplesDataset, c: CurrentChannel, margin: number, equivalenceAlpha: number): ChannelResult {
  let positive = 0;
  let negative = 0;
  for (let i = 0; i < c.x.length; i++) {
    const w = d.weight ? d.weight[i] : 1;
    if (c.x[i] > 0) positive += w;
    else if (c.x[i] < 0) negative += w;
  }
  const plain = currentMoments(d, c.x, c.key);
  // Windows of one trajectory: the mean's standard error from blocks of windows.
  const m = d.windows ? { ...plain, standardError: unitMean(d, c.x, null).standardError } : plain;
  const meanZ = m.standardError > 0 ? m.mean / m.standardError : 0;
  // Windows of one trajectory: their signs are not independent, so no exact binomial law.
  const sign = d.windows ? blockSignTest(d, c.x, positive, negative, margin, equivalenceAlpha) : signTest(positive, negative, margin, equivalenceAlpha);
  return { channel: c, sign, mean: m.mean, meanSe: m.standardError, meanZ, meanP: normalTwoSidedP(meanZ) };
}

/**
 * The sign test for windows of one trajectory, whose signs are not independent: the asymmetry
 * A = Σ sign(x)/Σ |sign(x)| with its standard error from the sums over blocks of windows (linearised ratio,
 * resamplingUnits.ts; Carlstein 1986), a normal test of A = 0 with the spread under the null (block sums of
 * the signs), and two one-sided normal tests of |A| < margin (Schuirmann 1987) in place of the exact
 * binomial tails, which need independent signs.
 */
function blockSignTest(d: SamplesDataset, x: Float64Array, positive: number, negative: number, margin: number, alpha: number): SignTest {
  const s = Float64Array.from(x, (v) => Math.sign(v));
  const units = resamplingUnits(d, s, null, Float64Array.from(s, Math.abs), null);
  const m = positive + negative;
  if (!(m > 0)) return { positive, negative, asymmetry: Number.NaN, p: 1, equivalenceP: 1, margin, equivalent: false };
  const asymmetry = (positive - negative) / m;
  let null2 = 0;
  let spread2 = 0;
  for (let b = 0; b < units.u.length; b++) {
    null2 += units.u[b] * units.u[b];
    const e = units.u[b] - asymmetry * units.v![b];
    spread2 += e * e;
  }
  const se0 = Math.sqrt(null2) / m;
  const se = Math.sqrt(spread2) / m;
  const p = se0 > 0 ? normalTwoSidedP(asymmetry / se0) : asymmetry === 0 ? 1 : 0;
  const equivalenceP = se > 0 ? Math.max(normalSf((asymmetry + margin) / se), normalCdf((asymmetry - margin) / se)) : Math.abs(asymmetry) < margin ? 0 : 1;
  return { positive, negative, asymmetry, p, equivalenceP, margin, equivalent: equivalenceP < alpha };
}

function mirrorPlot(d: SamplesDataset, c: CurrentChannel): PlotSpec {
  let R = 0;
  for (let i = 0; i < c.x.length; i++) R = Math.max(R, Math.abs(c.x[i]));
  const edges = linearEdges(-R, R, 40); // even: x = 0 is an edge, every bin has a mirror bin
  const h = histogram(c.x, edges, d.weight);
  const centres = edges.slice(0, -1).map((e, k) => (e + edges[k + 1]) / 2 / c.unit.factor);
  const mirror = h.counts.slice().reverse();
  const series: Series[] = [
    { type: "points", name: `P(${c.symbol})`, x: centres, y: h.counts.map((n) => n / h.total) },
    { type: "line", name: `P(−${c.symbol}), mirror`, x: centres, y: mirror.map((n) => n / h.total), style: "dashed" },
  ];
  return {
    id: `mirror-${c.key}`,
    title: `${c.symbol} and its mirror image`,
    alt: `Fraction of the ${d.realisations} realisations in each of 40 bins of ${c.symbol} (points) and of −${c.symbol} (dashed line); at zero affinity the relation says the two coincide.`,
    x: { label: c.symbol, ...(c.unit.name ? { unit: c.unit.name } : {}) },
    y: { label: "Fraction of realisations" },
    series,
  };
}

/** The verdict of exchange-fluctuation on a dataset whose Σ is zero in every realisation. */
export function mirrorSymmetryResult(
  d: SamplesDataset,
  settings: { alpha: number; confidence: number },
  margin: number,
  assumptions: string[],
): CheckResult {
  const { alpha, confidence } = settings;
  const base = { check: "exchange-fluctuation" as const, dataset: d.id, references: SYMMETRY_REFERENCES, equations: SYMMETRY_EQUATIONS };
  const contract = { slope: null, slope_ci: null, effective_affinity: { a_Q: null, a_N: null }, bins_used: 0 };
  const channels = currentsOf(d);
  const zeroAssumption = "Σ = 0 in every realisation (zero affinity, no work), so the detailed relation reads P(z) = P(−z).";
  if (channels.length === 0) {
    return notApplicableResult({
      ...base,
      reason: "Σ is zero and so is every exchanged current in every realisation: nothing was exchanged, so the relation P(z)/P(−z) = e^Σ has no event to compare with its mirror",
      values: { ...contract, zero_affinity: true },
      assumptions: [...assumptions, zeroAssumption],
    });
  }
  const equivalenceAlpha = 1 - confidence;
  const results = channels.map((c) => testChannel(d, c, margin, equivalenceAlpha));
  const tests = results.flatMap((r) => [
    { name: `sign of ${r.channel.symbol}`, p: r.sign.p, describe: `${r.channel.symbol} is positive in ${fmt(r.sign.positive)} and negative in ${fmt(r.sign.negative)} realisations (asymmetry ${fmt(r.sign.asymmetry, 3)}, ${d.windows ? "sign test over blocks of windows" : "exact sign test"} p = ${fmt(r.sign.p, 3)})` },
    { name: `mean of ${r.channel.symbol}`, p: r.meanP, describe: `the mean of ${r.channel.symbol} is ${fmt(r.mean / r.channel.unit.factor, 3)}${r.channel.unit.name ? ` ${r.channel.unit.name}` : ""}, ${fmt(r.meanZ, 3)} standard errors from zero` },
  ]);
  const family = holm(tests.map((t) => t.p), alpha);
  const rejected = tests.filter((_, k) => family.rejected[k]);
  const lacking = results.filter((r) => !r.sign.equivalent);
  const n = d.realisations;
  const signText = results.map((r) => `${r.channel.symbol} ${fmt(r.sign.asymmetry, 3)}`).join(", ");
  const marginWords = `± ${margin} (a fraction ${fmt((1 - margin) / 2, 3)}–${fmt((1 + margin) / 2, 3)} of the non-zero values positive)`;
  let status: Status;
  let summary: string;
  let reason: string | undefined;
  if (rejected.length > 0) {
    status = "fail";
    summary = `Σ is zero in every realisation, where the exchange relation demands the mirror symmetry P(z) = P(−z), and the data break it: ${rejected.map((t) => t.describe).join("; ")} (Holm-adjusted p ≤ ${alpha}).`;
  } else if (lacking.length === 0) {
    status = "pass";
    summary = `Σ is zero in every realisation, where the exchange relation reduces to the mirror symmetry P(z) = P(−z); the sign asymmetry (k⁺ − k⁻)/(k⁺ + k⁻) of each current (${signText}) lies within ${marginWords} at ${confidence * 100} % confidence (${d.windows ? "two one-sided tests with the spread from blocks of windows" : "exact two one-sided binomial tests"}), and no sign or mean departs significantly from symmetry (Holm, α = ${alpha}).`;
  } else {
    status = "inconclusive";
    summary = `Σ is zero in every realisation, where the exchange relation reduces to the mirror symmetry P(z) = P(−z); no significant asymmetry (sign asymmetries ${signText}), but the data cannot yet exclude one of ${margin} for ${lacking.map((r) => r.channel.symbol).join(" and ")}.`;
    const zq = normalQuantile(1 - equivalenceAlpha);
    reason = lacking
      .map((r) => {
        const m = r.sign.positive + r.sign.negative;
        const a = r.sign.asymmetry;
        const half = Number.isFinite(a) ? zq * Math.sqrt(Math.max(1 - a * a, 1e-12) / m) : Number.POSITIVE_INFINITY;
        const scaled = Number.isFinite(half) ? resolveSentence(n, half, a, margin) : "Record realisations in which this current is non-zero.";
        return `${r.channel.symbol}: ${fmt(m)} of ${fmt(n)} realisations carry a sign, asymmetry ${fmt(a, 3)} ± ${fmt(half, 2)}. ${scaled}`;
      })
      .join(" ");
  }
  const table: TableSpec = {
    id: "mirror-symmetry",
    title: "Mirror symmetry of each current at zero affinity",
    columns: [
      { key: "current", label: "Current" },
      { key: "positive", label: "Positive" },
      { key: "negative", label: "Negative" },
      { key: "asymmetry", label: "Sign asymmetry", unit: "1" },
      { key: "sign_p", label: "Sign test p" },
      { key: "equivalence_p", label: "Equivalence p" },
      { key: "mean_z", label: "Mean / standard error" },
      { key: "within_margin", label: "Within margin" },
    ],
    rows: results.map((r) => ({
      current: r.channel.symbol,
      positive: r.sign.positive,
      negative: r.sign.negative,
      asymmetry: r.sign.asymmetry,
      sign_p: r.sign.p,
      equivalence_p: r.sign.equivalenceP,
      mean_z: r.meanZ,
      within_margin: r.sign.equivalent,
    })),
  };
  return {
    ...base,
    status,
    summary,
    ...(reason ? { reason } : {}),
    values: {
      ...contract,
      zero_affinity: true,
      realisations: n,
      symmetry: results.map((r) => ({
        current: r.channel.key,
        positive: r.sign.positive,
        negative: r.sign.negative,
        asymmetry: r.sign.asymmetry,
        sign_test_p: r.sign.p,
        equivalence_p: r.sign.equivalenceP,
        equivalent: r.sign.equivalent,
        mean: r.mean,
        mean_standard_error: r.meanSe,
        mean_z: r.meanZ,
      })),
      tests: tests.map((t, k) => ({ test: t.name, p_value: t.p, p_holm: family.adjusted[k], rejected: family.rejected[k] })),
    },
    criteria: { alpha, margin, confidence },
    assumptions: [
      ...assumptions,
      zeroAssumption,
      `The margin ${margin} applies to the sign asymmetry (k⁺ − k⁻)/(k⁺ + k⁻) of each current, zeros left out; the sign and mean tests of all currents form one Holm family.`,
    ],
    tables: [table],
    plots: results.map((r) => mirrorPlot(d, r.channel)),
  };
}
