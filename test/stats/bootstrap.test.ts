import { describe, expect, it } from "vitest";
import { bcaInterval, bcaPValue, bootstrapRatio, percentileInterval, selectRank, sortedQuantile } from "../../src/stats/bootstrap.ts";
import { poissonDeviate, poissonFromTable, poissonInversionTable, ptrsConstants, ptrsDeviate } from "../../src/stats/poissonDeviate.ts";
import { hillTailShape } from "../../src/stats/tailShape.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

describe("poissonDeviate", () => {
  it("draws with mean and variance equal to the parameter, for the inversion and the PTRS branch", () => {
    const rng = rngFromText("poisson");
    const n = 100_000;
    for (const lambda of [0.7, 4, 25, 300]) {
      let s = 0;
      let s2 = 0;
      for (let i = 0; i < n; i++) {
        const k = poissonDeviate(rng, lambda);
        s += k;
        s2 += k * k;
      }
      const mean = s / n;
      const variance = s2 / n - mean * mean;
      // Poisson law: mean = variance = λ. Tolerance 5 standard errors of the mean, √(λ/n);
      // for the variance 5 standard errors, √((λ + 2λ²)/n) (fourth cumulant of the Poisson law).
      expectClose(mean, lambda, { atol: 5 * Math.sqrt(lambda / n), source: "Poisson mean = λ" });
      expectClose(variance, lambda, { atol: 5 * Math.sqrt((lambda + 2 * lambda * lambda) / n), source: "Poisson variance = λ" });
    }
  });
});

describe("Poisson draws prepared once per weight", () => {
  // The bootstrap prepares each cell's draw once; a resample must not change. The reference is
  // poissonDeviate itself, fed the same uniforms: equality is exact, not statistical.
  it("inversion tables return poissonDeviate's count for every uniform, including ones at and beyond the tabulated sums", () => {
    for (const mean of [1e-3, 0.5, 1.7, 2, 7, 9.999]) {
      const table = poissonInversionTable(mean);
      const uniforms: number[] = [0, 1 - 2 ** -53, 0.5 * (1 + table[table.length - 1])];
      for (const c of table) uniforms.push(c, c - 2 ** -53 * c, Math.min(1 - 2 ** -53, c + 2 ** -53));
      const rng = rngFromText(`poisson-table:${mean}`);
      for (let i = 0; i < 20_000; i++) uniforms.push(rng.uniform());
      for (const u of uniforms) {
        const fixed = { uniform: () => u, normal: () => 0, int: () => 0, nextUint32: () => 0 };
        expect(poissonFromTable(u, table)).toBe(poissonDeviate(fixed, mean));
      }
    }
  });

  it("PTRS with constants prepared once draws the same sequence as poissonDeviate from the same generator", () => {
    for (const mean of [10, 37.2, 1e4]) {
      const a = rngFromText(`ptrs:${mean}`);
      const b = rngFromText(`ptrs:${mean}`);
      const c = ptrsConstants(mean);
      for (let i = 0; i < 20_000; i++) expect(ptrsDeviate(a, c)).toBe(poissonDeviate(b, mean));
    }
  });
});

describe("selectRank", () => {
  it("gives the value a full sort puts at each rank, ties, infinities, NaN and signed zeros included", () => {
    // The reference is Float64Array.prototype.sort (ECMAScript: numeric order, NaN last); the
    // bootstraps' choice of exactly resampled cells depends on this value, so it must be identical.
    const rng = rngFromText("select-rank");
    const specials = [0, -0, Infinity, -Infinity, NaN, 1, 1, 1];
    for (let trial = 0; trial < 300; trial++) {
      const n = 1 + Math.floor(rng.uniform() * (trial < 200 ? 40 : 3000));
      const values = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        const r = rng.uniform();
        values[i] = r < 0.15 ? specials[Math.floor(rng.uniform() * specials.length)] : r < 0.5 ? Math.round(10 * rng.normal()) : rng.normal();
      }
      const sorted = Float64Array.from(values).sort();
      for (const rank of [0, n - 1, Math.floor(rng.uniform() * n), Math.floor(n / 2)]) {
        const got = selectRank(values, rank);
        const want = sorted[rank];
        // Equal as the threshold is used (> and ===): NaN for NaN, and −0 and 0 alike.
        expect(Number.isNaN(want) ? Number.isNaN(got) : got === want, `n=${n} rank=${rank}: ${got} for ${want}`).toBe(true);
      }
    }
  });
});

describe("sortedQuantile", () => {
  it("interpolates between order statistics as Hyndman & Fan definition 7", () => {
    // Hyndman & Fan, Am. Stat. 50, 361 (1996), definition 7: h = (n − 1)p; [1, 2, 3, 4] at p = 0.5 → 2.5, p = 0.9 → 3.7.
    expect(sortedQuantile([1, 2, 3, 4], 0.5)).toBe(2.5);
    expectClose(sortedQuantile([1, 2, 3, 4], 0.9), 3.7, { rtol: 1e-15, source: "Hyndman & Fan definition 7" });
  });
});

function normalSample(seed: string, n: number): Float64Array {
  const rng = rngFromText(seed);
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = 2 + 3 * rng.normal();
  return x;
}

describe("bootstrapRatio", () => {
  it("computes the BCa acceleration as skewness/(6√n) for a mean", () => {
    const x = Float64Array.of(0, 1, 1, 2, 7, 3, 0.5);
    const boot = bootstrapRatio(x, null, null, rngFromText("acc"), { resamples: 200 });
    const n = x.length;
    const mean = x.reduce((a, b) => a + b, 0) / n;
    const m2 = x.reduce((a, b) => a + (b - mean) ** 2, 0);
    const m3 = x.reduce((a, b) => a + (b - mean) ** 3, 0);
    // Efron & Tibshirani (1993) eq. 14.15 with jackknife values of the mean: a = Σd³/(6(Σd²)^{3/2}), d = x_i − x̄.
    expectClose(boot.acceleration, m3 / (6 * m2 ** 1.5), { rtol: 1e-12, source: "Efron & Tibshirani 1993, eq. 14.15 (exact algebra)" });
    expectClose(boot.estimate, mean, { rtol: 1e-15, source: "the plug-in mean" });
  });

  it("gives the normal-theory interval for the mean of normal data", () => {
    const n = 20_000;
    const x = normalSample("boot:normal", n);
    const boot = bootstrapRatio(x, null, null, rngFromText("boot:normal:rs"), { resamples: 2000 });
    const [lo, hi] = bcaInterval(boot, 0.95);
    // Normal theory: half-width 1.96·s/√n with s = 3. Bootstrap quantiles from 2000 resamples
    // carry a few per cent of noise: tolerance 8 % of the half-width.
    const half = (1.959964 * 3) / Math.sqrt(n);
    expectClose((hi - lo) / 2, half, { rtol: 0.08, source: "z0.975 = 1.959964 (NIST §1.3.6.7.1) times σ/√n" });
    const [plo, phi] = percentileInterval(boot, 0.95);
    expectClose((phi - plo) / 2, half, { rtol: 0.08, source: "percentile interval, same normal theory" });
  });

  it("inverts its own interval: θ0 at the BCa bound has p ≈ 1 − confidence", () => {
    const x = normalSample("boot:p", 5000);
    const boot = bootstrapRatio(x, null, null, rngFromText("boot:p:rs"), { resamples: 4000 });
    const [lo] = bcaInterval(boot, 0.9);
    // The 90 % interval's lower end is where the two-sided p-value is 0.10; resolution ~1/√B: tolerance 0.02.
    expectClose(bcaPValue(boot, lo), 0.1, { atol: 0.02, source: "duality of BCa interval and p-value (construction)" });
  });

  it("resamples a histogram by its counts: same interval as the raw realisations", () => {
    const rng = rngFromText("boot:hist");
    const values = [0, 1, 2, 3, 10];
    const probs = [0.4, 0.3, 0.2, 0.09, 0.01];
    const n = 50_000;
    const raw = new Float64Array(n);
    const counts = new Float64Array(values.length);
    for (let i = 0; i < n; i++) {
      let u = rng.uniform();
      let k = 0;
      while (k < probs.length - 1 && u > probs[k]) u -= probs[k++];
      raw[i] = values[k];
      counts[k]++;
    }
    const a = bootstrapRatio(raw, null, null, rngFromText("boot:hist:a"), { resamples: 2000 });
    const b = bootstrapRatio(Float64Array.from(values), null, counts, rngFromText("boot:hist:b"), { resamples: 2000 });
    expectClose(b.estimate, a.estimate, { rtol: 1e-12, source: "the same weighted mean (identity)" });
    const wa = bcaInterval(a, 0.95);
    const wb = bcaInterval(b, 0.95);
    // Same resampling law, independent random streams: widths agree within Monte Carlo noise (8 %).
    expectClose(wb[1] - wb[0], wa[1] - wa[0], { rtol: 0.08, source: "Poisson(w) resampling of a cell = w Poisson(1) draws" });
  });

  it("matches the all-exact resampling when only the heaviest cells are drawn one by one", () => {
    const rng = rngFromText("boot:hybrid");
    const n = 15_000;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = Math.exp(-(1 + Math.sqrt(2) * rng.normal())); // e^−Σ, Σ ~ N(1, 2)
    const exact = bootstrapRatio(x, null, null, rngFromText("boot:hybrid:1"), { resamples: 1000, exactCells: n });
    const hybrid = bootstrapRatio(x, null, null, rngFromText("boot:hybrid:2"), { resamples: 1000, exactCells: 500 });
    const we = bcaInterval(exact, 0.95);
    const wh = bcaInterval(hybrid, 0.95);
    // Same target law (central limit theorem for the light part): widths within 10 % (Monte Carlo noise of 1000 resamples).
    expectClose(wh[1] - wh[0], we[1] - we[0], { rtol: 0.1, source: "Poisson bootstrap with and without the normal light part" });
    expect(hybrid.exactCells).toBe(500);
  });
});

describe("hillTailShape", () => {
  it("recovers the shape of a Pareto tail", () => {
    const rng = rngFromText("hill");
    const n = 200_000;
    for (const xi of [0.25, 0.5, 0.8]) {
      const x = new Float64Array(n);
      for (let i = 0; i < n; i++) x[i] = Math.pow(1 - rng.uniform(), -xi); // P(X > t) = t^{−1/ξ}
      // Hill (1975): asymptotic SE ξ/√M with M = 3√n ≈ 1342; tolerance 4 SE.
      expectClose(hillTailShape(x), xi, { atol: (4 * xi) / Math.sqrt(3 * Math.sqrt(n)), source: "Pareto law with shape ξ (exact)" });
    }
  });
});
