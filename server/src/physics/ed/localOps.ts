// Local (one- and two-site) operators of a spin cluster in the S^z product basis, the frame
// rotation that makes a conserved axis n the z axis, and the U(1) consistency check.
//
// Local basis of a spin S: index a = 0 .. 2S with magnetic quantum number m = a - S
// (a = 0 is m = -S). S^+ |m> = sqrt(S(S+1) - m(m+1)) |m+1>.
// Two-site operators act on the product index a_i * d_j + a_j.
import type { Mat3, Vec3 } from "../types";
import { cross3, dot3, mulMat3, mulMatVec3, normalize3, transpose3 } from "../linalg3";

/** Small dense complex matrix, row-major: element (r, c) at r * n + c. */
export interface CMat {
  readonly n: number;
  readonly re: Float64Array;
  readonly im: Float64Array;
}

export function cmatZero(n: number): CMat {
  return { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
}

export function cmatAddScaled(acc: CMat, m: CMat, sRe: number, sIm: number): void {
  for (let k = 0; k < acc.re.length; k++) {
    const a = m.re[k]!;
    const b = m.im[k]!;
    acc.re[k]! += sRe * a - sIm * b;
    acc.im[k]! += sRe * b + sIm * a;
  }
}

export function cmatMul(a: CMat, b: CMat): CMat {
  const n = a.n;
  const out = cmatZero(n);
  for (let r = 0; r < n; r++)
    for (let k = 0; k < n; k++) {
      const ar = a.re[r * n + k]!;
      const ai = a.im[r * n + k]!;
      if (ar === 0 && ai === 0) continue;
      for (let c = 0; c < n; c++) {
        const br = b.re[k * n + c]!;
        const bi = b.im[k * n + c]!;
        out.re[r * n + c]! += ar * br - ai * bi;
        out.im[r * n + c]! += ar * bi + ai * br;
      }
    }
  return out;
}

/** Kronecker product a (x) b. */
export function cmatKron(a: CMat, b: CMat): CMat {
  const na = a.n;
  const nb = b.n;
  const n = na * nb;
  const out = cmatZero(n);
  for (let r1 = 0; r1 < na; r1++)
    for (let c1 = 0; c1 < na; c1++) {
      const ar = a.re[r1 * na + c1]!;
      const ai = a.im[r1 * na + c1]!;
      if (ar === 0 && ai === 0) continue;
      for (let r2 = 0; r2 < nb; r2++)
        for (let c2 = 0; c2 < nb; c2++) {
          const br = b.re[r2 * nb + c2]!;
          const bi = b.im[r2 * nb + c2]!;
          const idx = (r1 * nb + r2) * n + (c1 * nb + c2);
          out.re[idx] = ar * br - ai * bi;
          out.im[idx] = ar * bi + ai * br;
        }
    }
  return out;
}

export function cmatMaxAbs(m: CMat): number {
  let s = 0;
  for (let k = 0; k < m.re.length; k++) s = Math.max(s, Math.abs(m.re[k]!), Math.abs(m.im[k]!));
  return s;
}

/** Spin matrices (x, y, z, +, -) for spin S in the local basis described above. */
export interface SpinOps {
  readonly d: number;
  readonly x: CMat;
  readonly y: CMat;
  readonly z: CMat;
  readonly plus: CMat;
  readonly minus: CMat;
}

const spinOpsCache = new Map<number, SpinOps>();

export function spinOps(S: number): SpinOps {
  const cached = spinOpsCache.get(S);
  if (cached) return cached;
  const d = Math.round(2 * S) + 1;
  const z = cmatZero(d);
  const plus = cmatZero(d);
  const minus = cmatZero(d);
  for (let a = 0; a < d; a++) {
    const m = a - S;
    z.re[a * d + a] = m;
    if (a + 1 < d) {
      const amp = Math.sqrt(S * (S + 1) - m * (m + 1));
      plus.re[(a + 1) * d + a] = amp; // <a+1| S^+ |a>
      minus.re[a * d + (a + 1)] = amp; // <a| S^- |a+1>
    }
  }
  const x = cmatZero(d);
  cmatAddScaled(x, plus, 0.5, 0);
  cmatAddScaled(x, minus, 0.5, 0);
  const y = cmatZero(d); // S^y = (S^+ - S^-) / (2i) = -i/2 S^+ + i/2 S^-
  cmatAddScaled(y, plus, 0, -0.5);
  cmatAddScaled(y, minus, 0, 0.5);
  const ops: SpinOps = { d, x, y, z, plus, minus };
  spinOpsCache.set(S, ops);
  return ops;
}

function cartesian(ops: SpinOps): readonly [CMat, CMat, CMat] {
  return [ops.x, ops.y, ops.z];
}

/** Two-site operator sum_ab J_ab S^a_i S^b_j on the product space (index a_i * d_j + a_j). */
export function bondOperator(Si: number, Sj: number, J: Mat3): CMat {
  const oi = cartesian(spinOps(Si));
  const oj = cartesian(spinOps(Sj));
  const n = oi[0].n * oj[0].n;
  const out = cmatZero(n);
  for (let a = 0; a < 3; a++)
    for (let b = 0; b < 3; b++) {
      const c = J[a]![b]!;
      if (c === 0) continue;
      cmatAddScaled(out, cmatKron(oi[a]!, oj[b]!), c, 0);
    }
  return out;
}

/** One-site operator S.A.S - h.S for spin S. */
export function siteOperator(S: number, A: Mat3 | null, h: Vec3 | null): CMat {
  const o = cartesian(spinOps(S));
  const d = o[0].n;
  const out = cmatZero(d);
  if (A)
    for (let a = 0; a < 3; a++)
      for (let b = 0; b < 3; b++) {
        const c = A[a]![b]!;
        if (c === 0) continue;
        cmatAddScaled(out, cmatMul(o[a]!, o[b]!), c, 0);
      }
  if (h) for (let a = 0; a < 3; a++) if (h[a] !== 0) cmatAddScaled(out, o[a]!, -h[a]!, 0);
  return out;
}

/**
 * Rotation R (rows = new frame axes in lab coordinates) with R n = z. Spin components in the new
 * frame are S' = R S, so S_i.J.S_j = S'_i.(R J R^T).S'_j and h.S = (R h).S'.
 * For n along +z the identity is returned (no needless rotation).
 */
export function frameRotation(n: Vec3): Mat3 {
  const ez = normalize3(n);
  if (!ez) throw new Error("frame axis must be a non-zero vector");
  if (Math.abs(ez[0]) < 1e-15 && Math.abs(ez[1]) < 1e-15) {
    if (ez[2] > 0) return [[1, 0, 0], [0, 1, 0], [0, 0, 1]];
    return [[1, 0, 0], [0, -1, 0], [0, 0, -1]];
  }
  // x' from the lab axis least aligned with n, projected into the plane perpendicular to n.
  const abs = [Math.abs(ez[0]), Math.abs(ez[1]), Math.abs(ez[2])];
  const axis = abs[0]! <= abs[1]! && abs[0]! <= abs[2]! ? 0 : abs[1]! <= abs[2]! ? 1 : 2;
  const a: Vec3 = [axis === 0 ? 1 : 0, axis === 1 ? 1 : 0, axis === 2 ? 1 : 0];
  const p = dot3(a, ez);
  const ex = normalize3([a[0] - p * ez[0], a[1] - p * ez[1], a[2] - p * ez[2]])!;
  const ey = cross3(ez, ex);
  return [ex, ey, ez];
}

export function rotateMatrix(R: Mat3, M: Mat3): Mat3 {
  return mulMat3(mulMat3(R, M), transpose3(R));
}

export function rotateVector(R: Mat3, v: Vec3): Vec3 {
  return mulMatVec3(R, v);
}

/**
 * Largest modulus of a matrix element of a local operator that changes the total digit sum
 * (i.e. does not commute with the total S^z of the sites it acts on). dims: local dimensions.
 */
export function u1Violation(op: CMat, dims: readonly number[]): number {
  const n = op.n;
  const sums = new Int32Array(n);
  for (let idx = 0; idx < n; idx++) {
    let rem = idx;
    let s = 0;
    for (let k = dims.length - 1; k >= 0; k--) {
      const d = dims[k]!;
      s += rem % d;
      rem = Math.floor(rem / d);
    }
    sums[idx] = s;
  }
  let v = 0;
  for (let r = 0; r < n; r++)
    for (let c = 0; c < n; c++)
      if (sums[r] !== sums[c]) v = Math.max(v, Math.hypot(op.re[r * n + c]!, op.im[r * n + c]!));
  return v;
}
