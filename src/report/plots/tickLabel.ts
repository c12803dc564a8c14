import { numberText as formatNumber, powerOfTenText } from "../format/numberText.ts";
import { groupDigits, MINUS } from "../format/typography.ts";
import { toSuperscript } from "../format/scripts.ts";

/** A number as a person reads it (the report's formatting module; kept here for the plot modules that import it). */
export function numberText(v: number, digits = 6): string {
  return formatNumber(v, digits);
}

/** The labels of one axis, all in one style, and the power of ten they share (0 when none). */
export interface AxisLabels {
  labels: string[];
  /** Shown once in the axis title (`× 10⁻³`) instead of on every tick. */
  exponent: number;
}

/**
 * Tick labels of a linear axis in one style: plain decimals with the same
 * number of decimals on every tick (from the tick step), and when the ticks
 * are very small or large, one power of ten for the whole axis, stated in its
 * title, so that no tick reads `2×10⁻⁵` beside a tick reading `0`.
 */
export function linearTickLabels(ticks: readonly number[]): AxisLabels {
  const finite = ticks.filter(Number.isFinite);
  const max = Math.max(0, ...finite.map(Math.abs));
  const e = max > 0 ? Number(max.toExponential(6).split("e")[1]) : 0;
  const exponent = e >= 5 || e < -2 ? e : 0;
  const scaled = ticks.map((t) => t / 10 ** exponent);
  const step = scaled.length > 1 ? Math.abs(scaled[1] - scaled[0]) : 1;
  const decimals = step > 0 ? Math.max(0, Math.min(12, -Math.floor(Math.log10(step) + 1e-9))) : 0;
  const labels = scaled.map((v) => {
    const text = (Math.abs(v) < 1e-12 ? 0 : v).toFixed(decimals);
    return text.startsWith("-") ? MINUS + groupDigits(text.slice(1)) : groupDigits(text);
  });
  return { labels, exponent };
}

/** A log axis labels its decades only, each as 10ⁿ (one style for the axis: no `1` beside `10⁻³`). */
export function logTickLabel(v: number): string {
  const n = Math.log10(v);
  if (Math.abs(n - Math.round(n)) > 1e-9) return "";
  return `10${toSuperscript(String(Math.round(n)).replace("-", MINUS)) ?? ""}`;
}

/** The axis title's note of a shared power of ten: ` (× 10⁻³)`, or "" when there is none. */
export function exponentNote(exponent: number): string {
  return exponent === 0 ? "" : powerOfTenText(exponent);
}
