import { luDecompose, type LuFactors } from "./lu.ts";
import { identity, type Matrix } from "./matrix.ts";

function solveFactored(f: LuFactors, b: readonly number[]): number[] {
  const n = f.lu.length;
  // Forward substitution with the unit lower factor on the permuted right-hand side, then back substitution.
  const y = f.pivot.map((p) => b[p]);
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) y[i] -= f.lu[i][j] * y[j];
  for (let i = n - 1; i >= 0; i--) {
    for (let j = i + 1; j < n; j++) y[i] -= f.lu[i][j] * y[j];
    y[i] /= f.lu[i][i];
  }
  return y;
}

/** x with A x = b, by LU with partial pivoting; throws when A is singular. */
export function solve(a: readonly (readonly number[])[], b: readonly number[]): number[] {
  if (b.length !== a.length) throw new RangeError(`solve: the matrix has ${a.length} rows but b has ${b.length} entries`);
  const f = luDecompose(a);
  if (f.singular) throw new RangeError("solve: the matrix is singular");
  return solveFactored(f, b);
}

/** A⁻¹, column by column from one LU factorisation; throws when A is singular. */
export function inverse(a: readonly (readonly number[])[]): Matrix {
  const f = luDecompose(a);
  if (f.singular) throw new RangeError("inverse: the matrix is singular");
  const n = a.length;
  const cols = identity(n).map((e) => solveFactored(f, e));
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => cols[j][i]));
}
