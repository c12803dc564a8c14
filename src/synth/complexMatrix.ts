/**
 * Dense complex matrices as two row-major Float64Arrays (real and imaginary
 * parts), the layout the samplers and the worker threads share without copying
 * objects around.
 */
export interface ComplexMatrix {
  rows: number;
  cols: number;
  re: Float64Array;
  im: Float64Array;
}

export function complexZeros(rows: number, cols: number): ComplexMatrix {
  return { rows, cols, re: new Float64Array(rows * cols), im: new Float64Array(rows * cols) };
}

export function complexIdentity(n: number): ComplexMatrix {
  const m = complexZeros(n, n);
  for (let i = 0; i < n; i++) m.re[i * n + i] = 1;
  return m;
}

/** The product a·b (or a†·b when `adjointA`), by i-k-j loops over contiguous rows. */
export function complexMultiply(a: ComplexMatrix, b: ComplexMatrix, adjointA = false): ComplexMatrix {
  const n = adjointA ? a.cols : a.rows;
  const inner = adjointA ? a.rows : a.cols;
  if (inner !== b.rows) throw new Error(`complexMultiply: ${n}×${inner} times ${b.rows}×${b.cols}`);
  const m = b.cols;
  const out = complexZeros(n, m);
  const { re: ore, im: oim } = out;
  for (let i = 0; i < n; i++) {
    const oi = i * m;
    for (let k = 0; k < inner; k++) {
      const idx = adjointA ? k * a.cols + i : i * a.cols + k;
      const ar = a.re[idx];
      const ai = adjointA ? -a.im[idx] : a.im[idx];
      if (ar === 0 && ai === 0) continue;
      const bk = k * m;
      for (let j = 0; j < m; j++) {
        const br = b.re[bk + j];
        const bi = b.im[bk + j];
        ore[oi + j] += ar * br - ai * bi;
        oim[oi + j] += ar * bi + ai * br;
      }
    }
  }
  return out;
}

/** The conjugate transpose a†. */
export function complexAdjoint(a: ComplexMatrix): ComplexMatrix {
  const out = complexZeros(a.cols, a.rows);
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      out.re[j * a.rows + i] = a.re[i * a.cols + j];
      out.im[j * a.rows + i] = -a.im[i * a.cols + j];
    }
  }
  return out;
}

/** Largest absolute entry of a − b, for tests of identities. */
export function complexMaxDifference(a: ComplexMatrix, b: ComplexMatrix): number {
  let worst = 0;
  for (let i = 0; i < a.re.length; i++) worst = Math.max(worst, Math.hypot(a.re[i] - b.re[i], a.im[i] - b.im[i]));
  return worst;
}
