import { scaleLinear, scaleLog, line as d3line, type ScaleContinuousNumeric } from "d3";
import type { PlotSpec, Series, Axis } from "../../checks/plotSpec.ts";
import { escapeHtml } from "../escape.ts";
import { DASHES, MARKERS, PALETTE } from "./palette.ts";

const W = 640;
const H = 400;
const M = { top: 16, right: 20, bottom: 56, left: 78 };
const PW = W - M.left - M.right;
const PH = H - M.top - M.bottom;

type Scale = ScaleContinuousNumeric<number, number>;

function finite(values: number[]): number[] {
  return values.filter((v) => Number.isFinite(v));
}

/** Data extent of one axis over all series, error bars and bands included. */
function extent(spec: PlotSpec, axis: "x" | "y"): [number, number] {
  const fixed = spec[axis].domain;
  if (fixed) return fixed;
  const vals: number[] = [];
  for (const s of spec.series) {
    switch (s.type) {
      case "points": {
        const v = axis === "x" ? s.x : s.y;
        const err = axis === "x" ? s.xErr : s.yErr;
        const lo = axis === "y" ? s.yErrLow ?? err : err;
        const hi = axis === "y" ? s.yErrHigh ?? err : err;
        v.forEach((c, i) => {
          vals.push(c);
          if (lo) vals.push(c - (lo[i] ?? 0));
          if (hi) vals.push(c + (hi[i] ?? 0));
        });
        break;
      }
      case "line":
        vals.push(...(axis === "x" ? s.x : s.y));
        break;
      case "band":
        if (axis === "x") vals.push(...s.x);
        else vals.push(...s.lower, ...s.upper);
        break;
      case "bars":
        if (axis === "x") vals.push(...s.x0, ...s.x1);
        else vals.push(...s.y, ...(spec.y.scale === "log" ? [] : [0]));
        break;
      case "span":
        if (axis === "x") vals.push(s.from, s.to);
        break;
      case "rule":
        if (s.axis === axis) vals.push(s.value);
        break;
      case "heatmap":
        vals.push(...(axis === "x" ? s.xEdges : s.yEdges));
        break;
    }
  }
  const usable = finite(spec[axis].scale === "log" ? vals.filter((v) => v > 0) : vals);
  if (usable.length === 0) return spec[axis].scale === "log" ? [1, 10] : [0, 1];
  let lo = Math.min(...usable);
  let hi = Math.max(...usable);
  if (lo === hi) {
    const pad = lo === 0 ? 1 : Math.abs(lo) * 0.1;
    lo -= pad;
    hi += pad;
  }
  return [lo, hi];
}

function scaleFor(axis: Axis, domain: [number, number], range: [number, number]): Scale {
  if (axis.scale === "log") return scaleLog().domain(domain).range(range).nice().clamp(true) as Scale;
  return scaleLinear().domain(domain).range(range).nice() as Scale;
}

function tickLabel(v: number): string {
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e5) return String(Number(v.toPrecision(6)));
  return v.toExponential().replace(/\.?0+e/, "e").replace("e+", "e");
}

function axisTitle(a: Axis): string {
  return a.unit ? `${a.label} (${a.unit})` : a.label;
}

function marker(kind: (typeof MARKERS)[number], x: number, y: number, color: string): string {
  const r = 3.6;
  switch (kind) {
    case "circle":
      return `<circle cx="${x.toFixed(2)}" cy="${y.toFixed(2)}" r="${r}" fill="${color}"/>`;
    case "square":
      return `<rect x="${(x - r).toFixed(2)}" y="${(y - r).toFixed(2)}" width="${2 * r}" height="${2 * r}" fill="${color}"/>`;
    case "triangle":
      return `<path d="M${x.toFixed(2)},${(y - r * 1.2).toFixed(2)}l${r * 1.1},${r * 2}h${-r * 2.2}z" fill="${color}"/>`;
    case "diamond":
      return `<path d="M${x.toFixed(2)},${(y - r * 1.3).toFixed(2)}l${r * 1.3},${r * 1.3}l${-r * 1.3},${r * 1.3}l${-r * 1.3},${-r * 1.3}z" fill="${color}"/>`;
    case "cross":
      return `<path d="M${(x - r).toFixed(2)},${(y - r).toFixed(2)}l${2 * r},${2 * r}m0,${-2 * r}l${-2 * r},${2 * r}" stroke="${color}" stroke-width="1.6"/>`;
  }
}

/** Render one series; returns its SVG and the legend swatch. */
function renderSeries(s: Series, index: number, x: Scale, y: Scale): { body: string; swatch: string } {
  const color = PALETTE[index % PALETTE.length];
  const mk = MARKERS[index % MARKERS.length];
  const X = (v: number) => x(v);
  const Y = (v: number) => y(v);
  switch (s.type) {
    case "points": {
      const parts: string[] = [];
      s.x.forEach((xv, i) => {
        const yv = s.y[i];
        if (!Number.isFinite(xv) || !Number.isFinite(yv)) return;
        const lo = s.yErrLow?.[i] ?? s.yErr?.[i];
        const hi = s.yErrHigh?.[i] ?? s.yErr?.[i];
        if (lo !== undefined && hi !== undefined && Number.isFinite(lo) && Number.isFinite(hi)) {
          parts.push(`<path class="err" d="M${X(xv).toFixed(2)},${Y(yv - lo).toFixed(2)}V${Y(yv + hi).toFixed(2)}" stroke="${color}"/>`);
        }
        const xe = s.xErr?.[i];
        if (xe !== undefined && Number.isFinite(xe)) {
          parts.push(`<path class="err" d="M${X(xv - xe).toFixed(2)},${Y(yv).toFixed(2)}H${X(xv + xe).toFixed(2)}" stroke="${color}"/>`);
        }
        parts.push(marker(mk, X(xv), Y(yv), color));
      });
      return { body: `<g class="series points" data-series="${escapeHtml(s.name)}">${parts.join("")}</g>`, swatch: marker(mk, 8, 0, color) };
    }
    case "line": {
      const pts = s.x.map((xv, i) => [xv, s.y[i]] as [number, number]).filter(([a, b]) => Number.isFinite(a) && Number.isFinite(b));
      const d = d3line()
        .x((p) => X(p[0]))
        .y((p) => Y(p[1]))(pts);
      const dash = DASHES[s.style ?? "solid"];
      return {
        body: `<path class="series line" data-series="${escapeHtml(s.name)}" d="${d ?? ""}" fill="none" stroke="${color}" stroke-width="1.8"${dash ? ` stroke-dasharray="${dash}"` : ""}/>`,
        swatch: `<path d="M0,0H16" stroke="${color}" stroke-width="1.8"${dash ? ` stroke-dasharray="${dash}"` : ""}/>`,
      };
    }
    case "band": {
      const upper = s.x.map((xv, i) => `${X(xv).toFixed(2)},${Y(s.upper[i]).toFixed(2)}`);
      const lower = s.x.map((xv, i) => `${X(xv).toFixed(2)},${Y(s.lower[i]).toFixed(2)}`).reverse();
      return {
        body: `<path class="series band" data-series="${escapeHtml(s.name)}" d="M${upper.join("L")}L${lower.join("L")}Z" fill="${color}" fill-opacity="0.18" stroke="none"/>`,
        swatch: `<rect x="0" y="-5" width="16" height="10" fill="${color}" fill-opacity="0.25"/>`,
      };
    }
    case "bars": {
      const base = y.domain()[0] > 0 ? y.range()[0] : Y(0);
      const rects = s.x0
        .map((a, i) => {
          const h = s.y[i];
          if (!Number.isFinite(h) || h <= 0 && y.domain()[0] > 0) return "";
          const top = Y(h);
          return `<rect x="${X(a).toFixed(2)}" y="${Math.min(top, base).toFixed(2)}" width="${Math.max(0.5, X(s.x1[i]) - X(a)).toFixed(2)}" height="${Math.abs(base - top).toFixed(2)}"/>`;
        })
        .join("");
      return {
        body: `<g class="series bars" data-series="${escapeHtml(s.name)}" fill="${color}" fill-opacity="0.55" stroke="${color}" stroke-width="0.6">${rects}</g>`,
        swatch: `<rect x="0" y="-5" width="16" height="10" fill="${color}" fill-opacity="0.55" stroke="${color}"/>`,
      };
    }
    case "span":
      return {
        body: `<rect class="series span" data-series="${escapeHtml(s.name)}" x="${X(s.from).toFixed(2)}" y="0" width="${Math.max(0, X(s.to) - X(s.from)).toFixed(2)}" height="${PH}" fill="${color}" fill-opacity="0.12"/>`,
        swatch: `<rect x="0" y="-5" width="16" height="10" fill="${color}" fill-opacity="0.2"/>`,
      };
    case "rule": {
      const dash = DASHES[s.style ?? "dashed"];
      const d = s.axis === "x" ? `M${X(s.value).toFixed(2)},0V${PH}` : `M0,${Y(s.value).toFixed(2)}H${PW}`;
      return {
        body: `<path class="series rule" data-series="${escapeHtml(s.name)}" d="${d}" stroke="${color}" stroke-width="1.4"${dash ? ` stroke-dasharray="${dash}"` : ""}/>`,
        swatch: `<path d="M0,0H16" stroke="${color}" stroke-width="1.4"${dash ? ` stroke-dasharray="${dash}"` : ""}/>`,
      };
    }
    case "heatmap": {
      const max = Math.max(1e-300, ...s.counts.flat());
      const cells: string[] = [];
      s.counts.forEach((row, j) =>
        row.forEach((c, i) => {
          if (!(c > 0)) return;
          const x0 = X(s.xEdges[i]);
          const x1 = X(s.xEdges[i + 1]);
          const y0 = Y(s.yEdges[j + 1]);
          const y1 = Y(s.yEdges[j]);
          // Logarithmic shading: rare cells stay visible next to the peak.
          const shade = 0.12 + 0.88 * (Math.log1p(c) / Math.log1p(max));
          cells.push(`<rect x="${x0.toFixed(2)}" y="${y0.toFixed(2)}" width="${Math.max(0.5, x1 - x0).toFixed(2)}" height="${Math.max(0.5, y1 - y0).toFixed(2)}" fill-opacity="${shade.toFixed(3)}"/>`);
        }),
      );
      return {
        body: `<g class="series heatmap" data-series="${escapeHtml(s.name)}" fill="${color}">${cells.join("")}</g>`,
        swatch: `<rect x="0" y="-5" width="16" height="10" fill="${color}" fill-opacity="0.6"/>`,
      };
    }
  }
}

let plotCounter = 0;

/**
 * Draw a plot spec as a self-contained SVG string (d3 scales and shapes, markup
 * written directly: no DOM needed at build time). The SVG carries a title and a
 * description for screen readers; all text from specs is escaped.
 */
export function renderPlot(spec: PlotSpec, idPrefix = ""): string {
  const uid = `${idPrefix}${spec.id}-${++plotCounter}`.replace(/[^A-Za-z0-9_-]/g, "-");
  const x = scaleFor(spec.x, extent(spec, "x"), [0, PW]);
  const y = scaleFor(spec.y, extent(spec, "y"), [PH, 0]);
  const xTicks = x.ticks(spec.x.scale === "log" ? 6 : 7);
  const yTicks = y.ticks(spec.y.scale === "log" ? 6 : 6);
  const grid = [
    ...yTicks.map((t) => `<path d="M0,${y(t).toFixed(2)}H${PW}"/>`),
    ...xTicks.map((t) => `<path d="M${x(t).toFixed(2)},0V${PH}"/>`),
  ].join("");
  const xAxis = xTicks
    .map((t) => `<g transform="translate(${x(t).toFixed(2)},${PH})"><path d="M0,0V5"/><text y="18" text-anchor="middle" stroke="none">${escapeHtml(tickLabel(t))}</text></g>`)
    .join("");
  const yAxis = yTicks
    .map((t) => `<g transform="translate(0,${y(t).toFixed(2)})"><path d="M-5,0H0"/><text x="-8" dy="0.32em" text-anchor="end" stroke="none">${escapeHtml(tickLabel(t))}</text></g>`)
    .join("");
  // Draw areas first, then lines and markers on top.
  const order: Record<Series["type"], number> = { span: 0, heatmap: 1, band: 2, bars: 3, rule: 4, line: 5, points: 6 };
  const rendered = spec.series.map((s, i) => ({ s, i, r: renderSeries(s, i, x, y) }));
  const body = [...rendered].sort((a, b) => order[a.s.type] - order[b.s.type]).map((e) => e.r.body).join("");
  const legend = rendered
    .map((e, k) => `<g transform="translate(0,${k * 17})">${e.r.swatch}<text x="22" dy="0.32em">${escapeHtml(e.s.name)}</text></g>`)
    .join("");
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="plot" viewBox="0 0 ${W} ${H + rendered.length * 17 + 8}" role="img" aria-labelledby="${uid}-title ${uid}-desc" font-family="inherit" font-size="12">`,
    `<title id="${uid}-title">${escapeHtml(spec.title)}</title>`,
    `<desc id="${uid}-desc">${escapeHtml(spec.alt)}</desc>`,
    `<defs><clipPath id="${uid}-clip"><rect width="${PW}" height="${PH}"/></clipPath></defs>`,
    `<g transform="translate(${M.left},${M.top})">`,
    `<g class="grid" stroke="currentColor" stroke-opacity="0.1">${grid}</g>`,
    `<g clip-path="url(#${uid}-clip)">${body}</g>`,
    `<rect class="frame" width="${PW}" height="${PH}" fill="none" stroke="currentColor" stroke-opacity="0.6"/>`,
    `<g class="axis x" stroke="currentColor" fill="currentColor">${xAxis}</g>`,
    `<g class="axis y" stroke="currentColor" fill="currentColor">${yAxis}</g>`,
    `<text class="axis-title" x="${PW / 2}" y="${PH + 42}" text-anchor="middle" fill="currentColor">${escapeHtml(axisTitle(spec.x))}</text>`,
    `<text class="axis-title" transform="translate(${-M.left + 16},${PH / 2}) rotate(-90)" text-anchor="middle" fill="currentColor">${escapeHtml(axisTitle(spec.y))}</text>`,
    `</g>`,
    `<g class="legend" transform="translate(${M.left},${H + 4})" fill="currentColor">${legend}</g>`,
    `</svg>`,
  ].join("");
}
