// Dense real symmetric eigensolvers for the small projected matrices of Lanczos:
// Householder tridiagonalisation + implicit QL (EISPACK tred2/tql2, in the form of the public
// domain JAMA library), and a tridiagonal QL that tracks only selected rows of the eigenvector
// matrix (first / last components for continued fractions and residual estimates).

export interface SymEigen {
  /** Eigenvalues ascending. */
  readonly values: Float64Array;
  /** Eigenvectors: vectors[k * n + j] = component k of eigenvector j. */
  readonly vectors: Float64Array;
}

/** Full eigen-decomposition of a dense symmetric matrix (row-major n x n, not modified). */
export function symmetricEigen(a: Float64Array, n: number): SymEigen {
  const V = Float64Array.from(a.subarray(0, n * n));
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  if (n === 0) return { values: d, vectors: V };
  if (n === 1) {
    d[0] = V[0]!;
    V[0] = 1;
    return { values: d, vectors: V };
  }
  tred2(n, V, d, e);
  for (let i = 1; i < n; i++) e[i - 1] = e[i]!;
  e[n - 1] = 0;
  tql2(n, d, e, V, n, null);
  return sortPairs(n, d, V, n);
}

/**
 * Eigenvalues of the symmetric tridiagonal matrix with diagonal `diag` (length n) and
 * off-diagonal `off` (length >= n-1), and the rows `rows` of its eigenvector matrix:
 * out.rows[r][j] = component rows[r] of eigenvector j.
 */
export function tridiagonalEigen(
  diag: ArrayLike<number>,
  off: ArrayLike<number>,
  n: number,
  rows: readonly number[],
): { values: Float64Array; rows: Float64Array[] } {
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  for (let i = 0; i < n; i++) d[i] = diag[i]!;
  for (let i = 0; i < n - 1; i++) e[i] = off[i]!;
  const nr = rows.length;
  const Z = new Float64Array(nr * n);
  for (let r = 0; r < nr; r++) Z[r * n + rows[r]!] = 1;
  if (n > 1) tql2(n, d, e, Z, nr, null);
  const sorted = sortPairs(n, d, Z, nr);
  const out: Float64Array[] = [];
  for (let r = 0; r < nr; r++) out.push(sorted.vectors.slice(r * n, (r + 1) * n));
  return { values: sorted.values, rows: out };
}

function sortPairs(n: number, d: Float64Array, V: Float64Array, nRows: number): SymEigen {
  const idx = Array.from({ length: n }, (_, i) => i).sort((i, j) => d[i]! - d[j]!);
  const values = new Float64Array(n);
  const vectors = new Float64Array(nRows * n);
  for (let j = 0; j < n; j++) {
    const s = idx[j]!;
    values[j] = d[s]!;
    for (let k = 0; k < nRows; k++) vectors[k * n + j] = V[k * n + s]!;
  }
  return { values, vectors };
}

function tred2(n: number, V: Float64Array, d: Float64Array, e: Float64Array): void {
  for (let j = 0; j < n; j++) d[j] = V[(n - 1) * n + j]!;
  for (let i = n - 1; i > 0; i--) {
    let scale = 0;
    let h = 0;
    for (let k = 0; k < i; k++) scale += Math.abs(d[k]!);
    if (scale === 0) {
      e[i] = d[i - 1]!;
      for (let j = 0; j < i; j++) {
        d[j] = V[(i - 1) * n + j]!;
        V[i * n + j] = 0;
        V[j * n + i] = 0;
      }
    } else {
      for (let k = 0; k < i; k++) {
        d[k] = d[k]! / scale;
        h += d[k]! * d[k]!;
      }
      let f = d[i - 1]!;
      let g = Math.sqrt(h);
      if (f > 0) g = -g;
      e[i] = scale * g;
      h = h - f * g;
      d[i - 1] = f - g;
      for (let j = 0; j < i; j++) e[j] = 0;
      for (let j = 0; j < i; j++) {
        f = d[j]!;
        V[j * n + i] = f;
        g = e[j]! + V[j * n + j]! * f;
        for (let k = j + 1; k <= i - 1; k++) {
          g += V[k * n + j]! * d[k]!;
          e[k] = e[k]! + V[k * n + j]! * f;
        }
        e[j] = g;
      }
      f = 0;
      for (let j = 0; j < i; j++) {
        e[j] = e[j]! / h;
        f += e[j]! * d[j]!;
      }
      const hh = f / (h + h);
      for (let j = 0; j < i; j++) e[j] = e[j]! - hh * d[j]!;
      for (let j = 0; j < i; j++) {
        f = d[j]!;
        g = e[j]!;
        for (let k = j; k <= i - 1; k++) V[k * n + j] = V[k * n + j]! - (f * e[k]! + g * d[k]!);
        d[j] = V[(i - 1) * n + j]!;
        V[i * n + j] = 0;
      }
    }
    d[i] = h;
  }
  for (let i = 0; i < n - 1; i++) {
    V[(n - 1) * n + i] = V[i * n + i]!;
    V[i * n + i] = 1;
    const h = d[i + 1]!;
    if (h !== 0) {
      for (let k = 0; k <= i; k++) d[k] = V[k * n + i + 1]! / h;
      for (let j = 0; j <= i; j++) {
        let g = 0;
        for (let k = 0; k <= i; k++) g += V[k * n + i + 1]! * V[k * n + j]!;
        for (let k = 0; k <= i; k++) V[k * n + j] = V[k * n + j]! - g * d[k]!;
      }
    }
    for (let k = 0; k <= i; k++) V[k * n + i + 1] = 0;
  }
  for (let j = 0; j < n; j++) {
    d[j] = V[(n - 1) * n + j]!;
    V[(n - 1) * n + j] = 0;
  }
  V[(n - 1) * n + n - 1] = 1;
  e[0] = 0;
}

/**
 * Implicit QL on the tridiagonal (d, e) with e[i] = T[i][i+1], e[n-1] = 0. Rotations are
 * applied to the nRows rows of Z (row-major nRows x n).
 */
function tql2(n: number, d: Float64Array, e: Float64Array, Z: Float64Array, nRows: number, _unused: null): void {
  let f = 0;
  let tst1 = 0;
  const eps = 2 ** -52;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]!) + Math.abs(e[l]!));
    let m = l;
    while (m < n) {
      if (Math.abs(e[m]!) <= eps * tst1) break;
      m++;
    }
    if (m === n) m = n - 1;
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > 300) throw new Error("tql2: no convergence");
        let g = d[l]!;
        let p = (d[l + 1]! - g) / (2 * e[l]!);
        let r = Math.hypot(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l]! / (p + r);
        d[l + 1] = e[l]! * (p + r);
        const dl1 = d[l + 1]!;
        let h = g - d[l]!;
        for (let i = l + 2; i < n; i++) d[i] = d[i]! - h;
        f += h;
        p = d[m]!;
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1]!;
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i]!;
          h = c * p;
          r = Math.hypot(p, e[i]!);
          e[i + 1] = s * r;
          s = e[i]! / r;
          c = p / r;
          p = c * d[i]! - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]!);
          for (let k = 0; k < nRows; k++) {
            const row = k * n;
            const zh = Z[row + i + 1]!;
            const zi = Z[row + i]!;
            Z[row + i + 1] = s * zi + c * zh;
            Z[row + i] = c * zi - s * zh;
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]!) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]!) > eps * tst1);
    }
    d[l] = d[l]! + f;
    e[l] = 0;
  }
}
