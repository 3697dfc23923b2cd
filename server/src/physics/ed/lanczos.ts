// Lanczos eigensolver (thick restart, full reorthogonalisation) and the Lanczos continued
// fraction for dynamical correlators.
//
// Eigensolver: Wu & Simon's thick-restart Lanczos (SIAM J. Matrix Anal. Appl. 22, 602 (2000)).
// Every new Lanczos vector is orthogonalised against all stored basis vectors (classical
// Gram-Schmidt with the DGKS second pass), so there are no ghost eigenvalues. When the Krylov
// space reaches `maxKrylov` vectors, the `keep` lowest Ritz vectors and the residual direction
// are kept and the projected matrix becomes an arrowhead. A Ritz pair (theta, y) is converged
// when its residual norm ||H y - theta y|| = |beta_m s_m| <= tol * scale, with scale the largest
// |Ritz value| seen (an estimate of ||H||).
//
// Continued fraction: plain three-term Lanczos started on phi = A|0> (no stored basis); the
// poles are the eigenvalues of the tridiagonal matrix and their weights |phi|^2 * (first
// eigenvector component)^2. Loss of orthogonality only produces duplicate ("ghost") copies of
// converged poles whose weights add up to the true weight; poles closer than `mergeTol` are
// merged.
import { symmetricEigen, tridiagonalEigen } from "./symEigen";

export interface VectorOperator {
  /** Scalars per vector (n real or 2n interleaved complex). */
  readonly length: number;
  readonly complex: boolean;
  /** Dimension of the space (number of independent components). */
  readonly dim: number;
  apply(x: Float64Array, y: Float64Array): void;
  /** Projects a vector onto the allowed components (zeroes the others). */
  mask(v: Float64Array): void;
}

export interface LoopHooks {
  /** Called once per matrix-vector product; throw to abort (cancellation). */
  onStep?(matvecs: number): void;
}

// ---------------------------------------------------------------- vector helpers

export function dotRe(a: Float64Array, b: Float64Array): number {
  let s0 = 0;
  let s1 = 0;
  const n = a.length;
  let i = 0;
  for (; i + 1 < n; i += 2) {
    s0 += a[i]! * b[i]!;
    s1 += a[i + 1]! * b[i + 1]!;
  }
  if (i < n) s0 += a[i]! * b[i]!;
  return s0 + s1;
}

/** Imaginary part of <a|b> for interleaved complex vectors. */
export function dotIm(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i += 2) s += a[i]! * b[i + 1]! - a[i + 1]! * b[i]!;
  return s;
}

/** y += (cr + i ci) x. */
export function axpy(cr: number, ci: number, x: Float64Array, y: Float64Array, complex: boolean): void {
  if (!complex || ci === 0) {
    for (let i = 0; i < y.length; i++) y[i] = y[i]! + cr * x[i]!;
    return;
  }
  for (let i = 0; i < y.length; i += 2) {
    const xr = x[i]!;
    const xi = x[i + 1]!;
    y[i] = y[i]! + cr * xr - ci * xi;
    y[i + 1] = y[i + 1]! + cr * xi + ci * xr;
  }
}

export function scaleInPlace(v: Float64Array, s: number): void {
  for (let i = 0; i < v.length; i++) v[i] = v[i]! * s;
}

export function norm(v: Float64Array): number {
  return Math.sqrt(dotRe(v, v));
}

/** Deterministic uniform generator (mulberry32). */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

// ---------------------------------------------------------------- eigensolver

export interface EigenOptions {
  /** Number of lowest eigenvalues wanted. */
  readonly nev: number;
  /** Relative residual tolerance (see header). */
  readonly tol: number;
  /** Maximum number of stored basis vectors (>= nev + 3). */
  readonly maxKrylov: number;
  readonly maxMatvecs: number;
  /** Number of eigenvectors to return (<= nev). */
  readonly vectors: number;
  readonly seed?: number;
  readonly start?: Float64Array;
}

export interface EigenResult {
  /** Lowest Ritz values, ascending (distinct levels reachable from the start vector). */
  readonly values: number[];
  readonly residuals: number[];
  readonly vectors: Float64Array[];
  readonly matvecs: number;
  readonly restarts: number;
  readonly converged: boolean;
  /** Invariant subspace reached (all eigenvalues of the Krylov space are exact). */
  readonly exhausted: boolean;
  readonly scale: number;
}

export function lanczosEigen(op: VectorOperator, opts: EigenOptions, hooks: LoopHooks = {}): EigenResult {
  const len = op.length;
  const complex = op.complex;
  const dim = op.dim;
  const nev = Math.max(1, Math.min(opts.nev, dim));
  const m = Math.max(Math.min(opts.maxKrylov, dim), Math.min(dim, nev + 3));
  const V: Float64Array[] = [];
  const T = new Float64Array(m * m);
  const coef = new Float64Array(2 * (m + 1));
  // start vector
  const v0 = new Float64Array(len);
  if (opts.start) v0.set(opts.start);
  else {
    const r = rng(opts.seed ?? 12345);
    for (let i = 0; i < len; i++) v0[i] = r() - 0.5;
  }
  op.mask(v0);
  let nv = norm(v0);
  if (!(nv > 0)) {
    const r = rng((opts.seed ?? 12345) + 1);
    for (let i = 0; i < len; i++) v0[i] = r() - 0.5;
    op.mask(v0);
    nv = norm(v0);
  }
  scaleInPlace(v0, 1 / nv);
  V.push(v0);
  let k = 0; // retained Ritz vectors in front of V
  let j = 0;
  let matvecs = 0;
  let restarts = 0;
  let scale = 0;
  let lastBeta = 0;
  const checkEvery = 4;

  const finish = (size: number) => {
    const sub = new Float64Array(size * size);
    for (let r = 0; r < size; r++) for (let c = 0; c < size; c++) sub[r * size + c] = T[r * m + c]!;
    return symmetricEigen(sub, size);
  };

  for (;;) {
    let exhausted = false;
    for (; j < m; j++) {
      if (V.length <= j + 1) V.push(new Float64Array(len));
      const w = V[j + 1]!;
      op.apply(V[j]!, w);
      matvecs++;
      hooks.onStep?.(matvecs);
      const wn0 = norm(w);
      coef.fill(0);
      let wn: number;
      if (j > k) {
        // three-term recurrence first, then one full re-orthogonalisation pass (DGKS: a second
        // pass only if the first one removed a significant part)
        axpy(-T[(j - 1) * m + j]!, 0, V[j - 1]!, w, complex);
        const a = dotRe(V[j]!, w);
        axpy(-a, 0, V[j]!, w, complex);
        coef[2 * j] = a;
        wn = norm(w);
        for (let pass = 0; pass < 2; pass++) {
          gramSchmidt(V, j + 1, w, complex, coef);
          const wn1 = norm(w);
          const again = wn1 < 0.7071 * wn;
          wn = wn1;
          if (!again) break;
        }
      } else {
        // first vector after a (re)start: full Gram-Schmidt, twice
        wn = wn0;
        for (let pass = 0; pass < 2; pass++) {
          gramSchmidt(V, j + 1, w, complex, coef);
          wn = norm(w);
        }
      }
      const alpha = coef[2 * j]!;
      T[j * m + j] = alpha;
      scale = Math.max(scale, Math.abs(alpha), wn0);
      const beta = wn;
      lastBeta = beta;
      const breakdown = beta <= 1e-13 * Math.max(scale, 1e-300) || j + 1 >= dim;
      if (!breakdown) {
        scaleInPlace(w, 1 / beta);
        if (j + 1 < m) {
          T[j * m + j + 1] = beta;
          T[(j + 1) * m + j] = beta;
        }
      }
      const size = j + 1;
      const check = breakdown || j === m - 1 || (size - k) % checkEvery === 0;
      if (!check) continue;
      const eig = finish(size);
      let sc = scale;
      for (const v of eig.values) sc = Math.max(sc, Math.abs(v));
      scale = sc;
      const want = Math.min(nev, size);
      let ok = true;
      const res: number[] = [];
      for (let i = 0; i < want; i++) {
        const r = breakdown ? 0 : Math.abs(beta * eig.vectors[(size - 1) * size + i]!);
        res.push(r);
        if (r > opts.tol * sc) ok = false;
      }
      if (breakdown) exhausted = true;
      if (ok || exhausted || matvecs >= opts.maxMatvecs) {
        const vecs: Float64Array[] = [];
        const nvec = Math.min(opts.vectors, want);
        for (let i = 0; i < nvec; i++) {
          const x = new Float64Array(len);
          for (let l = 0; l < size; l++) axpy(eig.vectors[l * size + i]!, 0, V[l]!, x, false);
          const xn = norm(x);
          scaleInPlace(x, 1 / xn);
          vecs.push(x);
        }
        return {
          values: Array.from(eig.values.subarray(0, want)),
          residuals: res,
          vectors: vecs,
          matvecs,
          restarts,
          converged: ok || exhausted,
          exhausted,
          scale: sc,
        };
      }
    }
    // ---- thick restart
    const eig = finish(m);
    const keep = Math.min(m - 2, Math.max(nev + 2, Math.floor(m / 2)));
    // V'_i = sum_l Y[l][i] V_l for i < keep, in place, in cache-sized blocks of elements
    const B = 256;
    const tmp = new Float64Array(m * B);
    for (let e0 = 0; e0 < len; e0 += B) {
      const nb = Math.min(B, len - e0);
      for (let l = 0; l < m; l++) tmp.set(V[l]!.subarray(e0, e0 + nb), l * B);
      for (let i = 0; i < keep; i++) {
        const out = V[i]!;
        for (let e = 0; e < nb; e++) out[e0 + e] = 0;
        for (let l = 0; l < m; l++) {
          const y = eig.vectors[l * m + i]!;
          if (y === 0) continue;
          const base = l * B;
          for (let e = 0; e < nb; e++) out[e0 + e] = out[e0 + e]! + y * tmp[base + e]!;
        }
      }
    }
    // residual direction becomes vector `keep`
    const resid = V[m]!;
    V[m] = V[keep]!;
    V[keep] = resid;
    T.fill(0);
    for (let i = 0; i < keep; i++) {
      T[i * m + i] = eig.values[i]!;
      const c = lastBeta * eig.vectors[(m - 1) * m + i]!;
      T[i * m + keep] = c;
      T[keep * m + i] = c;
    }
    k = keep;
    j = keep;
    restarts++;
    if (matvecs >= opts.maxMatvecs) {
      // return the current best without convergence
      const x = V[0]!.slice();
      return {
        values: Array.from(eig.values.subarray(0, nev)),
        residuals: Array.from({ length: nev }, (_, i) => Math.abs(lastBeta * eig.vectors[(m - 1) * m + i]!)),
        vectors: opts.vectors > 0 ? [x] : [],
        matvecs,
        restarts,
        converged: false,
        exhausted: false,
        scale,
      };
    }
  }
}

/**
 * Lowest eigenvalue only, by the plain three-term Lanczos recurrence (three stored vectors, no
 * re-orthogonalisation). Loss of orthogonality only adds copies of converged Ritz values, never
 * a spurious lower one, so the lowest Ritz value and its residual estimate |beta_j s_j| are
 * reliable. Used to scan sectors for energies; the ground-state vector is computed afterwards
 * with `lanczosEigen`.
 */
export function lanczosLowest(
  op: VectorOperator,
  opts: { readonly tol: number; readonly maxMatvecs: number; readonly seed?: number },
  hooks: LoopHooks = {},
): { value: number; residual: number; matvecs: number; converged: boolean } {
  const len = op.length;
  const complex = op.complex;
  let v = new Float64Array(len);
  const r0 = rng(opts.seed ?? 12345);
  for (let i = 0; i < len; i++) v[i] = r0() - 0.5;
  op.mask(v);
  scaleInPlace(v, 1 / norm(v));
  let vPrev = new Float64Array(len);
  let w = new Float64Array(len);
  const alpha: number[] = [];
  const beta: number[] = [];
  let scale = 0;
  const maxIt = Math.min(opts.maxMatvecs, op.dim);
  let value = NaN;
  let residual = Infinity;
  for (let j = 0; j < maxIt; j++) {
    op.apply(v, w);
    hooks.onStep?.(j + 1);
    if (j > 0) axpy(-beta[j - 1]!, 0, vPrev, w, complex);
    let a = dotRe(v, w);
    axpy(-a, 0, v, w, complex);
    const a2 = dotRe(v, w);
    axpy(-a2, 0, v, w, complex);
    a += a2;
    alpha.push(a);
    const b = norm(w);
    scale = Math.max(scale, Math.abs(a), b);
    const breakdown = b <= 1e-13 * Math.max(scale, 1e-300) || j + 1 >= op.dim;
    if (breakdown || (j + 1) % 5 === 0 || j + 1 === maxIt) {
      const eig = tridiagonalEigen(alpha, beta, j + 1, [j]);
      value = eig.values[0]!;
      for (const x of eig.values) scale = Math.max(scale, Math.abs(x));
      residual = breakdown ? 0 : Math.abs(b * eig.rows[0]![0]!);
      if (breakdown || residual <= opts.tol * scale) return { value, residual, matvecs: j + 1, converged: true };
    }
    beta.push(b);
    scaleInPlace(w, 1 / b);
    const t = vPrev;
    vPrev = v;
    v = w;
    w = t;
  }
  return { value, residual, matvecs: maxIt, converged: false };
}


/**
 * One classical Gram-Schmidt pass of w against V[0..count-1]: all projections first, then one
 * fused update (four basis vectors per sweep over w). Adds the real parts of the projections
 * to coef[2 i].
 */
function gramSchmidt(V: Float64Array[], count: number, w: Float64Array, complex: boolean, coef: Float64Array): void {
  const cr = new Float64Array(count);
  const ci = new Float64Array(count);
  const n = w.length;
  let i = 0;
  for (; i + 3 < count; i += 4) {
    const a = V[i]!;
    const b = V[i + 1]!;
    const c = V[i + 2]!;
    const d = V[i + 3]!;
    let sa = 0;
    let sb = 0;
    let sc = 0;
    let sd = 0;
    for (let e = 0; e < n; e++) {
      const x = w[e]!;
      sa += a[e]! * x;
      sb += b[e]! * x;
      sc += c[e]! * x;
      sd += d[e]! * x;
    }
    cr[i] = sa;
    cr[i + 1] = sb;
    cr[i + 2] = sc;
    cr[i + 3] = sd;
  }
  for (; i < count; i++) cr[i] = dotRe(V[i]!, w);
  if (complex) {
    let k = 0;
    for (; k + 1 < count; k += 2) {
      const a = V[k]!;
      const b = V[k + 1]!;
      let sa = 0;
      let sb = 0;
      for (let e = 0; e < n; e += 2) {
        const xr = w[e]!;
        const xi = w[e + 1]!;
        sa += a[e]! * xi - a[e + 1]! * xr;
        sb += b[e]! * xi - b[e + 1]! * xr;
      }
      ci[k] = sa;
      ci[k + 1] = sb;
    }
    for (; k < count; k++) ci[k] = dotIm(V[k]!, w);
  }
  for (let k = 0; k < count; k++) coef[2 * k] = coef[2 * k]! + cr[k]!;
  if (!complex) {
    let k = 0;
    for (; k + 3 < count; k += 4) {
      const a = V[k]!;
      const b = V[k + 1]!;
      const c = V[k + 2]!;
      const d = V[k + 3]!;
      const ca = cr[k]!;
      const cb = cr[k + 1]!;
      const cc = cr[k + 2]!;
      const cd = cr[k + 3]!;
      for (let e = 0; e < n; e++) w[e] = w[e]! - (ca * a[e]! + cb * b[e]! + cc * c[e]! + cd * d[e]!);
    }
    for (; k < count; k++) axpy(-cr[k]!, 0, V[k]!, w, false);
  } else {
    let k = 0;
    for (; k + 1 < count; k += 2) {
      const a = V[k]!;
      const b = V[k + 1]!;
      const ar = cr[k]!;
      const ai = ci[k]!;
      const br = cr[k + 1]!;
      const bi = ci[k + 1]!;
      for (let e = 0; e < n; e += 2) {
        const a0 = a[e]!;
        const a1 = a[e + 1]!;
        const b0 = b[e]!;
        const b1 = b[e + 1]!;
        w[e] = w[e]! - (ar * a0 - ai * a1 + br * b0 - bi * b1);
        w[e + 1] = w[e + 1]! - (ar * a1 + ai * a0 + br * b1 + bi * b0);
      }
    }
    for (; k < count; k++) axpy(-cr[k]!, -ci[k]!, V[k]!, w, true);
  }
}

// ---------------------------------------------------------------- continued fraction

export interface Pole {
  /** Eigenvalue of H (absolute energy). */
  readonly energy: number;
  readonly weight: number;
}

export interface ContinuedFraction {
  readonly alpha: number[];
  readonly beta: number[];
  readonly norm2: number;
  readonly poles: Pole[];
  readonly steps: number;
  /** Fraction of the weight in poles whose Ritz residual is above the pole tolerance. */
  readonly unconvergedWeight: number;
  /** Largest weight fraction of a single unconverged pole. */
  readonly largestUnconverged: number;
}

export interface ContinuedFractionOptions {
  readonly maxSteps: number;
  /** Relative residual below which a pole counts as converged. */
  readonly poleTol: number;
  /** Stop when no unconverged pole holds more than this fraction of the weight. */
  readonly weightTol: number;
  /** Relative energy distance (times scale) below which poles are merged. */
  readonly mergeTol: number;
}

/** Continued fractions in spaces up to this dimension keep their basis (full re-orthogonalisation). */
const FULL_REORTH_DIM = 1500;

export function continuedFraction(
  op: VectorOperator,
  phi: Float64Array,
  opts: ContinuedFractionOptions,
  hooks: LoopHooks = {},
): ContinuedFraction {
  const complex = op.complex;
  const norm2 = dotRe(phi, phi);
  const alpha: number[] = [];
  const beta: number[] = [];
  if (!(norm2 > 0))
    return { alpha, beta, norm2: 0, poles: [], steps: 0, unconvergedWeight: 0, largestUnconverged: 0 };
  let vPrev = new Float64Array(op.length);
  let v = phi.slice();
  scaleInPlace(v, 1 / Math.sqrt(norm2));
  let w = new Float64Array(op.length);
  let scale = 0;
  let result: { poles: Pole[]; unconverged: number; largest: number } | null = null;
  const maxSteps = Math.max(1, opts.maxSteps);
  // small spaces: keep the basis and re-orthogonalise fully (exact termination, no ghosts)
  const full = op.dim <= FULL_REORTH_DIM;
  const basis: Float64Array[] = [];
  const coef = new Float64Array(2 * (maxSteps + 1));
  for (let j = 0; j < maxSteps; j++) {
    if (full) basis.push(v.slice());
    op.apply(v, w);
    hooks.onStep?.(j + 1);
    const wn0 = norm(w);
    let a = dotRe(v, w);
    axpy(-a, 0, v, w, complex);
    if (j > 0) axpy(-beta[j - 1]!, 0, vPrev, w, complex);
    // one local re-orthogonalisation against v (cheap, improves alpha)
    const a2 = dotRe(v, w);
    axpy(-a2, 0, v, w, complex);
    a += a2;
    if (complex) {
      // the imaginary part of <v|w> is rounding; remove it as well
      const i2 = dotIm(v, w);
      axpy(0, -i2, v, w, complex);
    }
    if (full) {
      coef.fill(0);
      gramSchmidt(basis, basis.length, w, complex, coef);
      gramSchmidt(basis, basis.length, w, complex, coef);
    }
    alpha.push(a);
    scale = Math.max(scale, Math.abs(a), wn0);
    const b = norm(w);
    const last = j === maxSteps - 1;
    const breakdown = b <= 1e-12 * Math.max(scale, 1e-300) || (full && j + 1 >= op.dim);
    const check = breakdown || last || (j + 1) % 10 === 0;
    if (check) {
      result = polesOf(alpha, beta, breakdown ? 0 : b, norm2, scale, opts);
      if (breakdown || last || result.largest <= opts.weightTol) {
        return {
          alpha,
          beta,
          norm2,
          poles: result.poles,
          steps: j + 1,
          unconvergedWeight: result.unconverged,
          largestUnconverged: result.largest,
        };
      }
    }
    beta.push(b);
    scaleInPlace(w, 1 / b);
    const t = vPrev;
    vPrev = v;
    v = w;
    w = t;
  }
  // not reached
  const r = polesOf(alpha, beta, 0, norm2, scale, opts);
  return {
    alpha,
    beta,
    norm2,
    poles: r.poles,
    steps: alpha.length,
    unconvergedWeight: r.unconverged,
    largestUnconverged: r.largest,
  };
}

function polesOf(
  alpha: number[],
  beta: number[],
  betaLast: number,
  norm2: number,
  scale: number,
  opts: ContinuedFractionOptions,
): { poles: Pole[]; unconverged: number; largest: number } {
  const n = alpha.length;
  const eig = tridiagonalEigen(alpha, beta, n, n > 1 ? [0, n - 1] : [0]);
  const first = eig.rows[0]!;
  const lastRow = eig.rows[n > 1 ? 1 : 0]!;
  const raw: { e: number; w: number; conv: boolean }[] = [];
  let uncon = 0;
  let largest = 0;
  for (let i = 0; i < n; i++) {
    const w = norm2 * first[i]! * first[i]!;
    const conv = Math.abs(betaLast * lastRow[i]!) <= opts.poleTol * Math.max(scale, 1e-300);
    if (!conv) {
      uncon += w;
      largest = Math.max(largest, w);
    }
    raw.push({ e: eig.values[i]!, w, conv });
  }
  // merge ghosts / near-degenerate poles
  const poles: Pole[] = [];
  const tolE = opts.mergeTol * Math.max(scale, 1e-300);
  let i = 0;
  while (i < raw.length) {
    let wsum = raw[i]!.w;
    let esum = raw[i]!.e * raw[i]!.w;
    let j = i + 1;
    while (j < raw.length && raw[j]!.e - raw[j - 1]!.e <= tolE) {
      wsum += raw[j]!.w;
      esum += raw[j]!.e * raw[j]!.w;
      j++;
    }
    const e = wsum > 0 ? esum / wsum : raw[i]!.e;
    if (wsum > 1e-15 * norm2) poles.push({ energy: e, weight: wsum });
    i = j;
  }
  return { poles, unconverged: uncon / norm2, largest: largest / norm2 };
}
