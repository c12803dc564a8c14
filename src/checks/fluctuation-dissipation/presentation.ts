import type { PlotSpec, Series } from "../plotSpec.ts";
import { fmt } from "../helpers.ts";
import type { EstimatedMatrix, EstimatedVector, ResponseFit } from "./responseFit.ts";
import type { Channel } from "./sweep.ts";
import { integerPower } from "../../math/index.ts";

/**
 * A value with its standard uncertainty as TeX in the concise notation of the
 * GUM (JCGM 100:2008, §7.2.2): 1.958(16)\times10^{-40}, the digits in
 * parentheses being the uncertainty in units of the last digit shown (two
 * significant digits of the uncertainty fix the decimals, common practice).
 */
export function texValue(value: number, se: number): string {
  const size = Math.max(Math.abs(value), Math.abs(se));
  if (size === 0 || !Number.isFinite(size)) return Number.isFinite(value) ? "0" : String(value);
  const e = Math.floor(Math.log10(size));
  const exp = Math.abs(e) <= 2 ? 0 : e;
  const v = value / integerPower(10, exp);
  const u = se / integerPower(10, exp);
  const decimals = u > 0 ? Math.min(8, Math.max(0, 1 - Math.floor(Math.log10(u)))) : 4;
  const body = u > 0 ? `${v.toFixed(decimals)}(${Math.round(u * integerPower(10, decimals))})` : v.toFixed(decimals);
  return exp === 0 ? body : `${body}\\times 10^{${exp}}`;
}

export function texMatrix(m: { value: number[][]; se: number[][] }): string {
  const rows = m.value.map((row, i) => row.map((v, j) => texValue(v, m.se[i][j])).join(" & "));
  return `\\begin{pmatrix} ${rows.join(" \\\\ ")} \\end{pmatrix}`;
}

export function texColumn(v: { value: number[]; se: number[] }): string {
  return `\\begin{pmatrix} ${v.value.map((x, i) => texValue(x, v.se[i])).join(" \\\\ ")} \\end{pmatrix}`;
}

const UNIT_TEX: Record<string, string> = { QQ: "\\mathrm{J^{2}\\,s^{-1}}", QdN: "\\mathrm{J\\,s^{-1}}", dNQ: "\\mathrm{J\\,s^{-1}}", dNdN: "\\mathrm{s^{-1}}" };
const UNIT_TEXT: Record<string, string> = { QQ: "J²/s", QdN: "J/s", dNQ: "J/s", dNdN: "1/s" };

/** SI unit of the entry L[i][j] = d J_i / d a_j: [x_i][x_j]/s. */
export function entryUnit(ci: Channel, cj: Channel): string {
  return UNIT_TEXT[ci + cj];
}

export function texUnits(channels: Channel[]): string {
  return `\\begin{pmatrix} ${channels.map((ci) => channels.map((cj) => UNIT_TEX[ci + cj]).join(" & ")).join(" \\\\ ")} \\end{pmatrix}`;
}

export function fluxUnit(c: Channel): string {
  return c === "Q" ? "W" : "1/s";
}

/** Readable plotting units: energies in the sweep's declared energy unit. */
export interface PlotUnits {
  name: string;
  joules: number;
}

const CHANNEL_LABEL: Record<Channel, string> = { Q: "Heat flux J_Q", dN: "Particle flux J_N" };
const AFFINITY_LABEL: Record<Channel, string> = { Q: "Affinity a_Q", dN: "Affinity a_N" };

/**
 * Flux component i against affinity j with the fitted plane's slice. The
 * points are partial residuals: each mean flux minus the fitted share of the
 * other affinities' deviations from their sweep mean, so that the slice
 * (other affinities at their sweep mean) passes through them when the plane
 * fits (Larsen & McCleary, Technometrics 14, 781 (1972)).
 */
export function sliceplots(r: ResponseFit, L: EstimatedMatrix, s: EstimatedVector, Lw: EstimatedMatrix | null, sw: EstimatedVector | null, Lf: EstimatedMatrix, units: PlotUnits): PlotSpec[] {
  const m = r.channels.length;
  const aBar = Array.from({ length: m }, (_, j) => r.points.reduce((acc, p) => acc + p.a[j], 0) / r.points.length);
  const yFactor = (c: Channel) => (c === "Q" ? 1 / units.joules : 1);
  const xFactor = (c: Channel) => (c === "Q" ? units.joules : 1);
  const plots: PlotSpec[] = [];
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      const ci = r.channels[i];
      const cj = r.channels[j];
      const xs = r.points.map((p) => p.a[j]);
      const lo = Math.min(...xs);
      const hi = Math.max(...xs);
      const pad = 0.05 * (hi - lo || Math.abs(hi) || 1);
      const grid = [lo - pad, hi + pad];
      const partial = (outputs: number[], M: EstimatedMatrix) =>
        r.points.map((p) => {
          let y = p.mean[outputs[i]];
          for (let l = 0; l < m; l++) if (l !== j) y -= M.value[i][l] * (p.a[l] - aBar[l]);
          return y * yFactor(ci);
        });
      const slice = (M: EstimatedMatrix, intercept: number) =>
        grid.map((x) => {
          let y = intercept + M.value[i][j] * x;
          for (let l = 0; l < m; l++) if (l !== j) y += M.value[i][l] * aBar[l];
          return y * yFactor(ci);
        });
      const series: Series[] = [
        {
          type: "points",
          name: "mean flux J",
          x: xs.map((x) => x * xFactor(cj)),
          y: partial(r.outputs.J, L),
          yErr: r.points.map((p) => Math.sqrt(p.covariance[r.outputs.J[i]][r.outputs.J[i]]) * yFactor(ci)),
        },
        { type: "line", name: "fitted plane J = s + L a (slice)", x: grid.map((x) => x * xFactor(cj)), y: slice(L, s.value[i]) },
      ];
      if (Lw && sw && r.outputs.Jw) {
        series.push(
          {
            type: "points",
            name: "weighted flux J~",
            x: xs.map((x) => x * xFactor(cj)),
            y: partial(r.outputs.Jw, Lw),
            yErr: r.points.map((p) => Math.sqrt(p.covariance[r.outputs.Jw![i]][r.outputs.Jw![i]]) * yFactor(ci)),
          },
          { type: "line", name: "fitted plane J~ = s~ + L~ a (slice)", x: grid.map((x) => x * xFactor(cj)), y: slice(Lw, sw.value[i]) },
        );
      }
      series.push({ type: "line", name: "fluctuation prediction L_fluct a", x: grid.map((x) => x * xFactor(cj)), y: slice(Lf, 0), style: "dashed" });
      plots.push({
        id: `slice-${ci}-${cj}`,
        title: `${CHANNEL_LABEL[ci]} against ${AFFINITY_LABEL[cj].toLowerCase()}`,
        alt: `${CHANNEL_LABEL[ci]} of each of the ${r.points.length} datasets of the sweep against ${AFFINITY_LABEL[cj].toLowerCase()}, with the other affinities' share moved to their sweep mean; the solid line is the slice of the fitted plane (slope ${fmt(L.value[i][j])} ${entryUnit(ci, cj)}), the dashed line the prediction of the second moments (slope ${fmt(Lf.value[i][j])} ${entryUnit(ci, cj)}). The two should coincide${Lw ? " for the weighted fluxes J~" : ""} when the fluctuation–dissipation relation holds.${r.model === "quadratic" ? " The fit has quadratic terms here, so the lines are tangents at zero affinity and the points curve away from them." : ""}`,
        x: { label: AFFINITY_LABEL[cj], ...(cj === "Q" ? { unit: `1/${units.name}` } : {}) },
        y: { label: CHANNEL_LABEL[ci], unit: ci === "Q" ? `${units.name}/s` : "1/s" },
        series,
      });
    }
  }
  return plots;
}
