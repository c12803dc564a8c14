/**
 * Determinant of a complex square matrix by LU decomposition with partial
 * pivoting (Golub & Van Loan, Matrix Computations, 4th ed. (2013), §3.4).
 * Works on copies of the row-major real and imaginary parts.
 */
export function complexDeterminant(n: number, reIn: Float64Array, imIn: Float64Array): { re: number; im: number } {
  const re = Float64Array.from(reIn);
  const im = Float64Array.from(imIn);
  let dr = 1;
  let di = 0;
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.hypot(re[k * n + k], im[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const a = Math.hypot(re[i * n + k], im[i * n + k]);
      if (a > best) {
        best = a;
        p = i;
      }
    }
    if (best === 0) return { re: 0, im: 0 };
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        let t = re[k * n + j];
        re[k * n + j] = re[p * n + j];
        re[p * n + j] = t;
        t = im[k * n + j];
        im[k * n + j] = im[p * n + j];
        im[p * n + j] = t;
      }
      dr = -dr;
      di = -di;
    }
    const pr = re[k * n + k];
    const pi = im[k * n + k];
    const nr = dr * pr - di * pi;
    di = dr * pi + di * pr;
    dr = nr;
    const den = pr * pr + pi * pi;
    for (let i = k + 1; i < n; i++) {
      const ar = re[i * n + k];
      const ai = im[i * n + k];
      if (ar === 0 && ai === 0) continue;
      // l = a_ik / a_kk
      const lr = (ar * pr + ai * pi) / den;
      const li = (ai * pr - ar * pi) / den;
      for (let j = k + 1; j < n; j++) {
        const br = re[k * n + j];
        const bi = im[k * n + j];
        re[i * n + j] -= lr * br - li * bi;
        im[i * n + j] -= lr * bi + li * br;
      }
    }
  }
  return { re: dr, im: di };
}
