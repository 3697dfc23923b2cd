// Test-only dense reference, deliberately independent of the engine: the Hamiltonian of a
// SpinCluster is built in the LAB frame from Kronecker products of spin matrices (site 0 is the
// most significant factor, the engine uses the opposite order and relabels sites), and
// diagonalized with mathjs `eigs` (general-purpose reference) on the real symmetric embedding
// [[A, -B], [B, A]] of the Hermitian matrix A + iB. Every complex eigenvalue appears twice in
// the embedding; spectral weights of a complex vector phi are sums over all real eigenvectors
// of (u . [Re phi; Im phi])^2, which equals the complex weight without double counting.
import { eigs } from "mathjs";
import type { SpinCluster, Vec3 } from "../types";

export interface DenseC {
  n: number;
  re: Float64Array;
  im: Float64Array;
}

function zeros(n: number): DenseC {
  return { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
}

/** Spin matrices in the basis m = S, S-1, ..., -S (descending: another convention than the engine). */
export function spinMatrices(S: number): { x: DenseC; y: DenseC; z: DenseC } {
  const d = Math.round(2 * S) + 1;
  const x = zeros(d);
  const y = zeros(d);
  const z = zeros(d);
  for (let r = 0; r < d; r++) {
    const m = S - r;
    z.re[r * d + r] = m;
    // <m+1|S+|m> at (r-1, r)
    if (r > 0) {
      const amp = Math.sqrt(S * (S + 1) - m * (m + 1));
      // S+ element (r-1, r) = amp, S- element (r, r-1) = amp
      x.re[(r - 1) * d + r]! += amp / 2;
      x.re[r * d + (r - 1)]! += amp / 2;
      // S^y = (S+ - S-)/(2i): element (r-1, r) = amp/(2i) = -i amp/2, (r, r-1) = +i amp/2
      y.im[(r - 1) * d + r]! += -amp / 2;
      y.im[r * d + (r - 1)]! += amp / 2;
    }
  }
  return { x, y, z };
}

function identity(d: number): DenseC {
  const m = zeros(d);
  for (let i = 0; i < d; i++) m.re[i * d + i] = 1;
  return m;
}

function kron(a: DenseC, b: DenseC): DenseC {
  const n = a.n * b.n;
  const out = zeros(n);
  for (let i = 0; i < a.n; i++)
    for (let j = 0; j < a.n; j++) {
      const ar = a.re[i * a.n + j]!;
      const ai = a.im[i * a.n + j]!;
      if (ar === 0 && ai === 0) continue;
      for (let k = 0; k < b.n; k++)
        for (let l = 0; l < b.n; l++) {
          const br = b.re[k * b.n + l]!;
          const bi = b.im[k * b.n + l]!;
          const idx = (i * b.n + k) * n + (j * b.n + l);
          out.re[idx] = ar * br - ai * bi;
          out.im[idx] = ar * bi + ai * br;
        }
    }
  return out;
}

function mul(a: DenseC, b: DenseC): DenseC {
  const n = a.n;
  const out = zeros(n);
  for (let i = 0; i < n; i++)
    for (let k = 0; k < n; k++) {
      const ar = a.re[i * n + k]!;
      const ai = a.im[i * n + k]!;
      if (ar === 0 && ai === 0) continue;
      for (let j = 0; j < n; j++) {
        out.re[i * n + j]! += ar * b.re[k * n + j]! - ai * b.im[k * n + j]!;
        out.im[i * n + j]! += ar * b.im[k * n + j]! + ai * b.re[k * n + j]!;
      }
    }
  return out;
}

function addScaled(acc: DenseC, m: DenseC, cr: number, ci = 0): void {
  for (let k = 0; k < acc.re.length; k++) {
    acc.re[k]! += cr * m.re[k]! - ci * m.im[k]!;
    acc.im[k]! += cr * m.im[k]! + ci * m.re[k]!;
  }
}

/** Operator O acting on site i of the full space (sites ordered 0 = most significant). */
export function embed(op: DenseC, site: number, dims: readonly number[]): DenseC {
  let out: DenseC | null = null;
  for (let s = 0; s < dims.length; s++) {
    const f = s === site ? op : identity(dims[s]!);
    out = out ? kron(out, f) : f;
  }
  return out!;
}

/** Component of the spin along a unit axis u on site i. */
export function spinAlong(S: number, u: Vec3): DenseC {
  const m = spinMatrices(S);
  const out = zeros(m.x.n);
  addScaled(out, m.x, u[0]);
  addScaled(out, m.y, u[1]);
  addScaled(out, m.z, u[2]);
  return out;
}

export function denseHamiltonian(c: SpinCluster): DenseC {
  const dims = c.spins.map((s) => Math.round(2 * s) + 1);
  const D = dims.reduce((a, b) => a * b, 1);
  const H = zeros(D);
  const comps = c.spins.map((S, i) => {
    const m = spinMatrices(S);
    return [embed(m.x, i, dims), embed(m.y, i, dims), embed(m.z, i, dims)];
  });
  for (const b of c.bonds)
    for (let a = 0; a < 3; a++)
      for (let bb = 0; bb < 3; bb++) {
        const J = b.matrix[a]![bb]!;
        if (J !== 0) addScaled(H, mul(comps[b.i]![a]!, comps[b.j]![bb]!), J);
      }
  for (const t of c.singleIon)
    for (let a = 0; a < 3; a++)
      for (let bb = 0; bb < 3; bb++) {
        const A = t.matrix[a]![bb]!;
        if (A !== 0) addScaled(H, mul(comps[t.site]![a]!, comps[t.site]![bb]!), A);
      }
  c.fields.forEach((h, i) => {
    for (let a = 0; a < 3; a++) if (h[a] !== 0) addScaled(H, comps[i]![a]!, -h[a]!);
  });
  return H;
}

/** Restriction of a dense operator to the basis indices `keep`. */
export function restrict(M: DenseC, keep: readonly number[]): DenseC {
  const n = keep.length;
  const out = zeros(n);
  for (let a = 0; a < n; a++)
    for (let b = 0; b < n; b++) {
      out.re[a * n + b] = M.re[keep[a]! * M.n + keep[b]!]!;
      out.im[a * n + b] = M.im[keep[a]! * M.n + keep[b]!]!;
    }
  return out;
}

/** Total S^z of each basis state (lab z). */
export function basisSz(spins: readonly number[]): number[] {
  const dims = spins.map((s) => Math.round(2 * s) + 1);
  const D = dims.reduce((a, b) => a * b, 1);
  const out: number[] = [];
  for (let idx = 0; idx < D; idx++) {
    let rem = idx;
    let sz = 0;
    for (let s = dims.length - 1; s >= 0; s--) {
      const r = rem % dims[s]!;
      rem = Math.floor(rem / dims[s]!);
      sz += spins[s]! - r;
    }
    out.push(sz);
  }
  return out;
}

export interface DenseEigen {
  /** Complex eigenvalues (each once), ascending. */
  values: number[];
  /** Real-embedded eigen-pairs (2n of them). */
  realValues: number[];
  realVectors: Float64Array[];
  n: number;
}

export function denseEigen(H: DenseC): DenseEigen {
  const n = H.n;
  const M: number[][] = [];
  for (let r = 0; r < 2 * n; r++) M.push(new Array<number>(2 * n).fill(0));
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) {
      const a = 0.5 * (H.re[i * n + j]! + H.re[j * n + i]!);
      const b = 0.5 * (H.im[i * n + j]! - H.im[j * n + i]!);
      M[i]![j] = a;
      M[i + n]![j + n] = a;
      M[i]![j + n] = -b;
      M[i + n]![j] = b;
    }
  const r = eigs(M, { eigenvectors: true }) as unknown as {
    values: number[];
    eigenvectors: { value: number; vector: number[] }[];
  };
  const pairs = r.eigenvectors
    .map((e) => ({ value: Number(e.value), vector: Float64Array.from(e.vector.map(Number)) }))
    .sort((a, b) => a.value - b.value);
  const realValues = pairs.map((p) => p.value);
  const values: number[] = [];
  for (let k = 0; k < realValues.length; k += 2) values.push(realValues[k]!);
  return { values, realValues, realVectors: pairs.map((p) => p.vector), n };
}

/** Ground state as a complex vector (re, im) from the embedding. */
export function denseGround(e: DenseEigen): { re: Float64Array; im: Float64Array; energy: number } {
  const v = e.realVectors[0]!;
  return { re: v.slice(0, e.n), im: v.slice(e.n), energy: e.realValues[0]! };
}

export function applyDense(M: DenseC, re: Float64Array, im: Float64Array): { re: Float64Array; im: Float64Array } {
  const n = M.n;
  const or = new Float64Array(n);
  const oi = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sr = 0;
    let si = 0;
    for (let j = 0; j < n; j++) {
      const mr = M.re[i * n + j]!;
      const mi = M.im[i * n + j]!;
      if (mr === 0 && mi === 0) continue;
      sr += mr * re[j]! - mi * im[j]!;
      si += mr * im[j]! + mi * re[j]!;
    }
    or[i] = sr;
    oi[i] = si;
  }
  return { re: or, im: oi };
}

/** Spectral moments sum_n w_n (E_n - E0)^p, p = 0..pMax, of phi over the dense eigenbasis. */
export function denseMoments(e: DenseEigen, phi: { re: Float64Array; im: Float64Array }, E0: number, pMax: number): number[] {
  const out = new Array<number>(pMax + 1).fill(0);
  for (let k = 0; k < e.realVectors.length; k++) {
    const u = e.realVectors[k]!;
    let s = 0;
    for (let i = 0; i < e.n; i++) s += u[i]! * phi.re[i]! + u[i + e.n]! * phi.im[i]!;
    const w = s * s;
    const x = e.realValues[k]! - E0;
    for (let p = 0; p <= pMax; p++) out[p]! += w * x ** p;
  }
  return out;
}

/** Dense weights grouped by energy (clusters closer than tol). */
export function denseWeights(
  e: DenseEigen,
  phi: { re: Float64Array; im: Float64Array },
  E0: number,
  tol: number,
): { energy: number; weight: number }[] {
  const raw: { energy: number; weight: number }[] = [];
  for (let k = 0; k < e.realVectors.length; k++) {
    const u = e.realVectors[k]!;
    let s = 0;
    for (let i = 0; i < e.n; i++) s += u[i]! * phi.re[i]! + u[i + e.n]! * phi.im[i]!;
    raw.push({ energy: e.realValues[k]! - E0, weight: s * s });
  }
  const out: { energy: number; weight: number }[] = [];
  for (const r of raw) {
    const last = out[out.length - 1];
    if (last && r.energy - last.energy <= tol) last.weight += r.weight;
    else out.push({ ...r });
  }
  return out;
}

/** sum_j c_j O_j as a dense operator. */
export function sumOfSiteOps(
  spins: readonly number[],
  make: (S: number, site: number) => { op: DenseC; cr: number; ci: number },
): DenseC {
  const dims = spins.map((s) => Math.round(2 * s) + 1);
  const D = dims.reduce((a, b) => a * b, 1);
  const out = zeros(D);
  spins.forEach((S, i) => {
    const { op, cr, ci } = make(S, i);
    addScaled(out, embed(op, i, dims), cr, ci);
  });
  return out;
}

/** Spin lowering/raising/z along a frame (e1, e2, n): S^- = S.e1 - i S.e2, S^+ = S.e1 + i S.e2. */
export function frameOps(S: number, e1: Vec3, e2: Vec3, n: Vec3): { minus: DenseC; plus: DenseC; z: DenseC } {
  const a = spinAlong(S, e1);
  const b = spinAlong(S, e2);
  const minus = zeros(a.n);
  addScaled(minus, a, 1);
  addScaled(minus, b, 0, -1);
  const plus = zeros(a.n);
  addScaled(plus, a, 1);
  addScaled(plus, b, 0, 1);
  return { minus, plus, z: spinAlong(S, n) };
}

export function denseProduct(a: DenseC, b: DenseC): DenseC {
  return mul(a, b);
}

export function denseSum(terms: { m: DenseC; cr: number; ci?: number }[]): DenseC {
  const out = zeros(terms[0]!.m.n);
  for (const t of terms) addScaled(out, t.m, t.cr, t.ci ?? 0);
  return out;
}

export function denseEmbed(op: DenseC, site: number, spins: readonly number[]): DenseC {
  return embed(op, site, spins.map((s) => Math.round(2 * s) + 1));
}
