// Compiles a SpinCluster into local operators in the working frame (z = conserved or
// quantization axis), relabelled for translations, and checks the claimed symmetries.
import type { Mat3, SpinCluster, Vec3 } from "../types";
import { dot3, norm3, normalize3, transpose3 } from "../linalg3";
import { EdInputError } from "./errors";
import {
  bondOperator,
  cmatAddScaled,
  cmatMaxAbs,
  cmatZero,
  frameRotation,
  rotateMatrix,
  rotateVector,
  siteOperator,
  u1Violation,
  type CMat,
} from "./localOps";
import { identityRelabelling, translationRelabelling, type Relabelling } from "./basis";

export interface PairTerm {
  /** Relabelled positions, p < q. */
  readonly p: number;
  readonly q: number;
  /** Operator on the product index a_p * d_q + a_q. */
  readonly op: CMat;
}

export interface SiteTerm {
  readonly p: number;
  readonly op: CMat;
}

export interface CompiledModel {
  readonly nSites: number;
  /** Spin per relabelled position. */
  readonly spins: Float64Array;
  readonly dims: Int32Array;
  /** Sum of spins (digit sum A = Sz + spinSum). */
  readonly spinSum: number;
  /** Working-frame rotation (rows = frame axes in lab coordinates) and its z axis. */
  readonly R: Mat3;
  readonly frameAxis: Vec3;
  /** S.n conserved (sectors of fixed S^z in the working frame). */
  readonly conserved: boolean;
  readonly pairs: readonly PairTerm[];
  readonly sites: readonly SiteTerm[];
  /** All matrix elements real in the S^z basis. */
  readonly real: boolean;
  readonly relabel: Relabelling;
  /** Position x_j along the translation (in units of one translation step), per relabelled position. */
  readonly x: Float64Array;
  /** Uniform field component along the frame axis (null if fields are not uniform and parallel). */
  readonly zeeman: number | null;
  /** Largest |matrix element| scale (for tolerances). */
  readonly scale: number;
  readonly warnings: string[];
}

export interface CompileOptions {
  readonly conservedAxis?: Vec3;
  readonly quantizationAxis?: Vec3;
  readonly useTranslations?: boolean;
  /** Relative tolerance of the symmetry checks. */
  readonly symmetryTolerance?: number;
  /** Drop the Zeeman terms (zero-field Hamiltonian). */
  readonly zeroField?: boolean;
}

function isSpin(s: number): boolean {
  return Number.isFinite(s) && s > 0 && Math.abs(2 * s - Math.round(2 * s)) < 1e-12 && s <= 10;
}

function matsClose(a: Mat3, b: Mat3, tol: number): boolean {
  for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) if (Math.abs(a[r]![c]! - b[r]![c]!) > tol) return false;
  return true;
}

export function compileModel(cluster: SpinCluster, opts: CompileOptions = {}): CompiledModel {
  const n = cluster.spins.length;
  const warnings: string[] = [];
  if (n === 0) throw new EdInputError("cluster has no sites");
  for (const s of cluster.spins) if (!isSpin(s)) throw new EdInputError(`invalid spin length ${s}`);
  if (cluster.fields.length !== n) throw new EdInputError(`fields has ${cluster.fields.length} entries for ${n} sites`);
  const spinsOrig = cluster.spins.map((s) => Math.round(2 * s) / 2);
  const dimsOrig = spinsOrig.map((s) => Math.round(2 * s) + 1);

  // --- working frame
  let axis: Vec3 = [0, 0, 1];
  const conserved = opts.conservedAxis !== undefined;
  if (opts.conservedAxis) {
    const a = normalize3(opts.conservedAxis);
    if (!a) throw new EdInputError("conservedAxis must be a non-zero vector");
    axis = a;
  } else if (opts.quantizationAxis) {
    const a = normalize3(opts.quantizationAxis);
    if (!a) throw new EdInputError("quantizationAxis must be a non-zero vector");
    axis = a;
  } else {
    let sum: Vec3 = [0, 0, 0];
    for (const h of cluster.fields) sum = [sum[0] + h[0], sum[1] + h[1], sum[2] + h[2]];
    const a = normalize3(sum);
    if (a && norm3(sum) > 1e-12) axis = a;
  }
  const R = frameRotation(axis);

  // --- translations
  let relabel: Relabelling = identityRelabelling(n);
  const wantTr = opts.useTranslations !== false && cluster.translations && cluster.translations.length > 0;
  if (wantTr) {
    const perm = cluster.translations![0]!;
    const r = translationRelabelling(perm, dimsOrig);
    if (typeof r === "string") warnings.push(`translation not used: ${r}`);
    else {
      const inv = checkTranslationInvariance(cluster, perm);
      if (inv) warnings.push(`translation not used: ${inv}`);
      else {
        relabel = r;
        const given = cluster.translationPeriods?.[0];
        if (given !== undefined && given !== r.translation!.L)
          warnings.push(`translationPeriods[0] = ${given} but the permutation has period ${r.translation!.L}; using ${r.translation!.L}`);
        if (cluster.translations!.length > 1)
          warnings.push("only the first translation generator is used for momentum sectors");
      }
    }
  }
  const pos = relabel.position;
  const spins = new Float64Array(n);
  const dims = new Int32Array(n);
  for (let s = 0; s < n; s++) {
    spins[pos[s]!] = spinsOrig[s]!;
    dims[pos[s]!] = dimsOrig[s]!;
  }

  // --- positions along the translation
  const x = new Float64Array(n);
  if (relabel.translation) {
    const L = relabel.translation.L;
    const a = cluster.translationVectors?.[0];
    const a2 = a ? dot3(a, a) : 0;
    let consistent = a !== undefined && a2 > 0 && cluster.positions.length === n;
    const perm = cluster.translations![0]!;
    if (consistent) {
      for (let s = 0; s < n && consistent; s++) {
        const xs = dot3(cluster.positions[s]!, a!) / a2;
        const xt = dot3(cluster.positions[perm[s]!]!, a!) / a2;
        const diff = xt - xs - 1;
        if (Math.abs(diff - L * Math.round(diff / L)) > 1e-6) consistent = false;
      }
    }
    for (let s = 0; s < n; s++) {
      x[pos[s]!] = consistent ? dot3(cluster.positions[s]!, a!) / a2 : relabel.cell[s]!;
    }
    if (!consistent)
      warnings.push("positions are not consistent with the translation vector; momenta use the cell index along the translation");
  } else {
    // open cluster: project on the field-free x axis of the lab (positions[j].x)
    for (let s = 0; s < n; s++) x[s] = cluster.positions[s]?.[0] ?? s;
  }

  // --- pair and site terms
  const pairMap = new Map<number, CMat>();
  const siteOps: (CMat | null)[] = new Array(n).fill(null);
  let scale = 0;
  for (const b of cluster.bonds) {
    if (!(b.i >= 0 && b.i < n && b.j >= 0 && b.j < n)) throw new EdInputError(`bond ${b.i}-${b.j} out of range`);
    let J = rotateMatrix(R, b.matrix);
    scale = Math.max(scale, ...J.flat().map(Math.abs));
    let p = pos[b.i]!;
    let q = pos[b.j]!;
    if (p === q) {
      const op = siteOperator(spins[p]!, J, null);
      siteOps[p] = siteOps[p] ? addInto(siteOps[p]!, op) : op;
      continue;
    }
    if (p > q) {
      [p, q] = [q, p];
      J = transpose3(J);
    }
    const op = bondOperator(spins[p]!, spins[q]!, J);
    const key = p * n + q;
    const prev = pairMap.get(key);
    pairMap.set(key, prev ? addInto(prev, op) : op);
  }
  for (const si of cluster.singleIon) {
    if (!(si.site >= 0 && si.site < n)) throw new EdInputError(`single-ion site ${si.site} out of range`);
    const A = rotateMatrix(R, si.matrix);
    scale = Math.max(scale, ...A.flat().map(Math.abs));
    const p = pos[si.site]!;
    const op = siteOperator(spins[p]!, A, null);
    siteOps[p] = siteOps[p] ? addInto(siteOps[p]!, op) : op;
  }
  for (let s = 0; s < n; s++) {
    const h = opts.zeroField ? ([0, 0, 0] as Vec3) : rotateVector(R, cluster.fields[s]!);
    if (h[0] === 0 && h[1] === 0 && h[2] === 0) continue;
    scale = Math.max(scale, Math.abs(h[0]), Math.abs(h[1]), Math.abs(h[2]));
    const p = pos[s]!;
    const op = siteOperator(spins[p]!, null, h);
    siteOps[p] = siteOps[p] ? addInto(siteOps[p]!, op) : op;
  }
  if (!(scale > 0)) scale = 1;

  const pairs: PairTerm[] = [];
  for (const [key, op] of [...pairMap.entries()].sort((a, b) => a[0] - b[0])) {
    if (cmatMaxAbs(op) <= 1e-15 * scale) continue;
    pairs.push({ p: Math.floor(key / n), q: key % n, op });
  }
  const sites: SiteTerm[] = [];
  for (let p = 0; p < n; p++) if (siteOps[p] && cmatMaxAbs(siteOps[p]!) > 0) sites.push({ p, op: siteOps[p]! });

  // --- U(1) check
  const tol = (opts.symmetryTolerance ?? 1e-10) * scale;
  if (conserved) {
    for (const t of pairs) {
      const v = u1Violation(t.op, [dims[t.p]!, dims[t.q]!]);
      if (v > tol) {
        const i = relabel.origOf[t.p]!;
        const j = relabel.origOf[t.q]!;
        throw new EdInputError(
          `conservedAxis [${axis.map((c) => c.toPrecision(6)).join(", ")}] is not a symmetry: the exchange between sites ${i} and ${j} changes S.n (matrix element ${v.toExponential(3)})`,
        );
      }
    }
    for (const t of sites) {
      const v = u1Violation(t.op, [dims[t.p]!]);
      if (v > tol) {
        throw new EdInputError(
          `conservedAxis [${axis.map((c) => c.toPrecision(6)).join(", ")}] is not a symmetry: the single-ion term or field on site ${relabel.origOf[t.p]} changes S.n (matrix element ${v.toExponential(3)})`,
        );
      }
    }
    // zero the rounding-level violations so that sector restriction is exact
    for (const t of pairs) cleanU1(t.op, [dims[t.p]!, dims[t.q]!]);
    for (const t of sites) cleanU1(t.op, [dims[t.p]!]);
  }

  let real = true;
  for (const t of [...pairs, ...sites]) for (const v of t.op.im) if (Math.abs(v) > 1e-15 * scale) real = false;
  if (real) for (const t of [...pairs, ...sites]) t.op.im.fill(0);

  // uniform field along the frame axis
  let zeeman: number | null = null;
  {
    const h0 = rotateVector(R, cluster.fields[0]!);
    let uniform = Math.abs(h0[0]) <= 1e-12 * scale && Math.abs(h0[1]) <= 1e-12 * scale;
    for (let s = 1; s < n && uniform; s++) {
      const h = cluster.fields[s]!;
      const f0 = cluster.fields[0]!;
      if (Math.abs(h[0] - f0[0]) + Math.abs(h[1] - f0[1]) + Math.abs(h[2] - f0[2]) > 1e-12 * scale) uniform = false;
    }
    if (uniform && !opts.zeroField) zeeman = h0[2];
    if (opts.zeroField) zeeman = 0;
  }

  return {
    nSites: n,
    spins,
    dims,
    spinSum: spinsOrig.reduce((a, b) => a + b, 0),
    R,
    frameAxis: axis,
    conserved,
    pairs,
    sites,
    real,
    relabel,
    x,
    zeeman,
    scale,
    warnings,
  };
}

function addInto(a: CMat, b: CMat): CMat {
  cmatAddScaled(a, b, 1, 0);
  return a;
}

function cleanU1(op: CMat, dims: readonly number[]): void {
  const n = op.n;
  const sum = (idx: number): number => {
    let rem = idx;
    let s = 0;
    for (let k = dims.length - 1; k >= 0; k--) {
      s += rem % dims[k]!;
      rem = Math.floor(rem / dims[k]!);
    }
    return s;
  };
  for (let r = 0; r < n; r++)
    for (let c = 0; c < n; c++)
      if (sum(r) !== sum(c)) {
        op.re[r * n + c] = 0;
        op.im[r * n + c] = 0;
      }
}

/** Returns a reason string if the Hamiltonian is not invariant under the permutation. */
function checkTranslationInvariance(cluster: SpinCluster, perm: readonly number[]): string | null {
  const n = cluster.spins.length;
  let scale = 1e-300;
  for (const b of cluster.bonds) for (const r of b.matrix) for (const v of r) scale = Math.max(scale, Math.abs(v));
  for (const h of cluster.fields) for (const v of h) scale = Math.max(scale, Math.abs(v));
  for (const s of cluster.singleIon) for (const r of s.matrix) for (const v of r) scale = Math.max(scale, Math.abs(v));
  const tol = 1e-9 * scale;
  // bonds as a multiset keyed by ordered pair (i<j after transposing)
  const sumBonds = (map: (s: number) => number): Map<string, Mat3> => {
    const m = new Map<string, Mat3>();
    for (const b of cluster.bonds) {
      let i = map(b.i);
      let j = map(b.j);
      let J = b.matrix;
      if (i > j) {
        [i, j] = [j, i];
        J = transpose3(J);
      }
      const key = `${i},${j}`;
      const prev = m.get(key);
      m.set(key, prev ? (prev.map((r, a) => r.map((v, c) => v + J[a]![c]!)) as unknown as Mat3) : J);
    }
    return m;
  };
  const orig = sumBonds((s) => s);
  const moved = sumBonds((s) => perm[s]!);
  if (orig.size !== moved.size) return "bonds are not invariant under the translation";
  for (const [k, J] of orig) {
    const J2 = moved.get(k);
    if (!J2 || !matsClose(J, J2, tol)) return "bonds are not invariant under the translation";
  }
  for (let s = 0; s < n; s++) {
    if (cluster.spins[s] !== cluster.spins[perm[s]!]) return "spins are not invariant under the translation";
    const a = cluster.fields[s]!;
    const b = cluster.fields[perm[s]!]!;
    if (Math.abs(a[0] - b[0]) + Math.abs(a[1] - b[1]) + Math.abs(a[2] - b[2]) > tol)
      return "fields are not invariant under the translation";
  }
  const si = (map: (s: number) => number): Map<number, Mat3> => {
    const m = new Map<number, Mat3>();
    for (const t of cluster.singleIon) {
      const k = map(t.site);
      const prev = m.get(k);
      m.set(k, prev ? (prev.map((r, a) => r.map((v, c) => v + t.matrix[a]![c]!)) as unknown as Mat3) : t.matrix);
    }
    return m;
  };
  const s0 = si((s) => s);
  const s1 = si((s) => perm[s]!);
  const zero: Mat3 = [[0, 0, 0], [0, 0, 0], [0, 0, 0]];
  for (let s = 0; s < n; s++) if (!matsClose(s0.get(s) ?? zero, s1.get(s) ?? zero, tol)) return "single-ion terms are not invariant under the translation";
  return null;
}
