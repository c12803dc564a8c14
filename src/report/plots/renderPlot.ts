import { scaleLinear, scaleLog, line as d3line, type ScaleContinuousNumeric } from "d3";
import type { PlotSpec, Series, Axis } from "../../checks/plotSpec.ts";
import { escapeHtml } from "../escape.ts";
import { DASHES, HATCH_CYCLE, LINE_CYCLE, MARKERS, seriesColour } from "./palette.ts";
import { describePlot } from "./describePlot.ts";
import { exponentNote, linearTickLabels, logTickLabel } from "./tickLabel.ts";
import { richTextSvg } from "./richText.ts";

/*
 * Geometry in SVG user units. The figure is 560 units wide and printed 11.5 cm
 * wide, so 14-unit tick labels print at about 8 pt and 15-unit axis titles at
 * about 9 pt, the sizes of a journal figure; on a 375 px phone the labels are
 * still about 9 px.
 */
const W = 560;
const H = 370;
const M = { top: 14, right: 20, bottom: 62, left: 88 };
const PW = W - M.left - M.right;
const PH = H - M.top - M.bottom;
const LEGEND_ROW = 20;

type Scale = ScaleContinuousNumeric<number, number>;

const f2 = (v: number) => v.toFixed(2);

function finite(values: number[]): number[] {
  return values.filter((v) => Number.isFinite(v));
}

/** Data extent of one axis over all series, error bars and bands included. */
export function extent(spec: PlotSpec, axis: "x" | "y"): [number, number] {
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
  let lo = usable.reduce((a, b) => Math.min(a, b), Infinity);
  let hi = usable.reduce((a, b) => Math.max(a, b), -Infinity);
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

/** A data-file column's name used as a label (`Vg_mV`): its unit is in its name, as the file wrote it. */
const COLUMN_NAME = /^[A-Za-z][A-Za-z0-9]*_[A-Za-z0-9_]+$/;

/**
 * An axis title with its unit: `label (unit)`, `(dimensionless)` for a pure
 * number, a column name as written; a power of ten shared by the tick labels
 * goes in front of the unit.
 */
export function axisTitle(a: Axis, exponent = 0): string {
  const power = exponentNote(exponent);
  if (a.unit && a.unit !== "1") return `${a.label} (${power ? `${power.slice(1)} ` : ""}${a.unit})`;
  if (COLUMN_NAME.test(a.label)) return power ? `${a.label} (${power})` : a.label;
  return `${a.label} (${power ? `${power} ` : ""}dimensionless)`.replace("(×", "(×");
}

/** Ticks of an axis with their labels in one style, "" for an unlabelled minor tick on a log axis, and the power of ten the labels share. */
function ticksOf(axis: Axis, scale: Scale, count: number): { ticks: { value: number; label: string }[]; exponent: number } {
  const ticks = scale.ticks(count);
  if (axis.scale !== "log") {
    const { labels, exponent } = linearTickLabels(ticks);
    return { ticks: ticks.map((value, i) => ({ value, label: escapeHtml(labels[i]) })), exponent };
  }
  return { ticks: ticks.map((value) => ({ value, label: logTickLabel(value) })), exponent: 0 };
}

function marker(kind: (typeof MARKERS)[number], x: number, y: number): string {
  const r = 3.8;
  switch (kind) {
    case "circle":
      return `<circle cx="${f2(x)}" cy="${f2(y)}" r="${r}"/>`;
    case "square":
      return `<rect x="${f2(x - r * 0.9)}" y="${f2(y - r * 0.9)}" width="${f2(r * 1.8)}" height="${f2(r * 1.8)}"/>`;
    case "triangle":
      return `<path d="M${f2(x)},${f2(y - r * 1.25)}l${f2(r * 1.15)},${f2(r * 2)}h${f2(-r * 2.3)}z"/>`;
    case "diamond":
      return `<path d="M${f2(x)},${f2(y - r * 1.3)}l${f2(r * 1.3)},${f2(r * 1.3)}l${f2(-r * 1.3)},${f2(r * 1.3)}l${f2(-r * 1.3)},${f2(-r * 1.3)}z"/>`;
    case "cross":
      return `<path d="M${f2(x - r)},${f2(y - r)}l${f2(2 * r)},${f2(2 * r)}m0,${f2(-2 * r)}l${f2(-2 * r)},${f2(2 * r)}" fill="none" stroke="currentColor" stroke-width="1.8"/>`;
    case "triangle-down":
      return `<path d="M${f2(x)},${f2(y + r * 1.25)}l${f2(r * 1.15)},${f2(-r * 2)}h${f2(-r * 2.3)}z"/>`;
    case "plus":
      return `<path d="M${f2(x - r * 1.2)},${f2(y)}h${f2(2.4 * r)}M${f2(x)},${f2(y - r * 1.2)}v${f2(2.4 * r)}" fill="none" stroke="currentColor" stroke-width="2"/>`;
  }
}

/** A vertical or horizontal error bar with short caps at both ends, as in print. */
function errorBar(orientation: "v" | "h", a: number, from: number, to: number): string {
  const cap = 3.5;
  return orientation === "v"
    ? `<path d="M${f2(a)},${f2(from)}V${f2(to)}M${f2(a - cap)},${f2(from)}h${2 * cap}M${f2(a - cap)},${f2(to)}h${2 * cap}"/>`
    : `<path d="M${f2(from)},${f2(a)}H${f2(to)}M${f2(from)},${f2(a - cap)}v${2 * cap}M${f2(to)},${f2(a - cap)}v${2 * cap}"/>`;
}

interface Style {
  index: number; // position in spec.series: picks the colour and marker
  lineOrdinal: number; // among unstyled lines: picks the dash pattern
  barsOrdinal: number; // among histograms: picks the hatching
  uid: string;
}

/** Render one series; returns its SVG, its legend swatch and any pattern it needs in <defs>. */
function renderSeries(s: Series, st: Style, x: Scale, y: Scale): { body: string; swatch: string; defs: string } {
  const colour = seriesColour(st.index);
  const wrap = (cls: string, inner: string, extra = "") =>
    `<g class="series ${cls}" data-series="${escapeHtml(s.name)}" color="${colour.attr}" style="${colour.style}"${extra}>${inner}</g>`;
  const swatchOf = (inner: string) => `<g color="${colour.attr}" style="${colour.style}">${inner}</g>`;
  switch (s.type) {
    case "points": {
      const mk = MARKERS[st.index % MARKERS.length];
      const bars: string[] = [];
      const marks: string[] = [];
      s.x.forEach((xv, i) => {
        const yv = s.y[i];
        if (!Number.isFinite(xv) || !Number.isFinite(yv)) return;
        const lo = s.yErrLow?.[i] ?? s.yErr?.[i];
        const hi = s.yErrHigh?.[i] ?? s.yErr?.[i];
        if (lo !== undefined && hi !== undefined && Number.isFinite(lo) && Number.isFinite(hi)) bars.push(errorBar("v", x(xv), y(yv - lo), y(yv + hi)));
        const xe = s.xErr?.[i];
        if (xe !== undefined && Number.isFinite(xe)) bars.push(errorBar("h", y(yv), x(xv - xe), x(xv + xe)));
        marks.push(marker(mk, x(xv), y(yv)));
      });
      const errors = bars.length ? `<g class="err" fill="none" stroke="currentColor" stroke-width="1.2">${bars.join("")}</g>` : "";
      return {
        body: wrap("points", `${errors}<g fill="currentColor">${marks.join("")}</g>`),
        swatch: swatchOf(`<g fill="currentColor">${marker(mk, 10, 0)}</g>`),
        defs: "",
      };
    }
    case "line": {
      const pts = s.x.map((xv, i) => [xv, s.y[i]] as [number, number]).filter(([a, b]) => Number.isFinite(a) && Number.isFinite(b));
      const d = d3line()
        .x((p) => x(p[0]))
        .y((p) => y(p[1]))(pts);
      const dash = s.style ? DASHES[s.style] : LINE_CYCLE[st.lineOrdinal % LINE_CYCLE.length];
      const stroke = `fill="none" stroke="currentColor" stroke-width="2"${dash ? ` stroke-dasharray="${dash}"` : ""}`;
      return { body: wrap("line", `<path d="${d ?? ""}" ${stroke}/>`), swatch: swatchOf(`<path d="M0,0H20" ${stroke}/>`), defs: "" };
    }
    case "band": {
      const upper = s.x.map((xv, i) => `${f2(x(xv))},${f2(y(s.upper[i]))}`);
      const lower = s.x.map((xv, i) => `${f2(x(xv))},${f2(y(s.lower[i]))}`).reverse();
      // Edges drawn thin so the band's extent survives grey-scale print, where a pale fill can vanish.
      return {
        body: wrap(
          "band",
          `<path d="M${upper.join("L")}L${lower.join("L")}Z" fill="currentColor" fill-opacity="0.18" stroke="none"/><path d="M${upper.join("L")}M${lower.reverse().join("L")}" fill="none" stroke="currentColor" stroke-opacity="0.6" stroke-width="0.8"/>`,
        ),
        swatch: swatchOf(`<rect x="0" y="-6" width="20" height="12" fill="currentColor" fill-opacity="0.25" stroke="currentColor" stroke-opacity="0.6" stroke-width="0.8"/>`),
        defs: "",
      };
    }
    case "bars": {
      const base = y.domain()[0] > 0 ? y.range()[0] : y(0);
      const rects = s.x0
        .map((a, i) => {
          const h = s.y[i];
          if (!Number.isFinite(h) || (h <= 0 && y.domain()[0] > 0)) return "";
          const top = y(h);
          return `<rect x="${f2(x(a))}" y="${f2(Math.min(top, base))}" width="${f2(Math.max(0.5, x(s.x1[i]) - x(a)))}" height="${f2(Math.abs(base - top))}"/>`;
        })
        .join("");
      const angle = HATCH_CYCLE[st.barsOrdinal % HATCH_CYCLE.length];
      const pid = `${st.uid}-hatch-${st.index}`;
      const fill = angle === undefined ? `fill="currentColor" fill-opacity="0.5"` : `fill="url(#${pid})"`;
      const defs =
        angle === undefined
          ? ""
          : `<pattern id="${pid}" patternUnits="userSpaceOnUse" width="6" height="6" patternTransform="rotate(${angle})" color="${colour.attr}" style="${colour.style}"><path d="M0,0V6" stroke="currentColor" stroke-width="1.6"/></pattern>`;
      return {
        body: wrap("bars", rects, ` ${fill} stroke="currentColor" stroke-width="0.7"`),
        swatch: swatchOf(`<rect x="0" y="-6" width="20" height="12" ${fill} stroke="currentColor" stroke-width="0.7"/>`),
        defs,
      };
    }
    case "span":
      return {
        body: wrap("span", `<rect x="${f2(x(s.from))}" y="0" width="${f2(Math.max(0, x(s.to) - x(s.from)))}" height="${PH}" fill="currentColor" fill-opacity="0.12" stroke="currentColor" stroke-opacity="0.5" stroke-dasharray="2 3"/>`),
        swatch: swatchOf(`<rect x="0" y="-6" width="20" height="12" fill="currentColor" fill-opacity="0.2" stroke="currentColor" stroke-opacity="0.5" stroke-dasharray="2 3"/>`),
        defs: "",
      };
    case "rule": {
      const dash = DASHES[s.style ?? "dashed"];
      const d = s.axis === "x" ? `M${f2(x(s.value))},0V${PH}` : `M0,${f2(y(s.value))}H${PW}`;
      const stroke = `fill="none" stroke="currentColor" stroke-width="1.6"${dash ? ` stroke-dasharray="${dash}"` : ""}`;
      return { body: wrap("rule", `<path d="${d}" ${stroke}/>`), swatch: swatchOf(`<path d="M0,0H20" ${stroke}/>`), defs: "" };
    }
    case "heatmap": {
      const max = Math.max(1e-300, ...s.counts.flat());
      const cells: string[] = [];
      s.counts.forEach((row, j) =>
        row.forEach((c, i) => {
          if (!(c > 0)) return;
          const x0 = x(s.xEdges[i]);
          const x1 = x(s.xEdges[i + 1]);
          const y0 = y(s.yEdges[j + 1]);
          const y1 = y(s.yEdges[j]);
          // Logarithmic shading: rare cells stay visible next to the peak.
          const shade = 0.12 + 0.88 * (Math.log1p(c) / Math.log1p(max));
          cells.push(`<rect x="${f2(x0)}" y="${f2(y0)}" width="${f2(Math.max(0.5, x1 - x0))}" height="${f2(Math.max(0.5, y1 - y0))}" fill-opacity="${shade.toFixed(3)}"/>`);
        }),
      );
      return {
        body: wrap("heatmap", cells.join(""), ` fill="currentColor"`),
        swatch: swatchOf(
          `<rect x="0" y="-6" width="7" height="12" fill="currentColor" fill-opacity="0.12"/><rect x="7" y="-6" width="7" height="12" fill="currentColor" fill-opacity="0.5"/><rect x="14" y="-6" width="6" height="12" fill="currentColor"/>`,
        ),
        defs: "",
      };
    }
  }
}

function legendText(s: Series): string {
  if (s.type !== "heatmap") return s.name;
  const max = Math.max(0, ...s.counts.flat());
  return `${s.name} (shade ∝ log(1 + count); darkest: ${max})`;
}

let plotCounter = 0;

/**
 * Draw a plot spec as a self-contained SVG string (d3 scales and shapes, markup
 * written directly: no DOM needed at build time). The SVG is a labelled image
 * for screen readers: its title, then a description made of the spec's text
 * alternative and a plain account of axes, ranges and series. All text from
 * specs is escaped. `ordinal` numbers the plot on its page, which keeps the
 * element ids unique and the page's bytes independent of what else the process
 * drew before; without it a process-wide counter keeps the ids unique.
 */
export function renderPlot(spec: PlotSpec, idPrefix = "", ordinal?: number): string {
  const uid = `${idPrefix}${spec.id}-${ordinal ?? ++plotCounter}`.replace(/[^A-Za-z0-9_-]/g, "-");
  const x = scaleFor(spec.x, extent(spec, "x"), [0, PW]);
  const y = scaleFor(spec.y, extent(spec, "y"), [PH, 0]);
  const { ticks: xTicks, exponent: xExp } = ticksOf(spec.x, x, spec.x.scale === "log" ? 6 : 7);
  const { ticks: yTicks, exponent: yExp } = ticksOf(spec.y, y, 6);
  const grid = [
    ...yTicks.filter((t) => t.label).map((t) => `<path d="M0,${f2(y(t.value))}H${PW}"/>`),
    ...xTicks.filter((t) => t.label).map((t) => `<path d="M${f2(x(t.value))},0V${PH}"/>`),
  ].join("");
  const xAxis = xTicks
    .map((t) => `<g transform="translate(${f2(x(t.value))},${PH})"><path d="M0,0V${t.label ? 6 : 3}"/>${t.label ? `<text y="21" text-anchor="middle" stroke="none">${t.label}</text>` : ""}</g>`)
    .join("");
  const yAxis = yTicks
    .map((t) => `<g transform="translate(0,${f2(y(t.value))})"><path d="M${t.label ? -6 : -3},0H0"/>${t.label ? `<text x="-9" dy="0.34em" text-anchor="end" stroke="none">${t.label}</text>` : ""}</g>`)
    .join("");
  // Areas first, then rules and lines, markers on top.
  const order: Record<Series["type"], number> = { span: 0, heatmap: 1, band: 2, bars: 3, rule: 4, line: 5, points: 6 };
  let lineOrdinal = 0;
  let barsOrdinal = 0;
  const rendered = spec.series.map((s, index) => {
    const st: Style = { index, uid, lineOrdinal: s.type === "line" && !s.style ? lineOrdinal++ : 0, barsOrdinal: s.type === "bars" ? barsOrdinal++ : 0 };
    return { s, r: renderSeries(s, st, x, y) };
  });
  const body = [...rendered].sort((a, b) => order[a.s.type] - order[b.s.type]).map((e) => e.r.body).join("");
  const defs = rendered.map((e) => e.r.defs).join("");
  const legend = rendered
    .map((e, k) => `<g transform="translate(0,${k * LEGEND_ROW})">${e.r.swatch}<text x="28" dy="0.34em">${richTextSvg(legendText(e.s))}</text></g>`)
    .join("");
  const height = H + rendered.length * LEGEND_ROW + 6;
  const description = `${spec.alt} ${describePlot(spec, x.domain() as [number, number], y.domain() as [number, number])}`;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="plot" viewBox="0 0 ${W} ${height}" width="${W}" height="${height}" role="img" aria-labelledby="${uid}-title ${uid}-desc" font-family="system-ui, 'DejaVu Sans', sans-serif" font-size="14">`,
    `<title id="${uid}-title">${escapeHtml(spec.title)}</title>`,
    `<desc id="${uid}-desc">${escapeHtml(description)}</desc>`,
    `<defs><clipPath id="${uid}-clip"><rect width="${PW}" height="${PH}"/></clipPath>${defs}</defs>`,
    `<g transform="translate(${M.left},${M.top})">`,
    `<g class="grid" fill="none" stroke="currentColor" stroke-opacity="0.12">${grid}</g>`,
    `<g class="data" clip-path="url(#${uid}-clip)">${body}</g>`,
    `<rect class="frame" width="${PW}" height="${PH}" fill="none" stroke="currentColor" stroke-opacity="0.75"/>`,
    `<g class="axis x" stroke="currentColor" fill="currentColor">${xAxis}</g>`,
    `<g class="axis y" stroke="currentColor" fill="currentColor">${yAxis}</g>`,
    `<text class="axis-title" x="${PW / 2}" y="${PH + 48}" text-anchor="middle" fill="currentColor" font-size="15">${richTextSvg(axisTitle(spec.x, xExp))}</text>`,
    `<text class="axis-title" transform="translate(${-M.left + 18},${PH / 2}) rotate(-90)" text-anchor="middle" fill="currentColor" font-size="15">${richTextSvg(axisTitle(spec.y, yExp))}</text>`,
    `</g>`,
    `<g class="legend" transform="translate(${M.left},${H + 8})" fill="currentColor">${legend}</g>`,
    `</svg>`,
  ].join("");
}
