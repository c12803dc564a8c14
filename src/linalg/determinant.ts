import { luDecompose } from "./lu.ts";

/** det A as the signed product of the LU pivots (Golub & Van Loan §3.4). */
export function determinant(a: readonly (readonly number[])[]): number {
  if (a.length === 0) return 1;
  // 2×2 directly: the common case (charge–heat matrices), inside Monte Carlo loops.
  if (a.length === 2 && a[0].length === 2 && a[1].length === 2) return a[0][0] * a[1][1] - a[0][1] * a[1][0];
  const { lu, sign } = luDecompose(a);
  let det = sign;
  for (let i = 0; i < lu.length; i++) det *= lu[i][i];
  return det;
}
