/**
 * Onsager–Casimir reciprocity of linear-response coefficients:
 * L_ij(B) = ε_i ε_j L_ji(−B) (Onsager, Phys. Rev. 37, 405 (1931); Casimir,
 * Rev. Mod. Phys. 17, 343 (1945)); in thermoelectric form the Kelvin relation
 * Π(B) = T S(−B). Each off-diagonal comparison gives a difference with its
 * propagated standard uncertainty; significance is judged with Holm's
 * correction across all comparisons (Holm 1979) and smallness with two
 * one-sided tests against a margin (Schuirmann 1987). Requiring every
 * comparison to be equivalent is an intersection–union test, which needs no
 * multiplicity correction (Berger & Hsu, Stat. Sci. 11, 283 (1996)).
 */
import type { CoefficientsDataset } from "../../ingest/types.ts";
import { holm } from "../../stats/holm.ts";
import { tost } from "../../stats/tost.ts";
import { normalQuantile, normalTwoSidedP } from "../../stats/normal.ts";
import { studentTTwoSidedP } from "../../stats/studentT.ts";
import { SIGN_CONVENTION } from "../../physics/thermoelectric.ts";
import { fmt, numberOption, perDataset } from "../helpers.ts";
import { ROW_UNIT, type CheckContext, type CheckDefinition, type CheckResult, type Status, type TableSpec } from "../types.ts";
import type { PlotSpec, Series } from "../plotSpec.ts";
import { engineeringScale, groupBy, pointLabel, sortedBy, sweepAxisLabel } from "./points.ts";
import { fractionMarginOption, positiveOption } from "../options.ts";

/** One tested relation X = Y at one operating point. */
export interface Comparison {
  /** Indices of the rows (a: at B, b: at −B; equal at B = 0). */
  a: number;
  b: number;
  i: number;
  j: number;
  /** "L12(B) = L21(−B)" or "Π(B) = T S(−B)". */
  relation: string;
  /** Short series name for plots (the relation without the point). */
  family: string;
  x: number; // left side, SI
  y: number; // right side with its parity sign, SI
  ux: number | null;
  uy: number | null;
  difference: number; // x − y
  u: number | null; // standard uncertainty of the difference
  /** Scale of the pair: √(Ls_ii Ls_jj) (onsager) or √(L22/L11) (Kelvin form, volts); NaN when a diagonal is not positive. */
  scale: number;
  sweep: number;
}

export interface ComparisonResult extends Comparison {
  z: number | null;
  p: number | null;
  pHolm: number | null;
  rejected: boolean;
  normalised: number;
  normalisedU: number | null;
  marginAbs: number;
  tostP: number | null;
  interval: [number, number] | null;
  equivalent: boolean;
}

const sub = (i: number, j: number) => `${i + 1}${j + 1}`;

/**
 * A diagonal entry at +B against the same entry at −B: L_ii(B) = L_ii(−B), the case i = j of
 * Onsager–Casimir (ε_i² = 1, so every diagonal entry is even in the field whatever the parities).
 * In thermoelectric form the diagonal reads G(B) = G(−B) (L11 = G T at one temperature) and
 * L22(B) = L22(−B). The scale is √(L_ii(B) L_ii(−B)), the geometric mean of the two entries
 * compared (positive on both sides where positivity holds), so the margin is unit-free like the
 * off-diagonal one.
 */
function diagonalComparison(d: CoefficientsDataset, a: number, b: number, i: number): Comparison {
  const pa = d.points[a];
  const pb = d.points[b];
  const useG = d.form === "thermoelectric" && i === 0;
  const name = useG ? "G" : `L${sub(i, i)}`;
  const x = useG ? pa.inputs.values[0] : pa.L[i][i];
  const y = useG ? pb.inputs.values[0] : pb.L[i][i];
  const ux = useG ? (pa.inputs.u ? pa.inputs.u[0] : null) : pa.uL ? pa.uL[i][i] : null;
  const uy = useG ? (pb.inputs.u ? pb.inputs.u[0] : null) : pb.uL ? pb.uL[i][i] : null;
  const family = `${name}(B) = ${name}(−B)`;
  return {
    a, b, i, j: i, relation: family, family, x, y, ux, uy,
    difference: x - y,
    u: ux !== null && uy !== null ? Math.hypot(ux, uy) : null,
    scale: x > 0 && y > 0 ? Math.sqrt(x * y) : Number.NaN,
    sweep: pa.sweep,
  };
}

/**
 * The comparisons a dataset supports: every entry, each +B row against its −B partner (the
 * diagonal included, L_ii even in B); at B = 0 a row is its own partner, where only the
 * off-diagonal entries say anything (the diagonal would be compared with itself).
 */
export function comparisonsOf(d: CoefficientsDataset): Comparison[] {
  const out: Comparison[] = [];
  for (const [a, b] of d.pairs) {
    const pa = d.points[a];
    const pb = d.points[b];
    const same = a === b;
    const T = (pa.T + pb.T) / 2;
    for (let i = 0; i < d.n; i++) {
      for (let j = 0; j < d.n; j++) {
        if (i === j && !same && !d.kelvinAssumed) out.push(diagonalComparison(d, a, b, i));
        if (i === j || (same && j < i)) continue;
        const eps = d.parity[i] * d.parity[j];
        const epsText = eps < 0 ? "−" : "";
        if (d.form === "thermoelectric") {
          // L12(B) = L21(−B) ⇔ T S(B) = Π(−B); L21(B) = L12(−B) ⇔ Π(B) = T S(−B) (G even in B).
          const S = 1; // input order G, S, Pi, K
          const Pi = 2;
          const ua = pa.inputs.u;
          const ub = pb.inputs.u;
          const leftIsPi = i === 1;
          const x = leftIsPi ? pa.inputs.values[Pi] : T * pa.inputs.values[S];
          const ux = ua ? (leftIsPi ? ua[Pi] : T * ua[S]) : null;
          const yRaw = leftIsPi ? T * pb.inputs.values[S] : pb.inputs.values[Pi];
          const uy = ub ? (leftIsPi ? T * ub[S] : ub[Pi]) : null;
          const y = eps * yRaw;
          const fieldA = same ? "" : "(B)";
          const fieldB = same ? "" : "(−B)";
          const family = leftIsPi ? `Π${fieldA} = ${epsText}T S${fieldB}` : `T S${fieldA} = ${epsText}Π${fieldB}`;
          const scale = (Math.sqrt(pa.L[1][1] / pa.L[0][0]) + Math.sqrt(pb.L[1][1] / pb.L[0][0])) / 2;
          out.push({
            a, b, i, j, relation: family, family, x, y, ux, uy,
            difference: x - y,
            u: ux !== null && uy !== null ? Math.hypot(ux, uy) : null,
            scale: Number.isFinite(scale) ? scale : Number.NaN,
            sweep: pa.sweep,
          });
          continue;
        }
        const x = pa.L[i][j];
        const y = eps * pb.L[j][i];
        const ux = pa.uL ? pa.uL[i][j] : null;
        const uy = pb.uL ? pb.uL[j][i] : null;
        const rootScale = (p: typeof pa) => (p.L[i][i] > 0 && p.L[j][j] > 0 ? Math.sqrt(p.L[i][i] * p.L[j][j]) : Number.NaN);
        const family = same ? `L${sub(i, j)} = ${epsText}L${sub(j, i)}` : `L${sub(i, j)}(B) = ${epsText}L${sub(j, i)}(−B)`;
        out.push({
          a, b, i, j, relation: family, family, x, y, ux, uy,
          difference: x - y,
          u: ux !== null && uy !== null ? Math.hypot(ux, uy) : null,
          scale: (rootScale(pa) + rootScale(pb)) / 2,
          sweep: pa.sweep,
        });
      }
    }
  }
  return out;
}

/** z-test, Holm across the family, TOST against ±margin·scale for every comparison. */
export function testComparisons(cs: readonly Comparison[], alpha: number, confidence: number, margin: number, dof = Infinity): ComparisonResult[] {
  const withU = cs.map((c) => {
    if (c.u === null) return { z: null, p: null };
    if (c.u === 0) return { z: c.difference === 0 ? 0 : Math.sign(c.difference) * Infinity, p: c.difference === 0 ? 1 : 0 };
    const z = c.difference / c.u;
    // Known standard uncertainties: normal law; uncertainties estimated from few repeats: Student t with `dof`.
    return { z, p: dof === Infinity ? normalTwoSidedP(z) : studentTTwoSidedP(z, dof) };
  });
  const tested = withU.map((w, k) => ({ w, k })).filter((e) => e.w.p !== null);
  const h = holm(tested.map((e) => e.w.p as number), alpha);
  const adjusted = new Map<number, { p: number; rejected: boolean }>();
  tested.forEach((e, t) => adjusted.set(e.k, { p: h.adjusted[t], rejected: h.rejected[t] }));
  const eqAlpha = 1 - confidence;
  return cs.map((c, k) => {
    const marginAbs = margin * c.scale;
    const adj = adjusted.get(k);
    let tostP: number | null = null;
    let interval: [number, number] | null = null;
    let equivalent = false;
    if (c.u !== null && Number.isFinite(marginAbs) && marginAbs > 0) {
      const t = tost({ estimate: c.difference, se: c.u, lower: -marginAbs, upper: marginAbs, alpha: eqAlpha, df: dof });
      tostP = t.p;
      interval = t.interval;
      equivalent = t.equivalent;
    }
    return {
      ...c,
      z: withU[k].z,
      p: withU[k].p,
      pHolm: adj ? adj.p : null,
      rejected: adj ? adj.rejected : false,
      normalised: c.difference / c.scale,
      normalisedU: c.u !== null ? c.u / c.scale : null,
      marginAbs,
      tostP,
      interval,
      equivalent,
    };
  });
}

export interface ReciprocityDecision {
  status: Status;
  summary: string;
  reason?: string;
}

/**
 * Unit of an entry of Callen's charge–heat matrix (2×2) in SI: L11 = G T in
 * S K, L12 and L21 in A K, L22 in W K. With more than two fluxes the entries
 * are in SI, but which SI unit each has depends on fluxes the audit does not
 * name, so they are labelled "SI units" and never rescaled.
 */
const SI_UNITS = "SI units";
function entryUnit(d: CoefficientsDataset, i: number, j: number): string {
  if (d.n !== 2) return SI_UNITS;
  if (i === 0 && j === 0) return "S K";
  if (i === 1 && j === 1) return "W K";
  return "A K";
}

/** "0.28 mV" or "0.21–0.35 mV": the range of a scale over the compared points, with a readable prefix. */
function valueRange(values: readonly number[], unit: string): string {
  const finite = values.filter(Number.isFinite);
  if (finite.length === 0) return "undefined (a diagonal entry is not positive)";
  const lo = Math.min(...finite);
  const hi = Math.max(...finite);
  const { factor, prefix } = unit === SI_UNITS ? { factor: 1, prefix: "" } : engineeringScale([lo, hi]);
  const u = unit === SI_UNITS ? " (SI units)" : ` ${prefix}${unit}`;
  return hi - lo <= 0.005 * Math.abs(hi) ? `${fmt(hi * factor, 3)}${u}` : `${fmt(lo * factor, 3)}–${fmt(hi * factor, 3)}${u}`;
}

/** A family of relations that shares one scale rule: the Kelvin pair, an off-diagonal pair {i, j}, or a diagonal entry. */
interface ScaleGroup {
  relations: string[];
  /** "√(L22/L11)", "√(Ls_11 Ls_22)", "√(G(B) G(−B))". */
  scaleName: string;
  unit: string;
  results: ComparisonResult[];
}

function scaleGroups(d: CoefficientsDataset, results: readonly ComparisonResult[]): ScaleGroup[] {
  const groups = new Map<string, ScaleGroup>();
  for (const r of results) {
    const diagonal = r.i === r.j;
    const kelvin = d.form === "thermoelectric" && !diagonal;
    const key = diagonal ? `d${r.i}` : kelvin ? "kelvin" : `o${Math.min(r.i, r.j)}${Math.max(r.i, r.j)}`;
    let g = groups.get(key);
    if (!g) {
      const name = diagonal ? (d.form === "thermoelectric" && r.i === 0 ? "G" : `L${sub(r.i, r.i)}`) : "";
      g = {
        relations: [],
        scaleName: diagonal ? `√(${name}(B) ${name}(−B))` : kelvin ? "√(L22/L11)" : `√(Ls_${sub(r.i, r.i)} Ls_${sub(r.j, r.j)})`,
        unit: diagonal ? (name === "G" ? "S" : entryUnit(d, r.i, r.i)) : kelvin ? "V" : entryUnit(d, r.i, r.j),
        results: [],
      };
      groups.set(key, g);
    }
    if (!g.relations.includes(r.family)) g.relations.push(r.family);
    g.results.push(r);
  }
  return [...groups.values()];
}

/** "Π = T S within 5 % of √(L22/L11) = 0.28 mV": each tested relation with its margin in words and numbers. */
export function marginPhrases(d: CoefficientsDataset, results: readonly ComparisonResult[], margin: number): string[] {
  return scaleGroups(d, results).map(
    (g) => `${g.relations.join(" and ")} within ${fmt(margin * 100)} % of ${g.scaleName} = ${valueRange(g.results.map((r) => r.scale), g.unit)}`,
  );
}

/** The scale of one comparison in words: "√(L22/L11) = 0.28 mV". */
function scaleOf(d: CoefficientsDataset, r: ComparisonResult): string {
  const g = scaleGroups(d, [r])[0];
  return `${g.scaleName} = ${valueRange([r.scale], g.unit)}`;
}

/** Rows compared with themselves (B = 0, or no field column): the diagonal is not tested there, and why. */
function selfPairedNote(d: CoefficientsDataset): string {
  const self = d.pairs.filter(([a, b]) => a === b).length;
  if (self === 0) return "";
  const where = d.hasField ? `at the ${self} row${self === 1 ? "" : "s"} with B = 0` : "without a field column (every row at B = 0)";
  return ` The diagonal entries ${where} are paired with themselves, so their evenness in B is trivially true and not tested there.`;
}

/** The verdict from the tested comparisons and the pairing findings (physics §6). */
export function decideReciprocity(
  d: CoefficientsDataset,
  results: readonly ComparisonResult[],
  alpha: number,
  confidence: number,
  margin: number,
): ReciprocityDecision {
  const where = (r: ComparisonResult) => `${pointLabel(d, d.points[r.a])}: ${r.relation}`;
  const blocking = d.findings.filter((f) => f.kind !== "temperature-mismatch" && !(f.kind === "duplicate" && (f.B === null || f.B === 0)));
  const law = d.form === "thermoelectric" ? (d.hasField ? "Onsager–Casimir reciprocity in Kelvin form" : "the Kelvin relation Π = T S") : d.hasField ? "Onsager–Casimir reciprocity" : "Onsager reciprocity";
  const Law = `${law[0].toUpperCase()}${law.slice(1)}`;
  const pct = `${fmt(margin * 100)} %`;
  const selfNote = selfPairedNote(d);
  if (results.length === 0) {
    return {
      status: "inconclusive",
      summary: `No pair of rows could be compared, so ${law} is untested.${selfNote}`,
      reason: `Every row lacks a partner at the reversed field (${blocking.length} pairing finding(s)); measure each operating point at both +B and −B.`,
    };
  }
  const phrases = marginPhrases(d, results, margin);
  if (!d.hasUncertainties) {
    const worst = results.reduce((m, r) => (Math.abs(r.normalised) > Math.abs(m.normalised) ? r : m), results[0]);
    return {
      status: "inconclusive",
      summary: `${results.length} comparisons of ${law}; the largest normalised asymmetry is ${fmt(worst.normalised, 3)} of ${scaleOf(d, worst)} at ${where(worst)}, but the table gives no standard uncertainties.${selfNote}`,
      reason: `Without u_ columns no difference can be called significant, nor small enough to exclude a violation of ${pct} of its scale (${phrases.join("; ")}); add a standard uncertainty for every coefficient (u_${d.form === "thermoelectric" ? "G, u_S, u_Pi, u_K" : "L11, u_L12, …"}).`,
    };
  }
  const rejected = results.filter((r) => r.rejected);
  if (rejected.length > 0) {
    const worst = rejected.reduce((m, r) => ((r.pHolm as number) < (m.pHolm as number) ? r : m), rejected[0]);
    const families = [...new Set(rejected.map((r) => r.family))];
    return {
      status: "fail",
      summary: `${Law} is violated: ${rejected.length} of ${results.length} comparisons differ significantly after Holm's correction (${families.join(", ")}); the strongest at ${where(worst)}, difference ${fmt(worst.normalised, 3)} of ${scaleOf(d, worst)}, z = ${fmt(worst.z as number, 3)}, Holm-adjusted p = ${fmt(worst.pHolm as number, 3)} < α = ${alpha}.${selfNote}`,
    };
  }
  const lacking = results.filter((r) => !r.equivalent);
  if (lacking.length === 0 && blocking.length === 0) {
    const maxNorm = Math.max(...results.map((r) => Math.abs(r.normalised)));
    return {
      status: "pass",
      summary: `${Law} holds at every one of ${results.length} comparisons (two one-sided tests at ${confidence * 100} % confidence): ${phrases.join("; ")}; the largest normalised asymmetry is ${fmt(maxNorm, 3)}.${selfNote}`,
    };
  }
  const zq = normalQuantile(confidence);
  const describe = (r: ComparisonResult): string => {
    if (!Number.isFinite(r.marginAbs)) return `${where(r)} (no scale: a diagonal entry is not positive)`;
    const room = r.marginAbs - Math.abs(r.difference);
    if (room <= 0) return `${where(r)} (asymmetry ${fmt(r.normalised, 3)} exceeds the margin ±${margin})`;
    const factor = ((r.u as number) * zq) / room;
    return `${where(r)} (uncertainty ${fmt(factor, 2)}× too large: about ${fmt(Math.ceil(factor * factor * 10) / 10, 2)}× as many repeats averaged)`;
  };
  const parts: string[] = [];
  if (lacking.length > 0) {
    const shown = lacking.slice(0, 6).map(describe).join("; ");
    parts.push(`${lacking.length} of ${results.length} comparisons cannot exclude an asymmetry of ${pct} of their scale: ${shown}${lacking.length > 6 ? "; …" : ""}. Smaller uncertainties at these points (more averaging; the uncertainty falls as one over the square root of the number of repeats) would settle them.`);
  }
  if (blocking.length > 0) {
    parts.push(`Reciprocity is untested where rows are unpaired or duplicated: ${blocking.map((f) => `row${f.rows.length > 1 ? "s" : ""} ${f.rows.join(", ")}`).join("; ")}.`);
  }
  return {
    status: "inconclusive",
    summary: `No significant violation of ${law} among ${results.length} comparisons (smallest Holm-adjusted p = ${fmt(Math.min(...results.map((r) => r.pHolm ?? 1)), 3)}), but equivalence is not established everywhere (margins: ${phrases.join("; ")}).${selfNote}`,
    reason: parts.join(" "),
  };
}

function identityPlot(d: CoefficientsDataset, results: readonly ComparisonResult[]): PlotSpec {
  const kelvin = d.form === "thermoelectric";
  const twoByTwo = d.n === 2;
  // Onsager n > 2 mixes entries of different units: plot them normalised by their scale.
  const norm = !kelvin && !twoByTwo;
  const val = (r: ComparisonResult, v: number) => (norm ? v / r.scale : v);
  const all = results.flatMap((r) => [val(r, r.x), val(r, r.y)]);
  const { factor, prefix } = norm ? { factor: 1, prefix: "" } : engineeringScale(all);
  const unit = norm ? undefined : kelvin ? `${prefix}V` : `${prefix}A K`;
  const series: Series[] = [];
  for (const [family, rs] of groupBy(results, (r) => r.family)) {
    series.push({
      type: "points",
      name: family,
      x: rs.map((r) => val(r, r.y) * factor),
      y: rs.map((r) => val(r, r.x) * factor),
      ...(d.hasUncertainties ? { xErr: rs.map((r) => val(r, r.uy as number) * factor), yErr: rs.map((r) => val(r, r.ux as number) * factor) } : {}),
    });
  }
  const lo = Math.min(...all) * factor;
  const hi = Math.max(...all) * factor;
  series.push({ type: "line", name: "identity (reciprocity)", x: [lo, hi], y: [lo, hi], style: "dashed" });
  const [xl, yl] = kelvin ? ["T S at the reversed field", "Π at the field"] : norm ? ["ε L_ji(−B)/√(Ls_ii Ls_jj)", "L_ij(B)/√(Ls_ii Ls_jj)"] : ["L21(−B)", "L12(B)"];
  return {
    id: "reciprocity-identity",
    title: kelvin ? "Kelvin relation: Π(B) against T S(−B)" : "Reciprocity: L_ij(B) against L_ji(−B)",
    alt: `Each marker is one comparison (${results.length} in all) with ${d.hasUncertainties ? "standard-uncertainty error bars" : "no error bars (no uncertainties given)"}; reciprocity puts every marker on the dashed identity line.`,
    x: { label: xl, ...(unit ? { unit } : {}) },
    y: { label: yl, ...(unit ? { unit } : {}) },
    series,
  };
}

function asymmetryPlot(d: CoefficientsDataset, results: readonly ComparisonResult[], margin: number, confidence: number): PlotSpec {
  const series: Series[] = [];
  const level = Math.round((1 - 2 * (1 - confidence)) * 100);
  if (d.hasUncertainties) {
    // One band: at each sweep value the envelope of the equivalence-test intervals of every comparison there,
    // so the picture reads "all intervals inside the margins" at a glance without one band per relation.
    const bySweep = groupBy(results, (r) => String(r.sweep));
    const xs = [...bySweep.values()].map((rs) => rs[0].sweep);
    const order = sortedBy(xs);
    const groups = [...bySweep.values()];
    series.push({
      type: "band",
      name: `${level} % intervals (envelope over the relations)`,
      x: order.map((k) => xs[k]),
      lower: order.map((k) => Math.min(...groups[k].map((r) => (r.interval ? r.interval[0] / r.scale : r.normalised)))),
      upper: order.map((k) => Math.max(...groups[k].map((r) => (r.interval ? r.interval[1] / r.scale : r.normalised)))),
    });
  }
  const familyOf = (r: ComparisonResult) => {
    const B = d.points[r.a].B;
    return B !== null && B !== 0 ? `${r.family} at |B| = ${fmt(Math.abs(B))} ${d.fieldUnit}` : r.family;
  };
  for (const [family, rs] of groupBy(results, familyOf)) {
    const s = sortedBy(rs.map((r) => r.sweep)).map((k) => rs[k]);
    series.push({ type: "points", name: family, x: s.map((r) => r.sweep), y: s.map((r) => r.normalised) });
  }
  series.push({ type: "rule", name: `margin +${margin}`, axis: "y", value: margin, style: "dashed" });
  series.push({ type: "rule", name: `margin −${margin}`, axis: "y", value: -margin, style: "dashed" });
  series.push({ type: "rule", name: "reciprocity", axis: "y", value: 0, style: "dotted" });
  return {
    id: "reciprocity-asymmetry",
    title: "Normalised asymmetry across the sweep",
    alt: `The difference of each compared pair divided by its scale √(Ls_ii Ls_jj), against ${sweepAxisLabel(d)}${d.hasUncertainties ? `, with the envelope of the ${level} % intervals used by the equivalence test` : ""}; reciprocity is established where the intervals lie between the dashed margins ±${margin}.`,
    x: { label: sweepAxisLabel(d) },
    y: { label: "Normalised asymmetry (dimensionless)" },
    series,
  };
}

function comparisonTable(d: CoefficientsDataset, results: readonly ComparisonResult[]): TableSpec {
  const kelvin = d.form === "thermoelectric";
  // Kelvin form: volts with one readable prefix. Onsager form: each row in its entries' unit (A K for two fluxes), so
  // the report gives every row its own prefix; with more fluxes the unit is not known and the numbers are not rescaled.
  const { factor, prefix } = kelvin ? engineeringScale(results.flatMap((r) => [r.x, r.y])) : { factor: 1, prefix: "" };
  const unit = kelvin ? `${prefix}V` : ROW_UNIT;
  return {
    id: "comparisons",
    title: kelvin ? "Kelvin relation at each operating point" : "Reciprocity at each operating point",
    columns: [
      { key: "point", label: "Operating point" },
      { key: "relation", label: "Relation" },
      { key: "x", label: "Left side", unit },
      { key: "y", label: "Right side", unit },
      ...(kelvin ? [] : [{ key: "unit", label: "Unit" }]),
      { key: "u", label: "u(difference)", unit },
      { key: "normalised", label: "Asymmetry / scale", unit: "1" },
      { key: "z", label: "z" },
      { key: "p_holm", label: "Holm p" },
      { key: "tost_p", label: "TOST p" },
      { key: "equivalent", label: "Within margin" },
    ],
    rows: results.map((r) => ({
      point: pointLabel(d, d.points[r.a]),
      relation: r.relation,
      x: r.x * factor,
      y: r.y * factor,
      ...(kelvin ? {} : { unit: entryUnit(d, r.i, r.j) }),
      u: r.u === null ? null : r.u * factor,
      normalised: r.normalised,
      z: r.z,
      p_holm: r.pHolm,
      tost_p: r.tostP,
      equivalent: r.equivalent,
    })),
  };
}

function diagonalTable(d: CoefficientsDataset, results: readonly ComparisonResult[]): TableSpec {
  return {
    id: "diagonal",
    title: "Diagonal entries at +B and −B (even in the field)",
    columns: [
      { key: "point", label: "Operating point" },
      { key: "relation", label: "Relation" },
      { key: "x", label: "At +B", unit: ROW_UNIT },
      { key: "y", label: "At −B", unit: ROW_UNIT },
      { key: "unit", label: "Unit" },
      { key: "u", label: "u(difference)", unit: ROW_UNIT },
      { key: "normalised", label: "Asymmetry / scale", unit: "1" },
      { key: "z", label: "z" },
      { key: "p_holm", label: "Holm p" },
      { key: "tost_p", label: "TOST p" },
      { key: "equivalent", label: "Within margin" },
    ],
    rows: results.map((r) => ({
      point: pointLabel(d, d.points[r.a]),
      relation: r.relation,
      x: r.x,
      y: r.y,
      unit: d.form === "thermoelectric" && r.i === 0 ? "S" : entryUnit(d, r.i, r.i),
      u: r.u,
      normalised: r.normalised,
      z: r.z,
      p_holm: r.pHolm,
      tost_p: r.tostP,
      equivalent: r.equivalent,
    })),
  };
}

const REFERENCES = [
  "L. Onsager, Phys. Rev. 37, 405 (1931)",
  "H. B. G. Casimir, Rev. Mod. Phys. 17, 343 (1945)",
  "H. B. Callen, Phys. Rev. 73, 1349 (1948)",
  "S. Holm, Scand. J. Stat. 6, 65 (1979)",
  "D. J. Schuirmann, J. Pharmacokinet. Biopharm. 15, 657 (1987)",
  "R. L. Berger and J. C. Hsu, Stat. Sci. 11, 283 (1996)",
];

export function reciprocityForDataset(d: CoefficientsDataset, ctx: CheckContext): CheckResult {
  const { alpha, confidence } = ctx.settings;
  const margin = numberOption(ctx, "margin", ctx.settings.margin, (v) => v > 0 && v < 1);
  // Degrees of freedom of the stated uncertainties (option `dof`); default: known standard uncertainties.
  const dof = numberOption(ctx, "dof", Infinity, (v) => v > 0);
  const base = {
    check: "reciprocity" as const,
    dataset: d.id,
    criteria: { alpha, margin, confidence },
    references: REFERENCES,
  };
  const equations =
    d.form === "thermoelectric"
      ? [
          String.raw`\Pi(B) = T\,S(-B) \qquad \Longleftrightarrow \qquad L_{21}(B) = L_{12}(-B)`,
          String.raw`G(B) = G(-B), \qquad L_{22}(B) = L_{22}(-B)`,
          String.raw`L_{12} = G S T^2, \qquad L_{21} = G \Pi T, \qquad L_{22} = T^2 (K + G S \Pi)`,
        ]
      : [String.raw`L_{ij}(B) = \varepsilon_i \varepsilon_j\, L_{ji}(-B) \quad \text{for all } i, j \text{ (the diagonal: } L_{ii}(B) = L_{ii}(-B))`];
  equations.push(
    String.raw`z = \frac{X - Y}{\sqrt{u_X^2 + u_Y^2}}, \qquad \text{margin: } |X - Y| < m \sqrt{L^{s}_{ii} L^{s}_{jj}} \;(i \ne j), \qquad |X - Y| < m \sqrt{L_{ii}(B)\, L_{ii}(-B)}`,
  );
  if (d.kelvinAssumed) {
    return {
      ...base,
      status: "not-applicable",
      summary: "Not applicable: the table has no Pi column, so Π was derived from the Kelvin relation and cannot test it.",
      reason: "Add the measured Peltier coefficient (column Pi, with u_Pi) to test the Kelvin relation Π(B) = T S(−B).",
      values: { pairs: 0, max_abs_z: null, p_value: null },
      assumptions: [],
      equations,
      tables: [],
      plots: [],
    };
  }
  const results = testComparisons(comparisonsOf(d), alpha, confidence, margin, dof);
  const decision = decideReciprocity(d, results, alpha, confidence, margin);
  const diagonal = results.filter((r) => r.i === r.j);
  const offDiagonal = results.filter((r) => r.i !== r.j);
  const zs = results.map((r) => r.z).filter((z): z is number => z !== null);
  const ps = results.map((r) => r.pHolm).filter((p): p is number => p !== null);
  const parityText = d.parity.every((e) => e === 1) ? "every flux even under time reversal (ε = +1: charge and heat)" : `time-reversal parities ε = (${d.parity.join(", ")}) as declared`;
  const assumptions = [
    `Linear response: the coefficients describe currents linear in the forces ΔV/T and ΔT/T² (Callen's charge–heat form), with ${parityText}.`,
    d.hasField
      ? `Rows at +B are paired with the row at −B of the same operating point (${d.config.point.length ? d.config.point.join(", ") : "no point columns: all rows at one point"}); rows at B = 0 are compared with themselves.`
      : "No field column: every row is taken at zero magnetic field (time-reversal symmetric), so L_ij = L_ji at each row.",
    dof === Infinity
      ? "The standard uncertainties of different entries are independent (no covariance columns) and known: differences are referred to the normal law."
      : `The standard uncertainties of different entries are independent (no covariance columns) and carry ${dof} degrees of freedom: differences are referred to Student's t.`,
    d.form === "thermoelectric"
      ? `The scale of a Kelvin pair is √(Ls_11 Ls_22) of the symmetric part (the largest off-diagonal entry positivity allows), expressed in volts as √(L22/L11) by dividing by G T, averaged over the two rows; the scale of a diagonal entry is the geometric mean of the two values compared, √(G(B) G(−B)) or √(L22(B) L22(−B)); the margin is ${margin} of the scale.`
      : `The scale of an off-diagonal pair is √(Ls_ii Ls_jj) of the symmetric part (the largest off-diagonal entry positivity allows), averaged over the two rows; the scale of a diagonal entry is the geometric mean of the two values compared, √(L_ii(B) L_ii(−B)); the margin is ${margin} of the scale.`,
    "Every compared entry, the diagonal included, is one member of a single Holm family (Holm 1979); a pass needs every member equivalent within its margin (two one-sided tests, Schuirmann 1987).",
  ];
  if (d.form === "thermoelectric") {
    assumptions.push(
      d.hasField
        ? "The conductance's evenness in the field, G(B) = G(−B), is tested beside the Kelvin pair; where it holds, L21(B) = L12(−B) reduces to Π(B) = T S(−B)."
        : "At zero field L21 = L12 is the Kelvin relation Π = T S.",
    );
    assumptions.push(SIGN_CONVENTION);
  }
  for (const f of d.findings) assumptions.push(`Pairing: ${f.message}.`);
  return {
    ...base,
    status: decision.status,
    summary: decision.summary,
    ...(decision.reason ? { reason: decision.reason } : {}),
    values: {
      max_abs_z: zs.length ? Math.max(...zs.map(Math.abs)) : null,
      p_value: ps.length ? Math.min(...ps) : null,
      pairs: results.length,
      diagonal_pairs: diagonal.length,
      tested_relations: [...new Set(results.map((r) => r.family))],
      margins: marginPhrases(d, results, margin),
      form: d.form,
      relation: d.form === "thermoelectric" ? "Pi(B) = T S(-B)" : "L_ij(B) = eps_i eps_j L_ji(-B)",
      max_abs_normalised_asymmetry: results.length ? Math.max(...results.map((r) => Math.abs(r.normalised))) : null,
      unpaired_rows: d.findings.filter((f) => f.kind === "unpaired").flatMap((f) => f.rows),
      duplicate_rows: d.findings.filter((f) => f.kind === "duplicate").flatMap((f) => f.rows),
      comparisons: results.map((r) => ({
        point: d.points[r.a].point,
        B: d.points[r.a].B,
        rows: r.a === r.b ? [d.points[r.a].row] : [d.points[r.a].row, d.points[r.b].row],
        relation: r.relation,
        left: r.x,
        right: r.y,
        difference: r.difference,
        u: r.u,
        z: r.z,
        p: r.p,
        p_holm: r.pHolm,
        normalised: r.normalised,
        normalised_u: r.normalisedU,
        margin: r.marginAbs,
        tost_p: r.tostP,
        equivalent: r.equivalent,
      })),
    },
    assumptions,
    equations,
    tables: [...(offDiagonal.length ? [comparisonTable(d, offDiagonal)] : []), ...(diagonal.length ? [diagonalTable(d, diagonal)] : [])],
    plots: results.length ? [...(offDiagonal.length ? [identityPlot(d, offDiagonal)] : []), asymmetryPlot(d, results, margin, confidence)] : [],
  };
}

export const reciprocity: CheckDefinition = {
  id: "reciprocity",
  title: "Reciprocity: Onsager–Casimir relations and the Kelvin relation",
  verdictBearing: true,
  options: { margin: fractionMarginOption, dof: positiveOption },
  run: perDataset("coefficients", reciprocityForDataset),
};
