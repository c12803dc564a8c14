import { describe, it, expect } from "vitest";
import { EigenvalueDecomposition, Matrix as MlMatrix, determinant as mlDeterminant, inverse as mlInverse } from "ml-matrix";
import {
  antisymmetricPart,
  determinant,
  diagonallyNormalised,
  inverse,
  multiply,
  smallestEigenvalue,
  solve,
  symmetricEigenvalues,
  symmetricPart,
  transpose,
} from "../../src/linalg/index.ts";
import { rngFromText } from "../../src/stats/rng.ts";
import { expectClose } from "../helpers/expectClose.ts";

const hilbert = (n: number) => Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => 1 / (i + j + 1)));

function randomSymmetric(n: number, seed: string): number[][] {
  const rng = rngFromText(seed);
  const a = Array.from({ length: n }, () => Array.from({ length: n }, () => rng.normal()));
  return symmetricPart(a);
}

describe("symmetric and antisymmetric parts", () => {
  it("split a matrix exactly: A = (A + Aᵀ)/2 + (A − Aᵀ)/2", () => {
    const a = [[1, 2, 3], [4, 5, 6], [7, 8, 10]];
    const s = symmetricPart(a);
    const k = antisymmetricPart(a);
    expect(s).toEqual([[1, 3, 5], [3, 5, 7], [5, 7, 10]]);
    expect(k).toEqual([[0, -1, -2], [1, 0, -1], [2, 1, 0]]);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(s[i][j] + k[i][j]).toBe(a[i][j]);
  });

  it("leave a symmetric matrix unchanged and give it a zero antisymmetric part (identity)", () => {
    const s = [[2, -1], [-1, 3]];
    expect(symmetricPart(s)).toEqual(s);
    expect(antisymmetricPart(s)).toEqual([[0, 0], [0, 0]]);
  });

  it("refuse a non-square matrix", () => {
    expect(() => symmetricPart([[1, 2], [3]])).toThrow("matrix must be square: 2 rows but a row of length 1");
  });
});

describe("diagonallyNormalised", () => {
  it("scales to unit diagonal; the 2×2 smallest eigenvalue is 1 − |r| (exact)", () => {
    const s = [[4, -3], [-3, 9]]; // r = −3/6 = −0.5
    const c = diagonallyNormalised(s)!;
    expect(c).toEqual([[1, -0.5], [-0.5, 1]]);
    expectClose(smallestEigenvalue(c), 0.5, { rtol: 1e-15, source: "exact: eigenvalues 1 ± |r|" });
  });

  it("is unchanged by rescaling the fluxes (D S D with D diagonal)", () => {
    const s = [[2, 0.5, 0.1], [0.5, 1, 0.2], [0.1, 0.2, 3]];
    const d = [1e-9, 3e4, 7];
    const scaled = s.map((row, i) => row.map((v, j) => v * d[i] * d[j]));
    const a = diagonallyNormalised(s)!;
    const b = diagonallyNormalised(scaled)!;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expectClose(b[i][j], a[i][j], { rtol: 1e-14, atol: 1e-16, source: "identity: scale invariance" });
  });

  it("returns null when a diagonal entry is not positive", () => {
    expect(diagonallyNormalised([[1, 0], [0, -2]])).toBeNull();
  });
});

describe("symmetricEigenvalues", () => {
  it("finds 2 − 2cos(kπ/(n+1)) for the tridiagonal (−1, 2, −1) matrix (exact spectrum)", () => {
    for (const n of [3, 6, 9]) {
      const a = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 2 : Math.abs(i - j) === 1 ? -1 : 0)));
      const exact = Array.from({ length: n }, (_, k) => 2 - 2 * Math.cos(((k + 1) * Math.PI) / (n + 1)));
      const got = symmetricEigenvalues(a);
      // Jacobi is accurate to a few ulps of the largest eigenvalue (≤ 4): atol 1e-14.
      got.forEach((v, k) => expectClose(v, exact[k], { atol: 1e-14, source: "exact eigenvalues of the discrete Laplacian" }));
    }
  });

  it("agrees with ml-matrix's EigenvalueDecomposition on random symmetric matrices up to 9×9", () => {
    for (const n of [2, 4, 7, 9]) {
      const a = randomSymmetric(n, `test:eig${n}`);
      const reference = new EigenvalueDecomposition(new MlMatrix(a), { assumeSymmetric: true }).realEigenvalues.slice().sort((x, y) => x - y);
      const got = symmetricEigenvalues(a);
      // Both backward stable: differences of order n·ε·‖A‖ (‖A‖ ≲ 10 here), 1e-12 is ample.
      got.forEach((v, k) => expectClose(v, reference[k], { atol: 1e-12, source: "ml-matrix 6 EigenvalueDecomposition (tridiagonal QL)" }));
    }
  });

  it("keeps the trace and the determinant (identities)", () => {
    const a = randomSymmetric(5, "test:eig-trace");
    const ev = symmetricEigenvalues(a);
    expectClose(ev.reduce((s, v) => s + v, 0), a.reduce((s, row, i) => s + row[i], 0), { atol: 1e-13, source: "trace = Σλ" });
    expectClose(ev.reduce((s, v) => s * v, 1), determinant(a), { rtol: 1e-11, atol: 1e-14, source: "det = Πλ" });
  });

  it("refuses a non-finite entry", () => {
    expect(() => symmetricEigenvalues([[1, NaN], [NaN, 1]])).toThrow("symmetricEigenvalues: the matrix has a non-finite entry");
  });
});

describe("determinant, solve, inverse", () => {
  it("gives the exact Hilbert determinants 1/12, 1/2160, 1/6048000", () => {
    // det H_n = c_n⁴/c_{2n}, c_n = Π_{i<n} i! (Hilbert 1894; Choi, Am. Math. Monthly 90, 301 (1983)).
    expectClose(determinant(hilbert(2)), 1 / 12, { rtol: 1e-14, source: "exact Hilbert determinant" });
    expectClose(determinant(hilbert(3)), 1 / 2160, { rtol: 1e-13, source: "exact Hilbert determinant" });
    // cond(H4) ≈ 1.6e4: relative error up to ~1e-12.
    expectClose(determinant(hilbert(4)), 1 / 6048000, { rtol: 1e-11, source: "exact Hilbert determinant" });
  });

  it("matches ml-matrix's determinant and inverse", () => {
    const a = [[4, -2, 1, 0.5], [3, 6, -4, 2], [2, 1, 8, -1], [0.3, -0.7, 1.1, 5]];
    expectClose(determinant(a), mlDeterminant(new MlMatrix(a)), { rtol: 1e-12, source: "ml-matrix 6 determinant" });
    const inv = inverse(a);
    const ref = mlInverse(new MlMatrix(a)).to2DArray();
    for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) expectClose(inv[i][j], ref[i][j], { atol: 1e-14, rtol: 1e-12, source: "ml-matrix 6 inverse" });
  });

  it("inverts the Hilbert matrix H3 to its exact integer inverse", () => {
    const exact = [[9, -36, 30], [-36, 192, -180], [30, -180, 180]]; // classical closed form of H3⁻¹
    const inv = inverse(hilbert(3));
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expectClose(inv[i][j], exact[i][j], { rtol: 1e-12, source: "exact inverse of H3" });
  });

  it("solves A x = b so that A x reproduces b (identity) and needs pivoting for a zero leading entry", () => {
    const a = [[0, 1], [1, 0]];
    expect(solve(a, [3, 4])).toEqual([4, 3]);
    const m = [[2, 1, 1], [1, 3, 2], [1, 0, 0]];
    const x = solve(m, [4, 5, 6]);
    multiply(m, transpose([x])).forEach((row, i) => expectClose(row[0], [4, 5, 6][i], { atol: 1e-13, source: "identity A·A⁻¹b = b" }));
  });

  it("refuses a singular matrix", () => {
    expect(() => solve([[1, 2], [2, 4]], [1, 1])).toThrow("solve: the matrix is singular");
    expect(() => inverse([[0, 0], [0, 1]])).toThrow("inverse: the matrix is singular");
    expect(determinant([[1, 2], [2, 4]]) === 0).toBe(true); // ±0: the sign of an exact zero is immaterial
  });
});
