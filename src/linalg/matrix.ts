/** Small dense matrices as arrays of rows (n ≤ 9 in practice: Onsager matrices of a few fluxes). */
export type Matrix = number[][];

/** The size n of a square matrix; throws for ragged or non-square input. */
export function squareSize(a: readonly (readonly number[])[], what = "matrix"): number {
  const n = a.length;
  for (const row of a) {
    if (row.length !== n) throw new RangeError(`${what} must be square: ${n} rows but a row of length ${row.length}`);
  }
  return n;
}

/** A fresh copy of a matrix. */
export function copyMatrix(a: readonly (readonly number[])[]): Matrix {
  return a.map((row) => row.slice());
}

/** The n×n identity. */
export function identity(n: number): Matrix {
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
}

/** Transpose. */
export function transpose(a: readonly (readonly number[])[]): Matrix {
  const n = a.length;
  const m = n > 0 ? a[0].length : 0;
  return Array.from({ length: m }, (_, j) => Array.from({ length: n }, (_, i) => a[i][j]));
}

/** Matrix product a·b. */
export function multiply(a: readonly (readonly number[])[], b: readonly (readonly number[])[]): Matrix {
  const k = b.length;
  return a.map((row) => {
    if (row.length !== k) throw new RangeError(`multiply: inner sizes differ (${row.length} and ${k})`);
    return b[0].map((_, j) => {
      let s = 0;
      for (let t = 0; t < k; t++) s += row[t] * b[t][j];
      return s;
    });
  });
}
