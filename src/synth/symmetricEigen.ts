/**
 * Eigen-decomposition of a real symmetric matrix on typed arrays:
 * Householder reduction to tridiagonal form followed by the implicit QL
 * algorithm with Wilkinson shifts (the `tred2` and `tql2` procedures of
 * Wilkinson & Reinsch, Handbook for Automatic Computation II: Linear Algebra
 * (Springer 1971), contributions II/2 and II/3, as also used by EISPACK).
 * It works in place on row-major Float64Arrays, which keeps a 200 × 200
 * problem to milliseconds; ml-matrix's general-purpose version of the same
 * method serves as the reference in the tests.
 */
export interface SymmetricEigen {
  n: number;
  /** Eigenvalues in ascending order. */
  values: Float64Array;
  /** Eigenvectors as columns of a row-major n × n matrix: vectors[i * n + k] is component i of vector k. */
  vectors: Float64Array;
}

/** Householder tridiagonalisation; on return V holds the accumulated transformation, d the diagonal, e the sub-diagonal (e[0] = 0). */
function householderTridiagonal(n: number, V: Float64Array, d: Float64Array, e: Float64Array): void {
  for (let j = 0; j < n; j++) d[j] = V[(n - 1) * n + j];
  for (let i = n - 1; i > 0; i--) {
    let scale = 0;
    let h = 0;
    for (let k = 0; k < i; k++) scale += Math.abs(d[k]);
    if (scale === 0) {
      e[i] = d[i - 1];
      for (let j = 0; j < i; j++) {
        d[j] = V[(i - 1) * n + j];
        V[i * n + j] = 0;
        V[j * n + i] = 0;
      }
    } else {
      for (let k = 0; k < i; k++) {
        d[k] /= scale;
        h += d[k] * d[k];
      }
      let f = d[i - 1];
      let g = Math.sqrt(h);
      if (f > 0) g = -g;
      e[i] = scale * g;
      h -= f * g;
      d[i - 1] = f - g;
      for (let j = 0; j < i; j++) e[j] = 0;
      for (let j = 0; j < i; j++) {
        f = d[j];
        V[j * n + i] = f;
        g = e[j] + V[j * n + j] * f;
        for (let k = j + 1; k <= i - 1; k++) {
          g += V[k * n + j] * d[k];
          e[k] += V[k * n + j] * f;
        }
        e[j] = g;
      }
      f = 0;
      for (let j = 0; j < i; j++) {
        e[j] /= h;
        f += e[j] * d[j];
      }
      const hh = f / (h + h);
      for (let j = 0; j < i; j++) e[j] -= hh * d[j];
      for (let j = 0; j < i; j++) {
        f = d[j];
        g = e[j];
        for (let k = j; k <= i - 1; k++) V[k * n + j] -= f * e[k] + g * d[k];
        d[j] = V[(i - 1) * n + j];
        V[i * n + j] = 0;
      }
    }
    d[i] = h;
  }
  // Accumulate the transformations.
  for (let i = 0; i < n - 1; i++) {
    V[(n - 1) * n + i] = V[i * n + i];
    V[i * n + i] = 1;
    const h = d[i + 1];
    if (h !== 0) {
      for (let k = 0; k <= i; k++) d[k] = V[k * n + i + 1] / h;
      for (let j = 0; j <= i; j++) {
        let g = 0;
        for (let k = 0; k <= i; k++) g += V[k * n + i + 1] * V[k * n + j];
        for (let k = 0; k <= i; k++) V[k * n + j] -= g * d[k];
      }
    }
    for (let k = 0; k <= i; k++) V[k * n + i + 1] = 0;
  }
  for (let j = 0; j < n; j++) {
    d[j] = V[(n - 1) * n + j];
    V[(n - 1) * n + j] = 0;
  }
  V[(n - 1) * n + (n - 1)] = 1;
  e[0] = 0;
}

/** Implicit QL iterations on the tridiagonal (d, e), rotating the columns of V along. */
function tridiagonalQl(n: number, V: Float64Array, d: Float64Array, e: Float64Array): void {
  for (let i = 1; i < n; i++) e[i - 1] = e[i];
  e[n - 1] = 0;
  let f = 0;
  let tst1 = 0;
  const eps = 2 ** -52;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    let m = l;
    while (m < n) {
      if (Math.abs(e[m]) <= eps * tst1) break;
      m++;
    }
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > 60) throw new Error("symmetricEigen: QL iteration did not converge");
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = Math.hypot(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f += h;
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = Math.hypot(p, e[i]);
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);
          for (let k = 0; k < n; k++) {
            const vk = k * n;
            h = V[vk + i + 1];
            V[vk + i + 1] = s * V[vk + i] + c * h;
            V[vk + i] = c * V[vk + i] - s * h;
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] += f;
    e[l] = 0;
  }
  // Sort eigenvalues ascending, with their vectors.
  for (let i = 0; i < n - 1; i++) {
    let k = i;
    let p = d[i];
    for (let j = i + 1; j < n; j++) {
      if (d[j] < p) {
        k = j;
        p = d[j];
      }
    }
    if (k !== i) {
      d[k] = d[i];
      d[i] = p;
      for (let j = 0; j < n; j++) {
        const t = V[j * n + i];
        V[j * n + i] = V[j * n + k];
        V[j * n + k] = t;
      }
    }
  }
}

/** Eigenvalues (ascending) and orthonormal eigenvectors of the symmetric n × n matrix `a` (row-major; only read). */
export function symmetricEigen(a: Float64Array, n: number): SymmetricEigen {
  if (a.length !== n * n) throw new Error(`symmetricEigen: expected ${n * n} entries, got ${a.length}`);
  const V = Float64Array.from(a);
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  if (n === 1) return { n, values: Float64Array.of(a[0]), vectors: Float64Array.of(1) };
  householderTridiagonal(n, V, d, e);
  tridiagonalQl(n, V, d, e);
  return { n, values: d, vectors: V };
}
