import { exp, integerPower } from "../../math/index.ts";
import { traceOccupancy } from "./traceOccupancy.ts";
/**
 * Dwell times between detected jumps and the events a detector of finite
 * bandwidth misses: a stay shorter than about 1/bandwidth is not resolved, so
 * the two jumps that bound it vanish together. For a Markov conductor the
 * dwell times in a state are exponential with mean t̄, and the fraction of
 * stays shorter than t_min is 1 − e^{−t_min/t̄} (Naaman & Aumentado, Phys. Rev.
 * Lett. 96, 100201 (2006), finite-bandwidth corrections to counting; from
 * memory). Missed stays bias the counts; the report says how many.
 */
export interface DetectionStatistics {
  /** Per state label: number of complete stays, their mean (s), and those shorter than 1/bandwidth. */
  states: { label: number; stays: number; meanDwell: number; short: number; missedFraction: number | null }[];
  bandwidth: number | null;
  /** A sentence for the report. */
  sentence: string;
}

export function detectionStatistics(times: Float64Array, states: Int32Array, bandwidth: number | null, origin: string): DetectionStatistics {
  const tMin = bandwidth ? 1 / bandwidth : null;
  const list = traceOccupancy(times, states)
    .states.filter((s) => s.dwells.length > 0)
    .map(({ label, dwells }) => {
      let sum = 0;
      let short = 0;
      for (const dwell of dwells) {
        sum += dwell;
        if (tMin !== null && dwell < tMin) short++;
      }
      const meanDwell = sum / dwells.length;
      return { label, stays: dwells.length, meanDwell, short, missedFraction: tMin !== null ? 1 - exp(-tMin / meanDwell) : null };
    });
  const parts = list.map((s) => `state ${s.label}: ${s.stays} stays of mean ${secondsText(s.meanDwell)}${s.missedFraction !== null ? `, ${s.short} shorter than 1/bandwidth, about ${Number((100 * s.missedFraction).toPrecision(2))} % of stays expected below it and missed` : ""}`);
  const sentence = `${origin}: ${parts.join("; ")}.${tMin === null ? " No detector bandwidth is declared, so missed short stays are not estimated." : ` Stays shorter than 1/bandwidth = ${secondsText(tMin)} are not resolved by the detector; missed stays remove pairs of jumps and bias the counts.`}`;
  return { states: list, bandwidth, sentence };
}

const TIME_PREFIXES: [number, string][] = [[0, "s"], [-3, "ms"], [-6, "µs"], [-9, "ns"], [-12, "ps"], [-15, "fs"]];

/** A duration in seconds with three significant digits and the SI prefix that keeps it at 1 or more (SI Brochure, 9th ed., Table 7). */
export function secondsText(seconds: number): string {
  if (!(seconds > 0) || !Number.isFinite(seconds)) return `${seconds} s`;
  const [power, unit] = TIME_PREFIXES.find(([p]) => seconds >= integerPower(10, p)) ?? TIME_PREFIXES[TIME_PREFIXES.length - 1];
  return `${Number((seconds / integerPower(10, power)).toPrecision(3))} ${unit}`;
}
