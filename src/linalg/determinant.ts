import { luDecompose } from "./lu.ts";

/** det A as the signed product of the LU pivots (Golub & Van Loan §3.4). */
export function determinant(a: readonly (readonly number[])[]): number {
  if (a.length === 0) return 1;
  const { lu, sign } = luDecompose(a);
  let det = sign;
  for (let i = 0; i < lu.length; i++) det *= lu[i][i];
  return det;
}
