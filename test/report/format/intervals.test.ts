/**
 * Intervals inside the sentences checks write: the bounds are shown in the
 * unit and prefix of their value, rounded no finer than the value (GUM,
 * JCGM 100:2008, §7.2.6: a result is not stated to more digits than its
 * uncertainty warrants) and never finer than they were written, the unit once
 * after the bracket. Before this, "T_A = 0.824 K [0.7432, 0.9244]" read as
 * "824 mK [0.7432, 0.9244]": the bounds looked a thousand times smaller than
 * the value. Unit conversions are exact powers of ten (SI Brochure, 9th ed.,
 * Table 7), so all comparisons are exact strings.
 */
import fs from "node:fs";
import path from "node:path";
import { describe, expect, test } from "vitest";
import { rewriteNumbers } from "../../../src/report/format/index.ts";

const plain = (s: string) => s.replaceAll("\u202f", " ");
const shown = (text: string, ctx = {}) => plain(rewriteNumbers(text, ctx));

describe("intervals in check sentences", () => {
  test("an effective temperature with its interval after it (steady-state-counting's effective lead)", () => {
    // src/checks/steady-state-counting/steadyStateCounting.ts writes `${fmt(v)} K ${fmtInterval(lo, hi)}`.
    expect(shown("lead A at T_A = 0.824 K [0.7432, 0.9244] (declared 1 K)")).toBe("lead A at T_A = 824 mK [743, 924] mK (declared 1 K)");
    // A chemical potential in the dataset's meV: 0.09602 meV is shown as 96.02 µeV; the bound 0.1059 meV was
    // written to 0.1 µeV, so it keeps one decimal although the value has two.
    expect(shown("μ_A = 0.09602 meV [0.08613, 0.1059] (declared 0.1 meV)")).toBe("μ_A = 96.02 µeV [86.13, 105.9] µeV (declared 100 µeV)");
  });

  test("an explanation's implied value with the unit after the bracket (exchange-fluctuation)", () => {
    // src/checks/exchange-fluctuation/explanations.ts writes `${fmt(v, 4)} ${fmtInterval(lo, hi, 3)} ${unit}`.
    expect(shown("T_A = 0.8809 [0.842, 0.924] K (T_A and T_B free)")).toBe("T_A = 880.9 mK [842, 924] mK (T_A and T_B free)");
    expect(shown("T_A = 1.126 [1.09, 1.17] K, T_B = 1 K")).toBe("T_A = 1.126 K [1.09, 1.17] K, T_B = 1 K");
    expect(shown("μ_A − μ_B = 6.258 [6.22, 6.3] ueV (μ_A free)")).toBe("μ_A − μ_B = 6.258 µeV [6.22, 6.3] µeV (μ_A free)");
    // display: chemical_potential: µeV puts value and bounds in µeV together.
    expect(shown("μ_A − μ_B = 0.09675 [0.0934, 0.1] meV (μ_A free)", { energyUnit: "meV", overrides: { chemical_potential: "µeV" } })).toBe("μ_A − μ_B = 96.75 µeV [93.4, 100] µeV (μ_A free)");
  });

  test("a flux with its uncertainty and a confidence interval in brackets (linear-growth)", () => {
    // The value is rounded to its uncertainty (two digits of u): the bounds stop at the same decimal, here the
    // decimal they were written to.
    expect(shown("with J_Q = 3.17e-12 ± 3.6e-15 W (95 % interval [3.163e-12, 3.177e-12])")).toBe("with J_Q = (3.1700 ± 0.0036) pW (95 % interval [3.163, 3.177] pW)");
    // A rate takes its prefix on the second: 6.366 × 10¹⁰ 1/s = 63.66 1/ns (SI Brochure 9th ed. §3.1).
    expect(shown("with J_N = 6.366e+10 ± 5.3e+7 1/s (95 % interval [6.356e+10, 6.377e+10])")).toBe(
      "with J_N = (63.660 ± 0.053) 1/ns (95 % interval [63.56, 63.77] 1/ns)",
    );
  });

  test("an entropy in units of k_B keeps k_B after the bracket (work)", () => {
    expect(shown("⟨β̄W⟩ = 0.0001 k_B [-0.0096, 0.0096], rms 0.8 k_B")).toBe("⟨β̄W⟩ = 0.0001 k_B [−0.0096, 0.0096] k_B, rms 0.8 k_B");
  });

  test("bounds of a pure number stay as written, as does a half-open interval", () => {
    expect(shown("The slope 0.992, 95% interval [0.948, 1.04] within 1 ± 0.05")).toBe("The slope 0.992, 95% interval [0.948, 1.04] within 1 ± 0.05");
    expect(shown("A_∞ = 0.905, 95% interval [0.6784, 1.132], against the declared affinity per electron 0.928")).toBe(
      "A_∞ = 0.905, 95% interval [0.6784, 1.132], against the declared affinity per electron 0.928",
    );
    expect(shown("T_A = 2.5 K [1.9, ∞) (T_A free)")).toBe("T_A = 2.5 K [1.9, ∞) (T_A free)");
    // A unit in another clause is not the interval's: the semicolon ends it.
    expect(shown("τ = 2 s; the ratio is 0.5 [0.4, 0.6]")).toBe("τ = 2 s; the ratio is 0.5 [0.4, 0.6]");
  });

  test("in every summary and reason of the demo archive, a value with a unit before an interval has its unit after it", () => {
    const audits = path.resolve(import.meta.dirname, "../../../audits");
    let intervals = 0;
    for (const a of fs.readdirSync(audits)) {
      const versions = path.join(audits, a, "versions");
      if (!fs.existsSync(versions)) continue;
      for (const v of fs.readdirSync(versions)) {
        const doc = JSON.parse(fs.readFileSync(path.join(versions, v, "result.json"), "utf8"));
        for (const c of doc.checks) {
          for (const sentence of [c.summary, c.reason ?? ""]) {
            const text = plain(rewriteNumbers(sentence, { ...(doc.display ? { overrides: doc.display } : {}) }));
            // "824 mK [743, 924]" must go on with " mK"; "(…) pW (95 % interval [3.163, 3.177]" with " pW".
            for (const m of text.matchAll(/(?<=\d|\)) ([^\s\d[\](),;]+)(?: \(\d+ % interval)? \[([^\]∞)]+)\]( [^\s,;)]+)?/gu)) {
              intervals++;
              expect(m[3], `${a} v${v} ${c.check}: ${text}`).toBe(` ${m[1]}`);
            }
          }
        }
      }
    }
    // The demo archive states such intervals (effective temperatures, chemical potentials, fluxes, β̄W).
    expect(intervals).toBeGreaterThan(20);
  });
});
