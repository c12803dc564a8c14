import type { Axis, PlotSpec, Series } from "../../checks/plotSpec.ts";
import { displayUnitFor, type DisplayContext } from "../format/displayUnit.ts";
import { representativeMagnitude } from "../format/formatQuantity.ts";
import { parseWrittenUnit } from "../format/writtenUnits.ts";
import { rewriteNumbers } from "../format/rewriteNumbers.ts";

const scaleAll = (xs: number[], f: number) => xs.map((v) => v * f);

/** One series with its values along `axis` multiplied by `f`. */
function scaleSeries(s: Series, axis: "x" | "y", f: number): Series {
  switch (s.type) {
    case "points":
      return axis === "x"
        ? { ...s, x: scaleAll(s.x, f), ...(s.xErr ? { xErr: scaleAll(s.xErr, f) } : {}) }
        : {
            ...s,
            y: scaleAll(s.y, f),
            ...(s.yErr ? { yErr: scaleAll(s.yErr, f) } : {}),
            ...(s.yErrLow ? { yErrLow: scaleAll(s.yErrLow, f) } : {}),
            ...(s.yErrHigh ? { yErrHigh: scaleAll(s.yErrHigh, f) } : {}),
          };
    case "line":
      return axis === "x" ? { ...s, x: scaleAll(s.x, f) } : { ...s, y: scaleAll(s.y, f) };
    case "band":
      return axis === "x" ? { ...s, x: scaleAll(s.x, f) } : { ...s, lower: scaleAll(s.lower, f), upper: scaleAll(s.upper, f) };
    case "bars":
      return axis === "x" ? { ...s, x0: scaleAll(s.x0, f), x1: scaleAll(s.x1, f) } : { ...s, y: scaleAll(s.y, f) };
    case "span":
      return axis === "x" ? { ...s, from: s.from * f, to: s.to * f } : s;
    case "rule":
      return s.axis === axis ? { ...s, value: s.value * f } : s;
    case "heatmap":
      return axis === "x" ? { ...s, xEdges: scaleAll(s.xEdges, f) } : { ...s, yEdges: scaleAll(s.yEdges, f) };
  }
}

/** Every value a series puts on one axis (for the magnitude that picks the prefix). */
function axisValues(s: Series, axis: "x" | "y"): number[] {
  switch (s.type) {
    case "points":
    case "line":
      return axis === "x" ? s.x : s.y;
    case "band":
      return axis === "x" ? s.x : [...s.lower, ...s.upper];
    case "bars":
      return axis === "x" ? [...s.x0, ...s.x1] : s.y;
    case "span":
      return axis === "x" ? [s.from, s.to] : [];
    case "rule":
      return s.axis === axis ? [s.value] : [];
    case "heatmap":
      return axis === "x" ? s.xEdges : s.yEdges;
  }
}

/**
 * A plot spec in display units: an axis whose unit we understand is rescaled
 * to the display unit of its quantity (the same choice the tables make, so a
 * plot in meV/s never sits beside a table in W). Other axes are left as they
 * are. Log axes keep their scale: multiplying by a constant shifts decades.
 */
export function displayPlotSpec(spec: PlotSpec, ctx: DisplayContext): PlotSpec {
  let out: PlotSpec = { ...spec, alt: rewriteNumbers(spec.alt, ctx) };
  for (const axis of ["x", "y"] as const) {
    const a: Axis = out[axis];
    const w = a.unit ? parseWrittenUnit(a.unit) : undefined;
    if (!w || w.quantity === "entropy" || w.quantity === "entropy_density" || w.quantity === "dimensionless") continue;
    const values = out.series.flatMap((s) => axisValues(s, axis)).map((v) => v * w.si);
    const unit = displayUnitFor(w.quantity, representativeMagnitude(values), ctx);
    const f = w.si * unit.perSI;
    if (f === 1 && unit.symbol === a.unit) continue;
    const domain = a.domain ? ([a.domain[0] * f, a.domain[1] * f] as [number, number]) : undefined;
    out = { ...out, [axis]: { ...a, unit: unit.symbol, ...(domain ? { domain } : {}) }, series: out.series.map((s) => scaleSeries(s, axis, f)) };
  }
  return out;
}
