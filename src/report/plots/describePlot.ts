import type { PlotSpec, Series } from "../../checks/plotSpec.ts";
import { numberText } from "./tickLabel.ts";

// "10^−7" reads as "10 to the −7" in a screen reader; the caret marks the exponent.
const num = (v: number) => numberText(v, 4);

function axisSentence(which: string, a: PlotSpec["x"], domain: [number, number]): string {
  const title = a.unit ? `${a.label} in ${a.unit}` : a.label;
  return `${which} axis: ${title}, ${a.scale === "log" ? "logarithmic" : "linear"} scale from ${num(domain[0])} to ${num(domain[1])}.`;
}

function seriesPhrase(s: Series): string {
  switch (s.type) {
    case "points": {
      const n = s.x.filter((v, i) => Number.isFinite(v) && Number.isFinite(s.y[i])).length;
      const vertical = Boolean(s.yErr || s.yErrLow || s.yErrHigh);
      const bars = vertical && s.xErr ? " with horizontal and vertical error bars" : vertical ? " with vertical error bars" : s.xErr ? " with horizontal error bars" : "";
      return `${s.name}: ${n} point${n === 1 ? "" : "s"}${bars}`;
    }
    case "line":
      return `${s.name}: a ${s.style && s.style !== "solid" ? `${s.style} ` : ""}line through ${s.x.length} points`;
    case "band":
      return `${s.name}: a shaded band over ${s.x.length} values of the horizontal axis`;
    case "bars":
      return `${s.name}: a histogram of ${s.x0.length} bars`;
    case "span":
      return `${s.name}: a shaded interval from ${num(s.from)} to ${num(s.to)} on the horizontal axis`;
    case "rule":
      return `${s.name}: a reference line at ${s.axis} = ${num(s.value)}`;
    case "heatmap": {
      const occupied = s.counts.flat().filter((c) => c > 0).length;
      return `${s.name}: a two-dimensional histogram of ${s.xEdges.length - 1} by ${s.yEdges.length - 1} cells, ${occupied} of them occupied`;
    }
  }
}

/**
 * A plain account of a plot for readers who cannot see it (the SVG's
 * description, after the check's own text alternative): both axes with their
 * quantities, units and drawn ranges, and each series with what it is.
 */
export function describePlot(spec: PlotSpec, xDomain: [number, number], yDomain: [number, number]): string {
  return [axisSentence("Horizontal", spec.x, xDomain), axisSentence("Vertical", spec.y, yDomain), `Shown: ${spec.series.map(seriesPhrase).join("; ")}.`].join(" ");
}
