import { describe, expect, it } from "vitest";
// jstat (npm, devDependency) is a general-purpose statistics library used here as an outside reference.
// @ts-expect-error jstat ships no type declarations
import jStatModule from "jstat";
import { expectClose } from "../helpers/expectClose.ts";
import { RankDeficientError, SingularCovarianceError, combinationVariance, weightedFit, weightedLeastSquares } from "../../src/stats/weightedLeastSquares.ts";

const jStat = (jStatModule as { jStat?: unknown }).jStat ?? jStatModule;

describe("weightedLeastSquares", () => {
  it("weightedFit of a straight line matches the closed form of Bevington & Robinson", () => {
    const x = [1, 2, 3, 4, 5, 6];
    const y = [2.1, 3.9, 6.2, 7.8, 10.3, 11.9];
    const s = [0.1, 0.2, 0.1, 0.3, 0.2, 0.4];
    // Bevington & Robinson, Data Reduction and Error Analysis (3rd ed. 2003), §6.4 (eqs. 6.12 and 6.21–6.22 from memory):
    // Δ = S Sxx − Sx², intercept = (Sxx Sy − Sx Sxy)/Δ, slope = (S Sxy − Sx Sy)/Δ, var = Sxx/Δ and S/Δ.
    let S = 0, Sx = 0, Sy = 0, Sxx = 0, Sxy = 0;
    x.forEach((xi, i) => {
      const w = 1 / s[i] ** 2;
      S += w; Sx += w * xi; Sy += w * y[i]; Sxx += w * xi * xi; Sxy += w * xi * y[i];
    });
    const delta = S * Sxx - Sx * Sx;
    const fit = weightedFit(x.map((xi) => [1, xi]), y, s);
    const src = "Bevington & Robinson (2003) §6.4 closed form; rtol 1e-12, exact algebra in double precision";
    expectClose(fit.coefficients[0], (Sxx * Sy - Sx * Sxy) / delta, { rtol: 1e-12, source: src });
    expectClose(fit.coefficients[1], (S * Sxy - Sx * Sy) / delta, { rtol: 1e-12, source: src });
    expectClose(fit.covariance[0][0], Sxx / delta, { rtol: 1e-12, source: src });
    expectClose(fit.covariance[1][1], S / delta, { rtol: 1e-12, source: src });
    expectClose(fit.covariance[0][1], -Sx / delta, { rtol: 1e-12, source: src });
    const chi2 = x.reduce((acc, xi, i) => acc + ((y[i] - fit.coefficients[0] - fit.coefficients[1] * xi) / s[i]) ** 2, 0);
    expectClose(fit.chiSquare, chi2, { rtol: 1e-12, source: "definition of chi-square; exact algebra" });
    expect(fit.dof).toBe(4);
  });

  it("one coefficient gives the inverse-variance weighted mean", () => {
    const y = [10.2, 9.7, 10.05];
    const s = [0.3, 0.5, 0.1];
    // Bevington & Robinson (2003) eqs. 4.17 and 4.19 (from memory): mean = Σ(y/σ²)/Σ(1/σ²), σ² = 1/Σ(1/σ²).
    const W = s.reduce((a, v) => a + 1 / v ** 2, 0);
    const mean = y.reduce((a, v, i) => a + v / s[i] ** 2, 0) / W;
    const fit = weightedFit([[1], [1], [1]], y, s);
    expectClose(fit.coefficients[0], mean, { rtol: 1e-13, source: "Bevington & Robinson eq. 4.17; exact algebra" });
    expectClose(fit.standardErrors[0], Math.sqrt(1 / W), { rtol: 1e-13, source: "Bevington & Robinson eq. 4.19; exact algebra" });
  });

  it("combines two correlated measurements of one quantity as the best linear unbiased estimate", () => {
    const [y1, y2, s1, s2, rho] = [1.0, 1.3, 0.2, 0.3, 0.6];
    const fit = weightedLeastSquares([
      { design: [[1], [1]], y: [y1, y2], covariance: [[s1 * s1, rho * s1 * s2], [rho * s1 * s2, s2 * s2]] },
    ]);
    // Lyons, Gibaut & Clifford, Nucl. Instrum. Methods A 270, 110 (1988), two correlated measurements:
    // w1 = (σ2² − ρσ1σ2)/(σ1² + σ2² − 2ρσ1σ2), variance σ1²σ2²(1 − ρ²)/(σ1² + σ2² − 2ρσ1σ2).
    const den = s1 * s1 + s2 * s2 - 2 * rho * s1 * s2;
    const w1 = (s2 * s2 - rho * s1 * s2) / den;
    const src = "Lyons, Gibaut & Clifford (1988) BLUE for two correlated measurements; rtol 1e-12, exact algebra";
    expectClose(fit.coefficients[0], w1 * y1 + (1 - w1) * y2, { rtol: 1e-12, source: src });
    expectClose(fit.covariance[0][0], (s1 * s1 * s2 * s2 * (1 - rho * rho)) / den, { rtol: 1e-12, source: src });
    expect(fit.dof).toBe(1);
  });

  it("agrees with jstat's ordinary least squares for equal weights (coefficients and standard errors)", () => {
    const x1 = [0.5, 1.1, 1.9, 3.2, 4.0, 5.1, 6.3, 7.0];
    const x2 = [2.0, 1.0, 3.5, 0.5, 2.2, 4.1, 1.7, 3.0];
    const y = [3.1, 3.0, 6.9, 4.4, 7.2, 11.0, 8.3, 10.9];
    const design = x1.map((v, i) => [1, v, x2[i]]);
    const fit = weightedFit(design, y, new Array(y.length).fill(1));
    const ref = (jStat as { models: { ols(y: number[], X: number[][]): { coef: number[]; t: { se: number[] } } } }).models.ols(y, design);
    // With unit weights the residual variance estimate is chi²/dof; OLS standard errors scale by its square root.
    const s2 = fit.chiSquare / fit.dof;
    for (let j = 0; j < 3; j++) {
      expectClose(fit.coefficients[j], ref.coef[j], { rtol: 1e-9, source: "jstat 1.9 models.ols coef; rtol 1e-9 covers its normal-equation solve" });
    }
    for (const j of [1, 2]) {
      expectClose(Math.sqrt(fit.covariance[j][j] * s2), ref.t.se[j], { rtol: 1e-9, source: "jstat 1.9 models.ols t.se" });
    }
  });

  it("is unaffected by the scale of a column: SI affinities of order 1e22 per joule", () => {
    const a = [-2, -1, 0, 1, 2, 3];
    const y = [0.9, 2.1, 2.9, 4.2, 5.0, 5.8];
    const s = [0.1, 0.1, 0.2, 0.1, 0.2, 0.1];
    const plain = weightedFit(a.map((v) => [1, v]), y, s);
    const k = 7.3e22;
    const scaled = weightedFit(a.map((v) => [1, v * k]), y.map((v) => v * 1e-15), s.map((v) => v * 1e-15));
    const src = "exact rescaling identity: slope scales by 1e-15/k; rtol 1e-11";
    expectClose(scaled.coefficients[1], (plain.coefficients[1] * 1e-15) / k, { rtol: 1e-11, source: src });
    expectClose(scaled.standardErrors[1], (plain.standardErrors[1] * 1e-15) / k, { rtol: 1e-11, source: src });
    expectClose(scaled.chiSquare, plain.chiSquare, { rtol: 1e-11, source: src });
  });

  it("combinationVariance gives the variance of a difference of correlated coefficients", () => {
    const cov = [[4, 1.5], [1.5, 9]];
    // Var(θ0 − θ1) = 4 + 9 − 2·1.5 = 10 (exact algebra).
    expect(combinationVariance(cov, [1, -1])).toBe(10);
  });

  it("refuses a design that cannot determine every coefficient", () => {
    expect(() => weightedFit([[1, 2], [2, 4], [3, 6]], [1, 2, 3], [1, 1, 1])).toThrow(
      new RankDeficientError("coefficient 1 is not determined by the design (its column depends on the others)"),
    );
    expect(() =>
      weightedLeastSquares([{ design: [[1], [1]], y: [1, 2], covariance: [[1, 1], [1, 1]] }]),
    ).toThrow(new SingularCovarianceError("observation 0: the covariance of the outputs is not positive definite"));
  });
});
