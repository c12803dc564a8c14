import type { TraceDataset } from "../../ingest/types.ts";
import { chiSquareQuantile } from "../../stats/chiSquare.ts";
import { normalQuantile } from "../../stats/normal.ts";
import { solve } from "../../linalg/solve.ts";
import { datasetsOfKind, fmt, fmtInterval, unresolvedLeadReason } from "../helpers.ts";
import type { CheckContext, CheckDefinition, CheckResult } from "../types.ts";
import { dwellSurvivalPlot } from "./dwellPlot.ts";

/**
 * What a detector trace determines when it does not show which lead each
 * particle used (a charge sensor beside a single dot): the rate of every jump
 * x → y, the conductor's occupations, its dwell times and the events the
 * detector misses. Information, no verdict: there is no law of these alone.
 *
 * Rates: the likelihood of a Markov record is Π Γ_{xy}^{N_{xy}} e^{−Γ_{xy} T_x}
 * (T_x the time spent in x), so Γ̂_{xy} = N_{xy}/T_x (Albert, Ann. Math. Stat.
 * 33, 727 (1962); from memory). Counted on the clock of the time spent in x,
 * the jumps x → y form a Poisson process of rate Γ_{xy} (strong Markov
 * property), so the exact Poisson interval for a count over an exposure
 * (Garwood, Biometrika 28, 437 (1936)) applies, with T_x as the exposure:
 *   [χ²_{2N}(α/2) / 2T_x, χ²_{2N+2}(1 − α/2) / 2T_x].
 * Occupations: the fraction of the record spent in each state, and the
 * stationary distribution of the estimated rates (for a single level
 * p(1) = Γ_in/(Γ_in + Γ_out); Bagrets & Nazarov, PRB 67, 085316 (2003)), with
 * a delta-method uncertainty from Var(Γ̂_{xy}) ≈ Γ̂_{xy}²/N_{xy}.
 */
const REFERENCES = [
  "A. Albert, Ann. Math. Stat. 33, 727 (1962)",
  "F. Garwood, Biometrika 28, 437 (1936)",
  "D. A. Bagrets and Yu. V. Nazarov, Phys. Rev. B 67, 085316 (2003)",
  "S. Gustavsson, R. Leturcq, B. Simovič, R. Schleser, T. Ihn, P. Studerus, K. Ensslin, D. C. Driscoll and A. C. Gossard, Phys. Rev. Lett. 96, 076605 (2006)",
];

const EQUATIONS = [
  String.raw`\hat\Gamma_{x\to y} = \frac{N_{x\to y}}{T_x}, \qquad \Gamma_{x\to y} \in \left[\frac{\chi^2_{2N}(\alpha/2)}{2T_x},\ \frac{\chi^2_{2N+2}(1-\alpha/2)}{2T_x}\right]`,
  String.raw`\sum_x p(x)\, \Gamma_{x\to y} = p(y) \sum_{z} \Gamma_{y\to z}, \qquad p(1) = \frac{\Gamma_{\text{in}}}{\Gamma_{\text{in}} + \Gamma_{\text{out}}}\ \text{(single level)}`,
];

export interface JumpRate {
  from: number;
  to: number;
  jumps: number;
  /** Time spent in `from`, s. */
  exposure: number;
  /** 1/s */
  rate: number;
  interval: [number, number];
}

/** Rate of each observed jump with its exact Poisson interval at `confidence`. */
export function jumpRates(d: Pick<TraceDataset, "states">, confidence: number): JumpRate[] {
  const tail = (1 - confidence) / 2;
  // A state never held for a measurable time (a record whose time stamps coincide) gives no rate.
  return d.states.flatMap((s) =>
    !(s.time > 0) ? [] : s.exits.map(({ to, count }) => ({
      from: s.label,
      to,
      jumps: count,
      exposure: s.time,
      rate: count / s.time,
      interval: [count > 0 ? chiSquareQuantile(tail, 2 * count) / (2 * s.time) : 0, chiSquareQuantile(1 - tail, 2 * count + 2) / (2 * s.time)] as [number, number],
    })),
  );
}

/** Stationary distribution of the generator with these rates over `labels`: π G = 0, Σ π = 1 (null when singular). */
export function stationaryOfRates(labels: number[], rates: { from: number; to: number; rate: number }[]): number[] | null {
  const K = labels.length;
  const at = new Map(labels.map((l, k) => [l, k]));
  // Rows of Gᵀ for states 1 … K−1 (the balance of state y), the last row the normalisation.
  const a = Array.from({ length: K }, () => new Array<number>(K).fill(0));
  for (const r of rates) {
    const x = at.get(r.from)!;
    const y = at.get(r.to)!;
    a[y][x] += r.rate;
    a[x][x] -= r.rate;
  }
  a[K - 1] = new Array<number>(K).fill(1);
  const b = new Array<number>(K).fill(0);
  b[K - 1] = 1;
  try {
    const p = solve(a, b);
    return p.every(Number.isFinite) ? p : null;
  } catch {
    return null;
  }
}

/** Standard uncertainty of each stationary probability by the delta method, Var(Γ̂) = Γ̂²/N per rate, rates independent. */
function stationaryUncertainty(labels: number[], rates: JumpRate[], p: number[]): number[] {
  const variance = new Array<number>(p.length).fill(0);
  rates.forEach((r, k) => {
    if (r.jumps === 0) return;
    // Central difference in Γ_k, relative step 1e-6: the stationary law is a smooth rational function of the rates.
    const h = 1e-6 * r.rate;
    const shifted = (sign: number) => stationaryOfRates(labels, rates.map((q, j) => ({ ...q, rate: j === k ? q.rate + sign * h : q.rate })));
    const up = shifted(1);
    const down = shifted(-1);
    if (!up || !down) return;
    const u2 = (r.rate * r.rate) / r.jumps;
    for (let x = 0; x < p.length; x++) variance[x] += ((up[x] - down[x]) / (2 * h)) ** 2 * u2;
  });
  return variance.map(Math.sqrt);
}

export function tunnellingRatesForTrace(d: TraceDataset, ctx: CheckContext): CheckResult {
  const { confidence } = ctx.settings;
  const rates = jumpRates(d, confidence);
  const labels = d.states.map((s) => s.label);
  const fromRates = stationaryOfRates(labels, rates);
  const u = fromRates ? stationaryUncertainty(labels, rates, fromRates) : null;
  const z = normalQuantile(1 - (1 - confidence) / 2);
  const unresolved = new Set(d.unresolved);
  const rows = rates.map((r) => ({
    jump: `${r.from} → ${r.to}`,
    lead: unresolved.has(`${r.from} → ${r.to}`) ? "unresolved" : "as declared",
    jumps: r.jumps,
    exposure: r.exposure,
    rate: r.rate,
    low: r.interval[0],
    high: r.interval[1],
  }));
  const detected = new Map(d.detection.states.map((s) => [s.label, s]));
  const occupation = d.states.map((s, k) => ({
    state: s.label,
    time_fraction: s.time / d.duration,
    from_rates: fromRates ? fromRates[k] : null,
    u_from_rates: u ? u[k] : null,
    stays: s.dwells.length,
    mean_dwell: detected.get(s.label)?.meanDwell ?? null,
    short_stays: detected.get(s.label)?.short ?? null,
    missed_fraction: detected.get(s.label)?.missedFraction ?? null,
  }));
  const rateText = rates.map((r) => `Γ(${r.from} → ${r.to}) = ${fmt(r.rate, 3)} 1/s ${fmtInterval(r.interval[0], r.interval[1], 3)}`).join(", ");
  const occText = fromRates
    ? occupation.map((o) => `p(${o.state}) = ${fmt(o.from_rates!, 4)} ± ${fmt(z * o.u_from_rates!, 2)}`).join(", ")
    : "not determined (the estimated rates connect no single stationary state)";
  const jumpCount = rates.reduce((a, r) => a + r.jumps, 0);
  return {
    check: "tunnelling-rates",
    dataset: d.id,
    status: "info",
    summary: `From ${jumpCount} jumps over ${fmt(d.duration, 3)} s: ${rateText} (${Math.round(100 * confidence)} % intervals); stationary occupation from the rates ${occText}. Which lead each electron used is not recorded (${d.unresolved.join(", ")}), so no law of the exchanged particles and energy is tested on this trace.`,
    values: {
      duration: d.duration,
      rates: rates.map((r) => ({ from: r.from, to: r.to, jumps: r.jumps, exposure: r.exposure, rate: r.rate, rate_ci: r.interval })),
      occupation,
      unresolved_jumps: d.unresolved,
      missing: unresolvedLeadReason(d),
    },
    criteria: { confidence },
    assumptions: [
      "The conductor is Markovian: each stay in a state is exponential and its end independent of the past, so the jumps x → y counted on the time spent in x form a Poisson process.",
      "The detector records every jump; a missed short stay removes two jumps and lowers the rates out of the states around it.",
      "The occupation from the rates is the stationary one; the time fraction equals it for a record long against the dwell times.",
      d.detection.sentence,
      ...(d.config.windows ? [`The declared windows (${d.config.windows.join(", ")} ${d.config.time_unit}) were not cut: no window's per-lead transfers are known.`] : []),
    ],
    references: REFERENCES,
    equations: EQUATIONS,
    tables: [
      {
        id: "tunnelling-rates",
        title: "Rates of the jumps in the trace",
        columns: [
          { key: "jump", label: "Jump" },
          { key: "lead", label: "Lead" },
          { key: "jumps", label: "Jumps" },
          { key: "exposure", label: "Time in the starting state", unit: "s" },
          { key: "rate", label: "Rate", unit: "1/s" },
          { key: "low", label: "Interval low", unit: "1/s" },
          { key: "high", label: "Interval high", unit: "1/s" },
        ],
        rows,
      },
      {
        id: "occupation",
        title: "Occupation and dwell times",
        columns: [
          { key: "state", label: "State" },
          { key: "time_fraction", label: "Fraction of the record" },
          { key: "from_rates", label: "Stationary, from the rates" },
          { key: "u_from_rates", label: "u (from the rates)" },
          { key: "stays", label: "Complete stays" },
          { key: "mean_dwell", label: "Mean dwell", unit: "s" },
          { key: "short_stays", label: "Stays shorter than 1/bandwidth" },
          { key: "missed_fraction", label: "Expected missed fraction" },
        ],
        rows: occupation,
      },
    ],
    plots: [dwellSurvivalPlot(d, rates)].filter((p) => p !== null),
  };
}

export const tunnellingRates: CheckDefinition = {
  id: "tunnelling-rates",
  title: "Tunnelling rates and occupations of a trace (information)",
  verdictBearing: false,
  options: {},
  run: (audit, ctx) => datasetsOfKind(audit, "trace").map((d) => tunnellingRatesForTrace(d, ctx)),
};
