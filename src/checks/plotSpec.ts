/**
 * Plots as data. A check describes what to draw (series, axes, a title and a
 * text alternative); the report turns it into SVG. Numbers are in the units
 * named on the axes (the check chooses readable units, e.g. meV or pW).
 */
export interface Axis {
  label: string; // e.g. "Entropy production Σ"
  unit?: string; // e.g. "k_B"; shown as "label (unit)"
  scale?: "linear" | "log";
  domain?: [number, number]; // fixed extent; otherwise from the data
}

export type LineStyle = "solid" | "dashed" | "dotted";

export type Series =
  /** Markers, optionally with error bars (half-widths). */
  | { type: "points"; name: string; x: number[]; y: number[]; xErr?: number[]; yErr?: number[]; yErrLow?: number[]; yErrHigh?: number[] }
  /** A polyline; reference laws (identity, ideal slope) use dashed style. */
  | { type: "line"; name: string; x: number[]; y: number[]; style?: LineStyle }
  /** A shaded confidence band between lower and upper. */
  | { type: "band"; name: string; x: number[]; lower: number[]; upper: number[] }
  /** Histogram bars on [x0, x1) with height y. */
  | { type: "bars"; name: string; x0: number[]; x1: number[]; y: number[] }
  /** A shaded vertical span (e.g. a linear window in time). */
  | { type: "span"; name: string; from: number; to: number }
  /** A horizontal or vertical reference line at a constant value. */
  | { type: "rule"; name: string; axis: "x" | "y"; value: number; style?: LineStyle }
  /** A 2-D histogram: cell edges and counts (rows follow y, columns follow x). */
  | { type: "heatmap"; name: string; xEdges: number[]; yEdges: number[]; counts: number[][] };

export interface PlotSpec {
  id: string; // unique within the check result, used for anchors
  title: string;
  alt: string; // text alternative: what the plot shows and what to look for
  x: Axis;
  y: Axis;
  series: Series[];
}
