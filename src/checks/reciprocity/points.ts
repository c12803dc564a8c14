/**
 * Small helpers shared by the coefficient checks (reciprocity, positivity,
 * figures of merit, Lorenz ratio): how a row is named in sentences and
 * tables, and which readable unit prefix a plotted quantity gets.
 */
import type { CoefficientPoint, CoefficientsDataset } from "../../ingest/types.ts";
import { fmt } from "../helpers.ts";
import { integerPower } from "../../math/index.ts";

/** "Vg = 0.12, B = +0.5 T (row 7)": how a person finds the row in the file. */
export function pointLabel(d: CoefficientsDataset, p: CoefficientPoint, withRow = true): string {
  const parts = Object.entries(p.point).map(([k, v]) => `${k} = ${fmt(v)}`);
  if (p.B !== null) parts.push(`B = ${p.B > 0 ? "+" : ""}${fmt(p.B)} ${d.fieldUnit}`);
  const text = parts.length ? parts.join(", ") : `row ${p.row}`;
  return withRow && parts.length ? `${text} (row ${p.row})` : text;
}

/** The abscissa of sweep plots. */
export function sweepAxisLabel(d: CoefficientsDataset): string {
  return d.sweepVariable ?? "row in the file";
}

/** Group indices by a key, keeping first-seen order. */
export function groupBy<T>(items: readonly T[], key: (item: T) => string): Map<string, T[]> {
  const groups = new Map<string, T[]>();
  for (const item of items) {
    const k = key(item);
    const g = groups.get(k);
    if (g) g.push(item);
    else groups.set(k, [item]);
  }
  return groups;
}

const PREFIX_BY_POWER: Record<number, string> = { [-18]: "a", [-15]: "f", [-12]: "p", [-9]: "n", [-6]: "µ", [-3]: "m", 0: "", 3: "k", 6: "M" };

/** An SI prefix that brings the largest magnitude into [1, 1000): numbers for axes stay readable. */
export function engineeringScale(values: readonly number[]): { factor: number; prefix: string } {
  const finite = values.filter((v) => Number.isFinite(v) && v !== 0).map(Math.abs);
  if (finite.length === 0) return { factor: 1, prefix: "" };
  const power = Math.max(-18, Math.min(6, 3 * Math.floor(Math.log10(Math.max(...finite)) / 3)));
  return { factor: integerPower(10, -power), prefix: PREFIX_BY_POWER[power] };
}

/** Sort the indices of a series by abscissa, for bands and lines. */
export function sortedBy(x: readonly number[]): number[] {
  return x.map((_, i) => i).sort((a, b) => x[a] - x[b]);
}
