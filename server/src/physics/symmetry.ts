// Spin-rotation symmetry algebra of a set of exchange, single-ion and Zeeman tensors: splits each
// tensor into its isotropic, antisymmetric (DM) and symmetric traceless parts, finds the common
// U(1) axis if there is one, and says which terms break the Larmor protection of the q = 0 line.
// Physics layer: pure functions of numbers; terms carry opaque `id` tags chosen by the caller.
import type { Mat3, Vec3 } from "./types";
import {
  IDENTITY3,
  addMat3,
  cross3,
  crossMatrix3,
  dot3,
  mulMat3,
  mulMatVec3,
  norm3,
  normMat3,
  normalize3,
  outer3,
  scale3,
  scaleMat3,
  sub3,
  subMat3,
  trace3,
  transpose3,
} from "./linalg3";

// ---------------------------------------------------------------------------------------------
// Small linear algebra that linalg3 does not provide (kept here: linalg3 is shared and frozen).
// ---------------------------------------------------------------------------------------------

/** Eigen-decomposition of a real symmetric 3x3 matrix; values ascending, vectors[k] unit. */
export interface SymmetricEigen3 {
  readonly values: Vec3;
  readonly vectors: readonly [Vec3, Vec3, Vec3];
}

const EIGEN_A = new Float64Array(9);
const EIGEN_V = new Float64Array(9);
const IDENTITY_ROWS = [1, 0, 0, 0, 1, 0, 0, 0, 1];

/**
 * Cyclic Jacobi rotations (Numerical Recipes, 3rd ed., section 11.1). Chosen over the closed-form
 * trigonometric eigenvalues of linalg3 because those lose about half the digits near a double
 * eigenvalue (acos near +-1), which is exactly the uniaxial (XXZ-like) case that we must detect
 * at a relative tolerance of 1e-9; Jacobi keeps values and vectors accurate to ~1e-16 * ||m||.
 * Only the symmetric part (m + m^T)/2 is used.
 */
export function symmetricEigen3(m: Mat3): SymmetricEigen3 {
  // a and v are row-major 3x3 arrays (index 3 i + j), scratch shared by all calls (the function
  // does not re-enter); the same arithmetic, in the same order, as the textbook form with nested
  // arrays, without allocating per rotation or per call.
  const a = EIGEN_A;
  const v = EIGEN_V;
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) a[3 * i + j] = 0.5 * (m[i]![j]! + m[j]![i]!);
  v.set(IDENTITY_ROWS);
  let sumSquares = 0;
  for (let k = 0; k < 9; k++) sumSquares += a[k]! * a[k]!;
  const scaleNorm = Math.sqrt(sumSquares);
  for (let sweep = 0; sweep < 64; sweep++) {
    const off = a[1]! ** 2 + a[2]! ** 2 + a[5]! ** 2;
    if (!(off > (1e-17 * scaleNorm) ** 2)) break;
    for (let pair = 0; pair < 3; pair++) {
      const p = pair === 2 ? 1 : 0;
      const q = pair === 0 ? 1 : 2;
      const apq = a[3 * p + q]!;
      if (apq === 0) continue;
      // Rotation P with P_pp = P_qq = c, P_pq = s, P_qp = -s zeroes a'_pq in a' = P^T a P.
      const theta = (a[3 * q + q]! - a[3 * p + p]!) / (2 * apq);
      const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1);
      const s = t * c;
      for (let k = 0; k < 3; k++) {
        const akp = a[3 * k + p]!;
        const akq = a[3 * k + q]!;
        a[3 * k + p] = c * akp - s * akq;
        a[3 * k + q] = s * akp + c * akq;
      }
      for (let k = 0; k < 3; k++) {
        const apk = a[3 * p + k]!;
        const aqk = a[3 * q + k]!;
        a[3 * p + k] = c * apk - s * aqk;
        a[3 * q + k] = s * apk + c * aqk;
      }
      for (let k = 0; k < 3; k++) {
        const vkp = v[3 * k + p]!;
        const vkq = v[3 * k + q]!;
        v[3 * k + p] = c * vkp - s * vkq;
        v[3 * k + q] = s * vkp + c * vkq;
      }
    }
  }
  // Ascending order of the diagonal: a stable insertion sort of the three indices, the order
  // Array.prototype.sort gives with the comparator d_i - d_j, without the arrays it allocates.
  const d = (k: number): number => a[4 * k]!;
  let o0 = 0;
  let o1 = 1;
  let o2 = 2;
  if (d(o0) - d(o1) > 0) {
    o0 = 1;
    o1 = 0;
  }
  if (d(o1) - d(o2) > 0) {
    const t = o1;
    o1 = o2;
    o2 = t;
    if (d(o0) - d(o1) > 0) {
      const u = o0;
      o0 = o1;
      o1 = u;
    }
  }
  return {
    values: [d(o0), d(o1), d(o2)],
    vectors: [
      [v[o0]!, v[3 + o0]!, v[6 + o0]!],
      [v[o1]!, v[3 + o1]!, v[6 + o1]!],
      [v[o2]!, v[3 + o2]!, v[6 + o2]!],
    ],
  };
}

/** Symmetric part (m + m^T)/2. */
export function symmetricPart3(m: Mat3): Mat3 {
  const [r0, r1, r2] = m;
  const a01 = 0.5 * (r0[1] + r1[0]);
  const a02 = 0.5 * (r0[2] + r2[0]);
  const a12 = 0.5 * (r1[2] + r2[1]);
  return [
    [r0[0], a01, a02],
    [a01, r1[1], a12],
    [a02, a12, r2[2]],
  ];
}

/** Symmetric traceless part (m + m^T)/2 - tr(m)/3 * 1. */
export function symmetricTracelessPart3(m: Mat3): Mat3 {
  const [r0, r1, r2] = m;
  const third = (r0[0] + r1[1] + r2[2]) / 3;
  const a01 = 0.5 * (r0[1] + r1[0]);
  const a02 = 0.5 * (r0[2] + r2[0]);
  const a12 = 0.5 * (r1[2] + r2[1]);
  return [
    [r0[0] - third, a01, a02],
    [a01, r1[1] - third, a12],
    [a02, a12, r2[2] - third],
  ];
}

/**
 * Axial vector of the antisymmetric part of m, with the DM convention of physics-notes section 2:
 * D_x = (m_yz - m_zy)/2 and cyclic, so that S_i . ((m - m^T)/2) . S_j = D . (S_i x S_j)
 * (derivable: the antisymmetric part has elements D_a eps_abc, i.e. it equals -[D]_x).
 */
export function axialVector3(m: Mat3): Vec3 {
  return [(m[1][2] - m[2][1]) / 2, (m[2][0] - m[0][2]) / 2, (m[0][1] - m[1][0]) / 2];
}

/** Matrix commutator a b - b a. */
export function commutator3(a: Mat3, b: Mat3): Mat3 {
  return subMat3(mulMat3(a, b), mulMat3(b, a));
}

/** Uniaxial form a*1 + b*n n^T + c*[n]_x evaluated for a unit axis n. */
export function uniaxialMatrix3(n: Vec3, a: number, b: number, c: number): Mat3 {
  return addMat3(addMat3(scaleMat3(IDENTITY3, a), scaleMat3(outer3(n, n), b)), scaleMat3(crossMatrix3(n), c));
}

// ---------------------------------------------------------------------------------------------
// Decompositions
// ---------------------------------------------------------------------------------------------

/** Parts of an exchange matrix J in S_i . J . S_j (energy units of the input). */
export interface ExchangeDecomposition {
  /** Isotropic exchange J = tr(J)/3 (physics-notes section 2). */
  readonly isotropic: number;
  /** DM vector: antisymmetric part equals D . (S_i x S_j). */
  readonly dm: Vec3;
  /** Symmetric traceless part ("anisotropic exchange"). */
  readonly anisotropic: Mat3;
  /**
   * Norms: |J|, |D| (vector norm) and the Frobenius norm of the anisotropic part. The three parts
   * are orthogonal in the Frobenius product, so ||J_matrix||^2 = 3 J^2 + 2 |D|^2 + ||T||^2.
   */
  readonly norms: { readonly isotropic: number; readonly dm: number; readonly anisotropic: number };
}

export function decomposeExchange(m: Mat3): ExchangeDecomposition {
  const isotropic = trace3(m) / 3;
  const dm = axialVector3(m);
  const anisotropic = symmetricTracelessPart3(m);
  return {
    isotropic,
    dm,
    anisotropic,
    norms: { isotropic: Math.abs(isotropic), dm: norm3(dm), anisotropic: normMat3(anisotropic) },
  };
}

/**
 * Principal-axis description of a symmetric traceless tensor T as D (S.n)^2 + E ((S.x')^2 -
 * (S.y')^2) up to a constant. In the principal frame T = diag(E - D/3, -E - D/3, 2D/3), so with
 * n the eigenvector of the eigenvalue of largest magnitude lz: D = 3 lz / 2 and E = (lx - ly)/2
 * with lx >= ly; this choice gives 0 <= E <= |D|/3 (derivable from lx + ly + lz = 0).
 */
export interface PrincipalAnisotropy {
  readonly eigenvalues: Vec3;
  readonly eigenvectors: readonly [Vec3, Vec3, Vec3];
  /** Main axis n (eigenvector of the largest-magnitude eigenvalue); null when T = 0. */
  readonly axis: Vec3 | null;
  readonly dAxial: number;
  readonly eRhombic: number;
}

export function principalAnisotropy(t: Mat3): PrincipalAnisotropy {
  const eig = symmetricEigen3(t);
  const [l0, l1, l2] = eig.values;
  const [v0, , v2] = eig.vectors;
  if (l0 === 0 && l1 === 0 && l2 === 0) {
    return { eigenvalues: eig.values, eigenvectors: eig.vectors, axis: null, dAxial: 0, eRhombic: 0 };
  }
  // The largest magnitude is at one end of the ascending list.
  const zIsTop = Math.abs(l2) >= Math.abs(l0);
  const lz = zIsTop ? l2 : l0;
  const [lx, ly] = zIsTop ? [l1, l0] : [l2, l1];
  return {
    eigenvalues: eig.values,
    eigenvectors: eig.vectors,
    axis: canonicalAxis(zIsTop ? v2 : v0),
    dAxial: 1.5 * lz,
    eRhombic: (lx - ly) / 2,
  };
}

/** Parts of a single-ion tensor A in S_i . A . S_i. */
export interface SingleIonDecomposition {
  /** tr(A)/3: multiplies S.S = S(S+1), a constant. */
  readonly isotropic: number;
  /** Symmetric traceless part: the physical anisotropy. */
  readonly anisotropic: Mat3;
  /**
   * Axial vector of the antisymmetric part. It should vanish: A_ab S^a S^b with antisymmetric A
   * equals (i/2) A_ab eps_abc S^c, an imaginary field (derivable from [S^a, S^b] = i eps_abc S^c),
   * so a Hermitian Hamiltonian has symmetric A.
   */
  readonly antisymmetric: Vec3;
  readonly hasAntisymmetricPart: boolean;
  readonly principal: PrincipalAnisotropy;
}

export function decomposeSingleIon(a: Mat3, relativeTolerance = 1e-9): SingleIonDecomposition {
  const antisymmetric = axialVector3(a);
  const anisotropic = symmetricTracelessPart3(a);
  return {
    isotropic: trace3(a) / 3,
    anisotropic,
    antisymmetric,
    hasAntisymmetricPart: norm3(antisymmetric) > relativeTolerance * Math.max(normMat3(a), Number.MIN_VALUE),
    principal: principalAnisotropy(anisotropic),
  };
}

/** Parts of a g-tensor (dimensionless), in the convention h = muB g^T B of physics-notes 2. */
export interface GTensorDecomposition {
  /** Isotropic g = tr(g)/3. */
  readonly isotropic: number;
  /** Symmetric traceless part. */
  readonly anisotropic: Mat3;
  /** Axial vector of the antisymmetric part (same convention as the DM vector). */
  readonly antisymmetric: Vec3;
  /**
   * True when the antisymmetric part is non-negligible. g-tensors are conventionally quoted
   * symmetric (only g g^T is fixed by resonance data; common practice, no source), so a
   * non-symmetric entry is usually a transcription slip worth flagging.
   */
  readonly hasAntisymmetricPart: boolean;
  /** Principal values of the symmetric part, ascending, and their axes. */
  readonly principalValues: Vec3;
  readonly principalAxes: readonly [Vec3, Vec3, Vec3];
}

export function decomposeGTensor(g: Mat3, relativeTolerance = 1e-9): GTensorDecomposition {
  const antisymmetric = axialVector3(g);
  const eig = symmetricEigen3(symmetricPart3(g));
  return {
    isotropic: trace3(g) / 3,
    anisotropic: symmetricTracelessPart3(g),
    antisymmetric,
    hasAntisymmetricPart: norm3(antisymmetric) > relativeTolerance * Math.max(normMat3(g), Number.MIN_VALUE),
    principalValues: eig.values,
    principalAxes: eig.vectors,
  };
}

// ---------------------------------------------------------------------------------------------
// Classification
// ---------------------------------------------------------------------------------------------

export type SymmetryClass = "su2" | "u1" | "none";

export type FindingKind =
  | "exchange-anisotropy"
  | "dm"
  | "off-diagonal-symmetric"
  | "single-ion"
  | "single-ion-rhombic"
  | "non-uniform-field"
  | "transverse-field";

/**
 * One term that breaks SU(2) (or, for field findings, the symmetry H0 leaves).
 *  - For exchange and single-ion findings, `residual`/`axis` is the symmetry left by this one
 *    component added to an isotropic Heisenberg model (e.g. a DM vector alone leaves U(1) about D).
 *  - For field findings, it is the symmetry of the full H (H0 plus all fields): fields only break
 *    jointly (one field alone is always compatible with some axis).
 */
export interface SymmetryFinding {
  /** First caller id of the term; `ids` lists all ids merged into it (same pair or site). */
  readonly id: string;
  readonly ids: readonly string[];
  readonly kind: FindingKind;
  readonly residual: "u1" | "none";
  readonly axis: Vec3 | null;
  /** Size of the breaking part in input energy units (|D|, ||T||_F, or field deviation). */
  readonly magnitude: number;
  /** Whether the term commutes with S.n for the U(1) axis n of H0 (null when H0 has none). */
  readonly compatibleWithAxis: boolean | null;
  /** One sentence on the consequence for the q = 0 resonance. */
  readonly detail: string;
}

/** A remark that does not affect the classification (ignored or malformed input parts). */
export interface SymmetryNote {
  readonly id: string;
  readonly message: string;
}

export interface BondTensorInput {
  readonly id: string;
  /** Exchange matrix in S_i . matrix . S_j. */
  readonly matrix: Mat3;
  /**
   * Optional site pair (i, j). When given, bonds on the same unordered pair are summed before
   * classification (S_j . M . S_i = S_i . M^T . S_j for i != j), because only the sum per pair
   * is an operator of its own: bilinears S_i^a S_j^b on distinct pairs are linearly independent.
   */
  readonly sites?: readonly [number, number];
}

export interface SingleIonTensorInput {
  readonly id: string;
  /** Tensor in S_i . matrix . S_i. */
  readonly matrix: Mat3;
  /** Spin length S of the site. */
  readonly spin: number;
  /** Optional site index: terms on the same site are summed. */
  readonly site?: number;
}

export interface FieldInput {
  readonly id: string;
  /** Effective field h_i = muB g_i^T B in energy units; H contains -h_i . S_i. */
  readonly vector: Vec3;
  /** Optional site index: fields on the same site are summed. Without it each entry is a site. */
  readonly site?: number;
}

export interface SymmetryInput {
  readonly bonds: readonly BondTensorInput[];
  readonly singleIon: readonly SingleIonTensorInput[];
  readonly fields: readonly FieldInput[];
  /**
   * Energy scale for the tolerances. Default: the largest Frobenius norm of any exchange or
   * single-ion tensor, or the largest field norm, whichever is larger.
   */
  readonly scale?: number;
  /** Relative tolerance (default 1e-9): a part counts as zero when below scale * tolerance. */
  readonly relativeTolerance?: number;
  /** The input's energy unit, named after the numbers in the sentences (e.g. "meV"); none by default. */
  readonly energyUnit?: string;
}

export interface SymmetryClassification {
  /** Symmetry of H0 (exchange + single-ion, no Zeeman term). */
  readonly h0: SymmetryClass;
  readonly h0Axis: Vec3 | null;
  /** Symmetry of the full H including the Zeeman term. */
  readonly full: SymmetryClass;
  readonly fullAxis: Vec3 | null;
  /** All sites see the same effective field (within tolerance); true when there are no fields. */
  readonly fieldsUniform: boolean;
  /**
   * Every non-zero field is parallel to the axis H0 leaves: to h0Axis when H0 is U(1); to one
   * common axis when H0 is SU(2); for H0 without continuous symmetry only when all fields vanish.
   */
  readonly fieldsParallelToAxis: boolean;
  /** True when some field is non-zero. */
  readonly hasField: boolean;
  readonly breaking: readonly SymmetryFinding[];
  readonly notes: readonly SymmetryNote[];
  /** Absolute tolerance used (energy units). */
  readonly tolerance: number;
}

/** Sign convention for reported axes: first component of magnitude > 1e-12 made positive. */
export function canonicalAxis(n: Vec3): Vec3 {
  for (const c of n) {
    if (Math.abs(c) > 1e-12) return c < 0 ? scale3(n, -1) : n;
  }
  return n;
}

/**
 * derivable: [H_term, S.n] = 0 for a bilinear S_i . J . S_j iff [J, [n]_x] = 0. An infinitesimal
 * rotation by theta about n sends S -> S + theta n x S = (1 + theta [n]_x) S on every site, so
 * S_i . J . S_j changes by theta S_i . ([n]_x^T J + J [n]_x) . S_j = theta S_i . [J, [n]_x] . S_j
 * ([n]_x^T = -[n]_x). The commutant of [n]_x (eigenvalues 0, +i, -i, all distinct) consists of
 * the polynomials in [n]_x: a*1 + c*[n]_x + b*[n]_x^2 with [n]_x^2 = n n^T - 1, i.e. exactly the
 * form a*1 + b*n n^T + c*[n]_x (DM vector parallel to n). The same holds for S_i . A . S_i with
 * symmetric A (then c = 0). On the complement of the commutant the map X -> [X, [n]_x] has
 * singular values 1 or 2 (eigenvalue differences of [n]_x), so the commutator norm is within a
 * factor 2 of the distance to the allowed form: a sound residual to compare with the tolerance.
 */
export function rotationResidual(m: Mat3, n: Vec3): number {
  // normMat3(commutator3(m, crossMatrix3(n))) written out, with the same operations in the same
  // order (bit-identical; a test compares the two), without the five matrices it would allocate:
  // the symmetry check calls it for every term and candidate axis on every analysis.
  const b00 = 0, b01 = -n[2], b02 = n[1];
  const b10 = n[2], b11 = 0, b12 = -n[0];
  const b20 = -n[1], b21 = n[0], b22 = 0;
  let sum = 0;
  for (let i = 0; i < 3; i++) {
    const r = m[i] as Vec3;
    const bi0 = i === 0 ? b00 : i === 1 ? b10 : b20;
    const bi1 = i === 0 ? b01 : i === 1 ? b11 : b21;
    const bi2 = i === 0 ? b02 : i === 1 ? b12 : b22;
    // Row i of m b minus row i of b m.
    const c0 = r[0] * b00 + r[1] * b10 + r[2] * b20 - (bi0 * m[0][0] + bi1 * m[1][0] + bi2 * m[2][0]);
    const c1 = r[0] * b01 + r[1] * b11 + r[2] * b21 - (bi0 * m[0][1] + bi1 * m[1][1] + bi2 * m[2][1]);
    const c2 = r[0] * b02 + r[1] * b12 + r[2] * b22 - (bi0 * m[0][2] + bi1 * m[1][2] + bi2 * m[2][2]);
    sum += c0 * c0 + c1 * c1 + c2 * c2; // 0 + x is exactly x
  }
  return Math.sqrt(sum);
}

interface AnisotropicTerm {
  readonly ids: string[];
  readonly source: "bond" | "single-ion";
  /** Matrix used for the commutator test (full exchange matrix, or symmetric single-ion part). */
  readonly matrix: Mat3;
  readonly dm: Vec3;
  readonly anisotropic: Mat3;
  /** symmetricEigen3(anisotropic) of a single-ion term, made when first asked for (see termEig). */
  eig?: SymmetricEigen3;
  /** The facts of its bond group, for a bond term (they keep its eigen-decomposition). */
  readonly facts?: BondFacts;
}

/**
 * What one summed bond tensor gives at one tolerance: its decomposition, and the parts of its
 * findings that depend on nothing else (the DM axis and matrix; the anisotropy's own axis, kind
 * and sentence). Each is a pure function of the nine matrix entries and the tolerance.
 */
interface BondFacts {
  readonly entries: readonly number[];
  readonly tolerance: number;
  /** The unit suffix its sentences were written with. */
  readonly unit: string;
  readonly d: ExchangeDecomposition;
  /** The group breaks SU(2): its DM or anisotropic part exceeds the tolerance. */
  readonly breaks: boolean;
  eig?: SymmetricEigen3;
  /** candidateAxes of the group's term. */
  candidates?: readonly Vec3[];
  dm?: { readonly axis: Vec3; readonly matrix: Mat3 };
  anisotropy?: { readonly axis: Vec3 | null; readonly kind: FindingKind; readonly detail: string };
  /** rotationResidual of the group matrix about axes asked for: x, y, z, residual per axis. */
  residuals?: number[];
  /** The group's last findings, with the ids, axis of H0 and uniform field direction they were made for. */
  findings?: { readonly ids: readonly string[]; readonly h0Axis: Vec3 | null; readonly uniformFieldDirection: Vec3 | null; readonly list: readonly SymmetryFinding[] };
}

/**
 * The bond facts of the last classification, by group position. A group at the same position
 * whose entries are bit-identical (Object.is, so -0 and NaN count as written) at the same
 * tolerance takes them over: typing into one coupling changes one group, and the others keep
 * their eigen-decompositions and sentences. Correct for any caller, since the facts are pure
 * functions of what is compared; a test holds kept facts to fresh ones.
 */
let lastBondFacts: readonly BondFacts[] = [];

function bondFacts(k: number, m: Mat3, tolerance: number, unit: string): BondFacts {
  const last = lastBondFacts[k];
  if (last && Object.is(last.tolerance, tolerance) && last.unit === unit) {
    const e = last.entries;
    const [r0, r1, r2] = m;
    if (
      Object.is(e[0], r0[0]) && Object.is(e[1], r0[1]) && Object.is(e[2], r0[2]) &&
      Object.is(e[3], r1[0]) && Object.is(e[4], r1[1]) && Object.is(e[5], r1[2]) &&
      Object.is(e[6], r2[0]) && Object.is(e[7], r2[1]) && Object.is(e[8], r2[2])
    )
      return last;
  }
  const d = decomposeExchange(m);
  return { entries: [...m[0], ...m[1], ...m[2]], tolerance, unit, d, breaks: d.norms.dm > tolerance || d.norms.anisotropic > tolerance };
}

/** Forgets the kept bond facts (tests compare kept and fresh classifications). */
export function forgetSymmetryFacts(): void {
  lastBondFacts = [];
}

function dedupeAxes(axes: readonly Vec3[]): Vec3[] {
  const out: Vec3[] = [];
  for (const a of axes) {
    if (!out.some((b) => Math.abs(dot3(a, b)) > 1 - 1e-12)) out.push(a);
  }
  return out;
}

/**
 * Axes n for which a single term can commute with S.n: its DM direction when D != 0 (then n must
 * be parallel to D), else the eigenvectors of non-degenerate eigenvalues of its symmetric
 * traceless part (for the allowed form b (n n^T - 1/3) the eigenvalue 2b/3 is simple, with
 * eigenvector n). Any common axis of all terms is among the candidates of each single term.
 */
function candidateAxes(term: AnisotropicTerm, tolerance: number): Vec3[] {
  const out: Vec3[] = [];
  const d = normalize3(term.dm);
  if (d && norm3(term.dm) > tolerance) out.push(canonicalAxis(d));
  const eig = termEig(term);
  const [l0, l1, l2] = eig.values;
  const simple = [l1 - l0 > tolerance, l1 - l0 > tolerance && l2 - l1 > tolerance, l2 - l1 > tolerance];
  simple.forEach((isSimple, k) => {
    const v = eig.vectors[k];
    if (isSimple && v) out.push(canonicalAxis(v));
  });
  return dedupeAxes(out);
}

/** symmetricEigen3 of a term's anisotropic part, made once: with its bond facts, or on the term. */
function termEig(term: AnisotropicTerm): SymmetricEigen3 {
  if (term.facts) return (term.facts.eig ??= symmetricEigen3(term.anisotropic));
  return (term.eig ??= symmetricEigen3(term.anisotropic));
}

/** The symmetry left by one tensor alone: the first of its candidate axes that it commutes with. */
function singleTermAxis(matrix: Mat3, term: AnisotropicTerm, tolerance: number): Vec3 | null {
  for (const n of candidateAxes(term, tolerance)) {
    if (rotationResidual(matrix, n) <= tolerance) return n;
  }
  return null;
}

function isDiagonal(m: Mat3, tolerance: number): boolean {
  return Math.hypot(m[0][1], m[0][2], m[1][2], m[1][0], m[2][0], m[2][1]) <= tolerance;
}

/** Four significant digits without trailing zeros (0.8, not 0.8000). */
function num(x: number): string {
  return String(Number(x.toPrecision(4)));
}

function fmtAxis(n: Vec3): string {
  return `(${n.map((c) => (Math.abs(c) < 5e-13 ? "0" : num(c))).join(", ")})`;
}

/**
 * Classifies H0 and the full H. H0: SU(2) when every exchange matrix is a multiple of 1 and every
 * single-ion tensor (S >= 1) is a multiple of 1; U(1) about n when every term commutes with S.n
 * (see `rotationResidual`); none otherwise. Full H: [S.n, h_i . S_i] = i (n x h_i) . S_i
 * (derivable from [S^a, S^b] = i eps_abc S^c), so the Zeeman term conserves S.n iff every h_i is
 * parallel to n; with SU(2) H0 any common field direction serves as n.
 *
 * The steps are small functions of their own: each is compiled and optimised on its own, and the
 * bond terms' results that depend only on their group's facts and on the axes (residuals,
 * findings) are kept with those facts (see BondFacts).
 */
export function classifySymmetry(input: SymmetryInput): SymmetryClassification {
  const relativeTolerance = input.relativeTolerance ?? 1e-9;
  const unit = input.energyUnit ? ` ${input.energyUnit}` : "";
  const notes: SymmetryNote[] = [];
  const bondGroups = groupBonds(input.bonds);
  const ionGroups = groupSingleIon(input.singleIon, relativeTolerance, notes);
  const fieldGroups = groupFields(input.fields);
  const scale = input.scale ?? Math.max(maxNormMat3(bondGroups), maxNormMat3(ionGroups), maxNormVec3(fieldGroups));
  const tolerance = relativeTolerance * scale;
  const terms = anisotropicTerms(bondGroups, ionGroups, tolerance, unit);
  const { h0, h0Axis } = classifyH0(terms, tolerance);
  const fields = classifyFields(fieldGroups, h0, h0Axis, tolerance);
  const breaking: SymmetryFinding[] = [];
  for (const term of terms) {
    if (term.source === "bond") bondFindings(term, h0Axis, fields.uniformFieldDirection, tolerance, unit, breaking);
    else breaking.push(singleIonFinding(term, h0Axis, tolerance, unit));
  }
  fieldFindings(fieldGroups, fields, h0, h0Axis, tolerance, unit, breaking);
  return {
    h0,
    h0Axis,
    full: fields.full,
    fullAxis: fields.fullAxis,
    fieldsUniform: fields.fieldsUniform,
    fieldsParallelToAxis: fields.fieldsParallelToAxis,
    hasField: fields.hasField,
    breaking,
    notes,
    tolerance,
  };
}

interface BondGroup {
  readonly ids: string[];
  matrix: Mat3;
  owned: boolean;
}

/**
 * Sums bonds per unordered site pair where the caller gave pairs. A group's matrix is the
 * caller's own until a second bond joins; then a sum of its own, which later bonds are added to in
 * place (the same additions, in the same order, as addMat3).
 */
function groupBonds(bonds: readonly BondTensorInput[]): BondGroup[] {
  const bondGroups: BondGroup[] = [];
  const pairIndex = new Map<number, number>();
  for (const bond of bonds) {
    if (!bond.sites) {
      bondGroups.push({ ids: [bond.id], matrix: bond.matrix, owned: false });
      continue;
    }
    const [i, j] = bond.sites;
    const oriented = i <= j ? bond.matrix : transpose3(bond.matrix);
    // One number per unordered pair (exact for site indices below 2^26).
    const key = Math.min(i, j) * 67108864 + Math.max(i, j);
    const at = pairIndex.get(key);
    const group = at === undefined ? undefined : bondGroups[at];
    if (group && group.owned) {
      for (let r = 0; r < 3; r++) {
        const row = group.matrix[r] as unknown as [number, number, number];
        const add = oriented[r] as Vec3;
        row[0] += add[0];
        row[1] += add[1];
        row[2] += add[2];
      }
      group.ids.push(bond.id);
    } else if (group) {
      group.ids.push(bond.id);
      group.matrix = addMat3(group.matrix, oriented);
      group.owned = true;
    } else {
      pairIndex.set(key, bondGroups.length);
      bondGroups.push({ ids: [bond.id], matrix: oriented, owned: false });
    }
  }
  return bondGroups;
}

/**
 * Single-ion terms summed per site. S = 1/2 terms are constants (S^a S^b + S^b S^a = delta_ab / 2
 * for S = 1/2, derivable from the Pauli algebra), so their symmetric part drops out; the caller warns.
 */
function groupSingleIon(ions: readonly SingleIonTensorInput[], relativeTolerance: number, notes: SymmetryNote[]): { ids: string[]; matrix: Mat3 }[] {
  const ionGroups: { ids: string[]; matrix: Mat3 }[] = [];
  const siteIndex = new Map<number, number>();
  for (const ion of ions) {
    const sym = symmetricPart3(ion.matrix);
    if (normMat3(subMat3(ion.matrix, sym)) > relativeTolerance * Math.max(normMat3(ion.matrix), Number.MIN_VALUE)) {
      notes.push({
        id: ion.id,
        message: "The single-ion tensor has an antisymmetric part; it is not Hermitian and was ignored (only the symmetric part counts).",
      });
    }
    if (!(ion.spin > 0.5)) {
      notes.push({
        id: ion.id,
        message: `For spin ${ion.spin} every single-ion term S.A.S is a constant; it was ignored for the symmetry.`,
      });
      continue;
    }
    const at = ion.site === undefined ? undefined : siteIndex.get(ion.site);
    const group = at === undefined ? undefined : ionGroups[at];
    if (group) {
      group.ids.push(ion.id);
      group.matrix = addMat3(group.matrix, sym);
    } else {
      if (ion.site !== undefined) siteIndex.set(ion.site, ionGroups.length);
      ionGroups.push({ ids: [ion.id], matrix: sym });
    }
  }
  return ionGroups;
}

/** Fields summed per site. */
function groupFields(fields: readonly FieldInput[]): { ids: string[]; vector: Vec3 }[] {
  const fieldGroups: { ids: string[]; vector: Vec3 }[] = [];
  const fieldSite = new Map<number, number>();
  for (const f of fields) {
    const at = f.site === undefined ? undefined : fieldSite.get(f.site);
    const group = at === undefined ? undefined : fieldGroups[at];
    if (group) {
      group.ids.push(f.id);
      group.vector = [group.vector[0] + f.vector[0], group.vector[1] + f.vector[1], group.vector[2] + f.vector[2]];
    } else {
      if (f.site !== undefined) fieldSite.set(f.site, fieldGroups.length);
      fieldGroups.push({ ids: [f.id], vector: f.vector });
    }
  }
  return fieldGroups;
}

function maxNormMat3(groups: readonly { readonly matrix: Mat3 }[]): number {
  let max = 0;
  for (const g of groups) max = Math.max(max, normMat3(g.matrix));
  return max;
}

function maxNormVec3(groups: readonly { readonly vector: Vec3 }[]): number {
  let max = 0;
  for (const g of groups) max = Math.max(max, norm3(g.vector));
  return max;
}

/** The terms that break SU(2): bond groups (with their facts, kept for the next call) and single-ion groups. */
function anisotropicTerms(bondGroups: readonly BondGroup[], ionGroups: readonly { ids: string[]; matrix: Mat3 }[], tolerance: number, unit: string): AnisotropicTerm[] {
  const terms: AnisotropicTerm[] = [];
  const facts: BondFacts[] = [];
  for (let k = 0; k < bondGroups.length; k++) {
    const b = bondGroups[k] as BondGroup;
    const f = bondFacts(k, b.matrix, tolerance, unit);
    facts.push(f);
    if (f.breaks) terms.push({ ids: b.ids, source: "bond", matrix: b.matrix, dm: f.d.dm, anisotropic: f.d.anisotropic, facts: f });
  }
  lastBondFacts = facts;
  for (const s of ionGroups) {
    const t = symmetricTracelessPart3(s.matrix);
    if (normMat3(t) > tolerance) {
      terms.push({ ids: s.ids, source: "single-ion", matrix: s.matrix, dm: [0, 0, 0], anisotropic: t });
    }
  }
  return terms;
}

/** Whether a term commutes with S.n: rotationResidual of its matrix, kept with a bond term's facts. */
function commutesWith(t: AnisotropicTerm, n: Vec3, tolerance: number): boolean {
  const f = t.facts;
  if (!f) return rotationResidual(t.matrix, n) <= tolerance;
  // The facts' entries are the group matrix's, bit for bit: the residual is a function of them and n.
  const kept = (f.residuals ??= []);
  for (let k = 0; k < kept.length; k += 4) {
    if (Object.is(kept[k], n[0]) && Object.is(kept[k + 1], n[1]) && Object.is(kept[k + 2], n[2])) return (kept[k + 3] as number) <= tolerance;
  }
  const r = rotationResidual(t.matrix, n);
  if (kept.length >= 32) kept.length = 0;
  kept.push(n[0], n[1], n[2], r);
  return r <= tolerance;
}

/**
 * H0 class. Candidates come from the strongest few terms (best conditioned axes); since any common
 * axis is a candidate of every term, one term would suffice in exact arithmetic.
 */
function classifyH0(terms: readonly AnisotropicTerm[], tolerance: number): { h0: SymmetryClass; h0Axis: Vec3 | null } {
  if (terms.length === 0) return { h0: "su2", h0Axis: null };
  // A bond term's norms are its group's (the same functions of the same numbers).
  const strength = (t: AnisotropicTerm): number => (t.facts ? Math.max(t.facts.d.norms.dm, t.facts.d.norms.anisotropic) : Math.max(norm3(t.dm), normMat3(t.anisotropic)));
  const strongest = [...terms].sort((a, b) => strength(b) - strength(a)).slice(0, 3);
  const candidates = dedupeAxes(strongest.flatMap((t) => (t.facts ? (t.facts.candidates ??= candidateAxes(t, tolerance)) : candidateAxes(t, tolerance))));
  for (const n of candidates) {
    if (terms.every((t) => commutesWith(t, n, tolerance))) return { h0: "u1", h0Axis: n };
  }
  return { h0: "none", h0Axis: null };
}

interface FieldClass {
  readonly hasField: boolean;
  readonly meanField: Vec3;
  readonly fieldsUniform: boolean;
  readonly uniformFieldDirection: Vec3 | null;
  readonly full: SymmetryClass;
  readonly fullAxis: Vec3 | null;
  readonly fieldsParallelToAxis: boolean;
}

/** The full H: the fields' uniformity and direction against the symmetry H0 leaves. */
function classifyFields(fieldGroups: readonly { vector: Vec3 }[], h0: SymmetryClass, h0Axis: Vec3 | null, tolerance: number): FieldClass {
  const vectors = fieldGroups.map((f) => f.vector);
  const nonZero = vectors.filter((v) => norm3(v) > tolerance);
  const hasField = nonZero.length > 0;
  const meanField: Vec3 =
    vectors.length === 0
      ? [0, 0, 0]
      : scale3(
          vectors.reduce<Vec3>((s, v) => [s[0] + v[0], s[1] + v[1], s[2] + v[2]], [0, 0, 0]),
          1 / vectors.length,
        );
  const fieldsUniform = vectors.every((v) => norm3(sub3(v, meanField)) <= tolerance);
  const largest = nonZero.reduce<Vec3 | null>((best, v) => (best === null || norm3(v) > norm3(best) ? v : best), null);
  const commonDirection = largest ? normalize3(largest) : null;
  const parallelTo = (n: Vec3): boolean => nonZero.every((v) => norm3(cross3(v, n)) <= tolerance);
  const allParallel = commonDirection === null || parallelTo(commonDirection);

  let full: SymmetryClass;
  let fullAxis: Vec3 | null;
  let fieldsParallelToAxis: boolean;
  if (!hasField) {
    full = h0;
    fullAxis = h0Axis;
    fieldsParallelToAxis = true;
  } else if (h0 === "su2") {
    fieldsParallelToAxis = allParallel;
    full = allParallel ? "u1" : "none";
    fullAxis = allParallel && commonDirection ? canonicalAxis(commonDirection) : null;
  } else if (h0 === "u1" && h0Axis) {
    fieldsParallelToAxis = parallelTo(h0Axis);
    full = fieldsParallelToAxis ? "u1" : "none";
    fullAxis = fieldsParallelToAxis ? h0Axis : null;
  } else {
    fieldsParallelToAxis = false;
    full = "none";
    fullAxis = null;
  }
  const uniformFieldDirection = hasField && fieldsUniform && commonDirection ? commonDirection : null;
  return { hasField, meanField, fieldsUniform, uniformFieldDirection, full, fullAxis, fieldsParallelToAxis };
}

/** Whether two axes (or both none) are the same to the bit. */
export function sameAxis(a: Vec3 | null, b: Vec3 | null): boolean {
  if (a === b) return true;
  return a !== null && b !== null && Object.is(a[0], b[0]) && Object.is(a[1], b[1]) && Object.is(a[2], b[2]);
}

function sameIds(a: readonly string[], b: readonly string[]): boolean {
  if (a === b) return true;
  if (a.length !== b.length) return false;
  for (let k = 0; k < a.length; k++) if (a[k] !== b[k]) return false;
  return true;
}

/**
 * A bond term's findings (its DM part, its anisotropic part). They are functions of its facts
 * (entries, tolerance, unit), its ids, the axis of H0 and the uniform field's direction, so the
 * facts keep the last ones and hand them out again when those read the same.
 */
function bondFindings(term: AnisotropicTerm, h0Axis: Vec3 | null, uniformFieldDirection: Vec3 | null, tolerance: number, unit: string, out: SymmetryFinding[]): void {
  const f = term.facts as BondFacts;
  const last = f.findings;
  if (last && sameIds(last.ids, term.ids) && sameAxis(last.h0Axis, h0Axis) && sameAxis(last.uniformFieldDirection, uniformFieldDirection)) {
    for (const x of last.list) out.push(x);
    return;
  }
  const list: SymmetryFinding[] = [];
  const id = term.ids[0] ?? "";
  const compatible = (m: Mat3): boolean | null => (h0Axis ? rotationResidual(m, h0Axis) <= tolerance : null);
  const dmNorm = norm3(term.dm);
  if (dmNorm > tolerance) {
    const dm = (f.dm ??= {
      matrix: scaleMat3(crossMatrix3(term.dm), -1), // antisymmetric part = -[D]_x
      axis: canonicalAxis(normalize3(term.dm) ?? [0, 0, 1]),
    });
    list.push({
      id,
      ids: term.ids,
      kind: "dm",
      residual: "u1",
      axis: dm.axis,
      magnitude: dmNorm,
      compatibleWithAxis: compatible(dm.matrix),
      detail: dmDetail(dm.axis, uniformFieldDirection, tolerance / Math.max(dmNorm, Number.MIN_VALUE)),
    });
  }
  const anisoNorm = normMat3(term.anisotropic);
  if (anisoNorm > tolerance) {
    const own = (f.anisotropy ??= anisotropyAlone(term, tolerance, unit));
    list.push({
      id,
      ids: term.ids,
      kind: own.kind,
      residual: own.axis ? "u1" : "none",
      axis: own.axis,
      magnitude: anisoNorm,
      compatibleWithAxis: compatible(term.anisotropic),
      detail: own.detail,
    });
  }
  f.findings = { ids: term.ids, h0Axis, uniformFieldDirection, list };
  for (const x of list) out.push(x);
}

function singleIonFinding(term: AnisotropicTerm, h0Axis: Vec3 | null, tolerance: number, unit: string): SymmetryFinding {
  const id = term.ids[0] ?? "";
  const p = principalAnisotropy(term.anisotropic);
  const rhombic = Math.abs(p.eRhombic) > tolerance;
  const axis = rhombic ? null : p.axis;
  return {
    id,
    ids: term.ids,
    kind: rhombic ? "single-ion-rhombic" : "single-ion",
    residual: rhombic ? "none" : "u1",
    axis,
    magnitude: normMat3(term.anisotropic),
    compatibleWithAxis: h0Axis ? rotationResidual(term.anisotropic, h0Axis) <= tolerance : null,
    detail: rhombic
      ? `A rhombic single-ion term (D = ${num(p.dAxial)}${unit}, E = ${num(p.eRhombic)}${unit}) leaves no continuous spin rotation: no spin component is conserved, so the q = 0 resonance shifts and splits even with the field along the main axis.`
      : `A single-ion anisotropy D (S.n)^2 (D = ${num(p.dAxial)}${unit}, n = ${fmtAxis(p.axis ?? [0, 0, 1])}) on a spin S >= 1 breaks SU(2) down to U(1) about n: the q = 0 resonance is no longer pinned at the Zeeman energy and acquires a zero-field splitting that depends on the field direction.`,
  };
}

/** Site-dependent fields, and fields transverse to the axis of H0. */
function fieldFindings(
  fieldGroups: readonly { ids: string[]; vector: Vec3 }[],
  fields: FieldClass,
  h0: SymmetryClass,
  h0Axis: Vec3 | null,
  tolerance: number,
  unit: string,
  breaking: SymmetryFinding[],
): void {
  if (!fields.hasField) return;
  if (!fields.fieldsUniform) {
    for (const f of fieldGroups) {
      const deviation = norm3(sub3(f.vector, fields.meanField));
      if (deviation <= tolerance) continue;
      breaking.push({
        id: f.ids[0] ?? "",
        ids: f.ids,
        kind: "non-uniform-field",
        residual: fields.full === "none" ? "none" : "u1",
        axis: fields.fullAxis,
        magnitude: deviation,
        compatibleWithAxis: h0Axis ? norm3(cross3(f.vector, h0Axis)) <= tolerance : null,
        detail:
          "Site-dependent effective fields (site-dependent g-tensors, or a staggered field from DM) defeat the Larmor theorem even for an SU(2) H0: the q = 0 resonance is no longer pinned at the Zeeman energy, and a staggered field can open a gap in a chain.",
      });
    }
  }
  if (h0 === "u1" && h0Axis) {
    const axis = h0Axis;
    for (const f of fieldGroups) {
      const transverse = norm3(cross3(f.vector, axis));
      if (transverse <= tolerance) continue;
      breaking.push({
        id: f.ids[0] ?? "",
        ids: f.ids,
        kind: "transverse-field",
        residual: "none",
        axis: null,
        magnitude: transverse,
        compatibleWithAxis: false,
        detail: `The field has a component ${num(transverse)}${unit} transverse to the U(1) axis ${fmtAxis(axis)} of H0, so no spin component is conserved: the q = 0 resonance shifts and mixes with other modes, and the U(1) selection rules are lost.`,
      });
    }
  }
}

/** The symmetry a bond term's anisotropic part leaves alone, its kind and its sentence. */
function anisotropyAlone(term: AnisotropicTerm, tolerance: number, unit: string): { axis: Vec3 | null; kind: FindingKind; detail: string } {
  const alone: AnisotropicTerm = { ...term, dm: [0, 0, 0] }; // shares the facts, and so the eigen-decomposition
  const axis = singleTermAxis(term.anisotropic, alone, tolerance);
  const diagonal = isDiagonal(term.anisotropic, tolerance);
  const kind: FindingKind = axis || diagonal ? "exchange-anisotropy" : "off-diagonal-symmetric";
  // The principal values of the symmetric part J 1 + T are J plus the eigenvalues of T (the same
  // eigenvectors): the decomposition made for the candidate axes serves.
  const iso = trace3(term.matrix) / 3;
  const [t0, t1, t2] = termEig(alone).values;
  return { axis, kind, detail: exchangeAnisotropyDetail(kind, axis, [t0 + iso, t1 + iso, t2 + iso], unit) };
}

/** `angleTolerance` = tolerance / |D|: the angle at which the DM term's own residual reaches it. */
function dmDetail(axis: Vec3, uniformField: Vec3 | null, angleTolerance: number): string {
  const base = "A DM vector breaks SU(2): the q = 0 resonance is no longer pinned at the Zeeman energy";
  if (!uniformField) {
    return `${base}; for a uniform DM chain with antiferromagnetic exchange and D parallel to the field it splits into a doublet, otherwise it shifts and broadens.`;
  }
  const parallel = norm3(cross3(axis, uniformField)) <= angleTolerance;
  return parallel
    ? `${base}; here D is parallel to the field, so for a uniform DM chain with antiferromagnetic exchange the line splits into a doublet.`
    : `${base}; here D is not parallel to the field, so no spin component is conserved and the line can shift, split and broaden.`;
}

function exchangeAnisotropyDetail(kind: FindingKind, axis: Vec3 | null, principal: Vec3, unit: string): string {
  const values = `${principal.map(num).join(", ")}${unit}`;
  if (axis) {
    return `An XXZ-type exchange anisotropy about n = ${fmtAxis(axis)} (principal values ${values}) breaks SU(2) down to U(1) about n: the q = 0 resonance is no longer pinned at the Zeeman energy and can shift and broaden, although S.n stays conserved with the field along n.`;
  }
  if (kind === "off-diagonal-symmetric") {
    return `A symmetric off-diagonal (Gamma-type) exchange with three different principal values (${values}) leaves no continuous spin rotation: no spin component is conserved and the q = 0 resonance can shift, split and broaden.`;
  }
  return `An XYZ exchange with three different principal values (${values}) leaves no continuous spin rotation: no spin component is conserved and the q = 0 resonance can shift, split and broaden.`;
}

// ---------------------------------------------------------------------------------------------
// Larmor protection
// ---------------------------------------------------------------------------------------------

export interface ResonanceProtection {
  /** True iff H0 is SU(2) and the effective field is uniform (physics-notes section 4). */
  readonly protected: boolean;
  /** Ids of every term that breaks the protection (empty when protected). */
  readonly breakingIds: readonly string[];
  readonly reason: string;
}

/**
 * Larmor theorem (physics-notes section 4): if [H0, S^a_tot] = 0 for all a and the Zeeman term is
 * -h . S_tot with one h for all sites, then [H, S^-_n] = |h| S^-_n for the spin lowering
 * operator about h, so the q = 0 transverse response is a single line at the Zeeman energy |h|.
 * A uniform but anisotropic g-tensor only changes h = muB g^T B, so it keeps the protection.
 */
export function resonanceProtection(c: SymmetryClassification): ResonanceProtection {
  const p = larmorProtection(c);
  return { ...p, breakingIds: p.protected ? [] : [...new Set(c.breaking.flatMap((f) => f.ids))] };
}

/** resonanceProtection without the list of breaking ids (what the analysis reads on every edit). */
export function larmorProtection(c: SymmetryClassification): LarmorProtection {
  if (c.h0 === "su2" && c.fieldsUniform) return PROTECTED;
  return c.h0 !== "su2" ? UNPROTECTED_H0 : UNPROTECTED_FIELD;
}

export interface LarmorProtection {
  readonly protected: boolean;
  readonly reason: string;
  /** Why the line is not protected, as a clause ("H0 is not SU(2)-symmetric: it may shift, ..."); empty when protected. */
  readonly cause: string;
}

const PROTECTED: LarmorProtection = {
  protected: true,
  reason:
    "H0 is SU(2)-symmetric and every site sees the same effective field, so by the Larmor theorem the q = 0 resonance sits exactly at the Zeeman energy for any couplings.",
  cause: "",
};

function unprotected(why: string): LarmorProtection {
  const cause = `${why}: it may shift, split and broaden, so inferences that rely on the Larmor pinning do not hold.`;
  return { protected: false, reason: `The q = 0 resonance is not protected because ${cause}`, cause };
}

const UNPROTECTED_H0 = unprotected("H0 is not SU(2)-symmetric");
const UNPROTECTED_FIELD = unprotected("the effective field is not the same on every site");

/** Convenience: uniform effective field h = muB g^T B for one g-tensor (energy units of muB B). */
export function effectiveField(g: Mat3, bohrMagnetonTimesFieldVector: Vec3): Vec3 {
  return mulMatVec3(transpose3(g), bohrMagnetonTimesFieldVector);
}
