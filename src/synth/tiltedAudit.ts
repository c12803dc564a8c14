import { synthAuditYamlHeader, type SynthAudit } from "./auditFolder.ts";
import { columnsToCsv } from "./csv.ts";
import { parseParameters, type SynthParameter } from "./parameters.ts";
import { sampleTilted, tiltedExponentialMean, tiltedMoments, type TiltedFamily } from "./tiltedFamily.ts";
import { betaPerMeV } from "./units.ts";
import { rngFromText } from "../stats/rng.ts";

export const TILTED_REFERENCES = [
  "Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11, 043014 (2009): exchange fluctuation relation",
  "Shirts, Bair, Hooker & Pande, Phys. Rev. Lett. 91, 140601 (2003): the logistic form of the relation",
  "Skellam, J. R. Stat. Soc. 109, 296 (1946): difference of Poisson variables",
];

export const TILTED_PARAMETERS: SynthParameter[] = [
  { name: "temperature-a", unit: "K", description: "declared temperature of reservoir A (written to audit.yaml)", default: "1.3", type: "number", min: 0, minExclusive: true },
  { name: "temperature-b", unit: "K", description: "declared temperature of reservoir B", default: "1", type: "number", min: 0, minExclusive: true },
  { name: "mu-a", unit: "meV", description: "declared chemical potential of A", default: "0.01", type: "number" },
  { name: "mu-b", unit: "meV", description: "declared chemical potential of B", default: "0", type: "number" },
  { name: "draw-temperature-a", unit: "K", description: "temperature of A the data are drawn at (default: the declared one)", default: "", type: "text" },
  { name: "draw-temperature-b", unit: "K", description: "temperature of B the data are drawn at (default: the declared one)", default: "", type: "text" },
  { name: "draw-mu-a", unit: "meV", description: "chemical potential of A the data are drawn at (default: the declared one)", default: "", type: "text" },
  { name: "draw-mu-b", unit: "meV", description: "chemical potential of B the data are drawn at (default: the declared one)", default: "", type: "text" },
  { name: "work-spread", unit: "meV", description: "standard deviation of the work W (0: no work column, work: zero)", default: "0.05", type: "number", min: 0 },
  { name: "heat-spread", unit: "meV", description: "standard deviation of the heat Q", default: "0.3", type: "number", min: 0, minExclusive: true },
  { name: "correlation", unit: "", description: "correlation of W and Q in the base law", default: "0", type: "number", min: -0.99, max: 0.99 },
  { name: "intensity", unit: "", description: "Skellam intensity of the untilted particle law (0: dN ≡ 0)", default: "1.5", type: "number", min: 0 },
  { name: "samples", unit: "realisations", description: "number of draws", default: "20000", type: "integer", min: 1 },
  { name: "seed", unit: "", description: "text that seeds the random numbers (same seed, same data)", default: "tilted", type: "text" },
];

/** Optional number parameters whose default is another parameter's value. */
function orDefault(raw: Record<string, string | undefined>, name: string, fallback: string): Record<string, string | undefined> {
  return raw[name] === undefined || raw[name] === "" ? { ...raw, [name]: fallback } : raw;
}

export function synthTilted(raw0: Record<string, string | undefined>): SynthAudit {
  const declared = parseParameters(
    TILTED_PARAMETERS.filter((p) => !p.name.startsWith("draw-")),
    raw0,
  );
  let raw = raw0;
  for (const [d, base] of [
    ["draw-temperature-a", "temperature-a"],
    ["draw-temperature-b", "temperature-b"],
    ["draw-mu-a", "mu-a"],
    ["draw-mu-b", "mu-b"],
  ] as const) {
    raw = orDefault(raw, d, String(declared[base]));
  }
  const drawTable = TILTED_PARAMETERS.map((p) =>
    p.name.startsWith("draw-") ? { ...p, type: "number" as const, ...(p.name.includes("temperature") ? { min: 0, minExclusive: true } : {}) } : p,
  );
  const v = parseParameters(drawTable, raw);
  const coefficients = (TA: number, TB: number, muA: number, muB: number) => ({
    W: (betaPerMeV(TA) + betaPerMeV(TB)) / 2,
    Q: betaPerMeV(TB) - betaPerMeV(TA),
    N: betaPerMeV(TA) * muA - betaPerMeV(TB) * muB,
  });
  const declaredTheta = coefficients(v["temperature-a"] as number, v["temperature-b"] as number, v["mu-a"] as number, v["mu-b"] as number);
  const drawTheta = coefficients(v["draw-temperature-a"] as number, v["draw-temperature-b"] as number, v["draw-mu-a"] as number, v["draw-mu-b"] as number);
  const family: TiltedFamily = {
    theta: drawTheta,
    spreadW: v["work-spread"] as number,
    spreadQ: v["heat-spread"] as number,
    correlation: v.correlation as number,
    intensity: v.intensity as number,
  };
  const samples = v.samples as number;
  const draw = sampleTilted(family, samples, rngFromText(String(v.seed)));
  const moments = tiltedMoments(family);
  const consistent = ["temperature-a", "temperature-b", "mu-a", "mu-b"].every((k) => v[k] === v[`draw-${k}`]);
  const hasWork = family.spreadW > 0;
  const expected = {
    model: "tilted",
    about: "Exactly tilted family P(z) ∝ P0(z) exp(θ·z/2), z = (W, Q, dN), P0 symmetric. Energies in meV; θ in 1/meV (W, Q) and per particle (dN).",
    references: TILTED_REFERENCES,
    parameters: v,
    realisations: samples,
    theta_declared: declaredTheta,
    theta_drawn: drawTheta,
    drawn_at_declared_state: consistent,
    relations: consistent
      ? "Drawn at the declared temperatures and chemical potentials: the exchange, integral and weighted relations hold exactly."
      : "Drawn at other temperatures or chemical potentials than declared: the relations hold with θ_drawn, so checks that use the declared affinities must find a violation when the data are precise enough.",
    mean: moments.mean,
    covariance: { order: ["W", "Q", "dN"], matrix: moments.covariance },
    exp_minus_sigma_declared: tiltedExponentialMean(family, declaredTheta),
  };
  const TA = v["temperature-a"];
  const TB = v["temperature-b"];
  const description = `Draws from the exactly tilted family P(W, Q, dN) ∝ P0(W, Q, dN) exp((β̄ W + a_Q Q + a_N dN)/2) with a
symmetric base law (normal in W and Q, Skellam in dN), which obeys the exchange fluctuation relation exactly
(Andrieux, Gaspard, Monnai & Tasaki, New J. Phys. 11, 043014 (2009)). ${expected.relations}
Exact moments are in \`data/expected.json\`.
`;
  const columns = hasWork ? "{ W: W, Q: Q, dN: dN }" : "{ Q: Q, dN: dN }";
  const yaml = synthAuditYamlHeader({
    model: "tilted",
    id: "synth-tilted",
    title: `Exactly tilted exchange statistics${consistent ? "" : " drawn at other temperatures than declared"}`,
    description,
    keywords: ["simulation", "exchange fluctuation relation", "calibration"],
  }) + `  - id: tilted
    kind: samples
    file: data/tilted.csv
    columns: ${columns}
    energy_unit: meV
    reservoirs:
      A: { T: ${TA}, mu: ${v["mu-a"]} }
      B: { T: ${TB}, mu: ${v["mu-b"]} }
    work: ${hasWork ? "measured" : "zero"}
checks: all
`;
  const csv = hasWork ? columnsToCsv(["W", "Q", "dN"], [draw.W, draw.Q, draw.dN]) : columnsToCsv(["Q", "dN"], [draw.Q, draw.dN]);
  return {
    yaml,
    files: { "data/tilted.csv": csv, "data/expected.json": `${JSON.stringify(expected, null, 2)}\n` },
    summary: `${samples} draws; ${consistent ? "at the declared state" : "at another state than declared"}; exact ⟨exp(−Σ)⟩ with declared affinities = ${expected.exp_minus_sigma_declared.toPrecision(5)}`,
  };
}
