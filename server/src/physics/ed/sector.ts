// Symmetry sectors (fixed S^z and/or momentum) and the matrix-free operator kernels.
//
// Momentum states (translation T of period L, T|r,k> = e^{ik}|r,k>, k = 2 pi n / L):
//   |r,k> = p_r^{-1/2} sum_{t<p_r} e^{-ikt} T^t |r>,   p_r = period of the representative r,
// allowed when n p_r = 0 mod L. For an operator O with T O T^-1 = e^{iq} O mapping sector k to
// k' = k + q, the gather form of (O v) in the target sector is
//   (O v)[b] = sum_{s: <b|O|s> != 0} <b|O|s> e^{-ik l} sqrt(p_b / p_a) v[a],   s = T^l(a),
// where b runs over target representatives and a, l locate s in the source basis. Vectors are
// indexed by representative (entries of representatives not allowed at this k stay zero).
// Vectors are Float64Array: real (length R) or complex interleaved re/im (length 2R).
import type { Basis } from "./basis";
import type { CMat } from "./localOps";
import type { CompiledModel } from "./model";

const SQRT = new Float64Array(257);
const INV_SQRT = new Float64Array(257);
for (let p = 1; p <= 256; p++) {
  SQRT[p] = Math.sqrt(p);
  INV_SQRT[p] = 1 / Math.sqrt(p);
}

export class Sector {
  readonly basis: Basis;
  /** Momentum index n (k = 2 pi n / L), null without translations. */
  readonly kIndex: number | null;
  readonly L: number;
  readonly complex: boolean;
  /** 1 for representatives allowed at this k (null: all allowed). */
  readonly compat: Uint8Array | null;
  /** Number of allowed representatives: the dimension of the sector. */
  readonly dim: number;
  /** e^{-ikl}, l = 0..L-1. */
  readonly phRe: Float64Array;
  readonly phIm: Float64Array;
  /** Digit sum A of the configuration space (null: all). */
  readonly digitSum: number | null;

  constructor(basis: Basis, kIndex: number | null, complex: boolean) {
    this.basis = basis;
    this.digitSum = basis.space.digitSum;
    const L = basis.tr?.L ?? 1;
    this.L = L;
    this.kIndex = basis.tr ? (((kIndex ?? 0) % L) + L) % L : null;
    const n = this.kIndex ?? 0;
    this.phRe = new Float64Array(L);
    this.phIm = new Float64Array(L);
    for (let l = 0; l < L; l++) {
      const phase = (-2 * Math.PI * ((n * l) % L)) / L;
      // exact values for the real momenta
      const m = (n * l) % L;
      if (m === 0) {
        this.phRe[l] = 1;
      } else if (2 * m === L) {
        this.phRe[l] = -1;
      } else {
        this.phRe[l] = Math.cos(phase);
        this.phIm[l] = Math.sin(phase);
      }
    }
    const realK = n === 0 || 2 * n === L;
    this.complex = complex || !realK;
    let compat: Uint8Array | null = null;
    let dim = basis.nReps;
    if (basis.period && n !== 0) {
      compat = new Uint8Array(basis.nReps);
      dim = 0;
      const per = basis.period;
      for (let a = 0; a < basis.nReps; a++) {
        if ((n * per[a]!) % L === 0) {
          compat[a] = 1;
          dim++;
        }
      }
      if (dim === basis.nReps) compat = null;
    }
    this.compat = compat;
    this.dim = dim;
  }

  /** Scalars per vector (R or 2R). */
  get length(): number {
    return this.complex ? 2 * this.basis.nReps : this.basis.nReps;
  }

  newVector(): Float64Array {
    return new Float64Array(this.length);
  }

  /** Zeroes the entries of representatives not allowed at this momentum. */
  mask(v: Float64Array): void {
    const c = this.compat;
    if (!c) return;
    if (this.complex) {
      for (let a = 0; a < c.length; a++)
        if (!c[a]) {
          v[2 * a] = 0;
          v[2 * a + 1] = 0;
        }
    } else for (let a = 0; a < c.length; a++) if (!c[a]) v[a] = 0;
  }

  /** Digit sum (Sz + spinSum) of each representative. */
  digitSumOf(code: number): number {
    const d = this.basis.space.dims;
    let rem = code;
    let s = 0;
    for (let p = 0; p < d.length; p++) {
      const dp = d[p]!;
      const q = Math.floor(rem / dp);
      s += rem - q * dp;
      rem = q;
    }
    return s;
  }
}

/** An operator given by local terms, compiled for gather kernels. */
export interface LocalOperator {
  /** Two-site terms (positions p != q, any order) with operator on a_p * d_q + a_q. */
  readonly pairs: readonly { readonly p: number; readonly q: number; readonly op: CMat }[];
  readonly sites: readonly { readonly p: number; readonly op: CMat }[];
  /** Change of the digit sum (0 for H and S^z, -1 for S^-, +1 for S^+); null if not definite. */
  readonly deltaA: number | null;
}

interface RowCache {
  readonly ptr: Int32Array;
  readonly col: Int32Array;
  readonly cidx: Uint16Array | Uint32Array;
}

/** Transition tables (gather form) of a local operator. */
interface Compiled {
  readonly nTerms: number;
  /** Term sites (q = -1 for one-site terms) and dq (local dim of q). */
  readonly tp: Int32Array;
  readonly tq: Int32Array;
  readonly tdq: Int32Array;
  /** Offset of each term's local-row table in `rowStart`. */
  readonly rowBase: Int32Array;
  /** rowStart[rowBase[t] + loc] .. rowStart[rowBase[t] + loc + 1]: transitions. */
  readonly rowStart: Int32Array;
  readonly dCode: Float64Array;
  readonly ampRe: Float64Array;
  readonly ampIm: Float64Array;
  /** Diagonal values per term and local row (only when diagonals are split off). */
  readonly diagVal: Float64Array;
  readonly real: boolean;
}

function compile(op: LocalOperator, strides: Float64Array, dims: Int32Array, splitDiagonal: boolean): Compiled {
  const terms: { p: number; q: number; op: CMat }[] = [
    ...op.pairs.map((t) => ({ p: t.p, q: t.q, op: t.op })),
    ...op.sites.map((t) => ({ p: t.p, q: -1, op: t.op })),
  ];
  const nT = terms.length;
  const tp = new Int32Array(nT);
  const tq = new Int32Array(nT);
  const tdq = new Int32Array(nT);
  const rowBase = new Int32Array(nT + 1);
  const rs: number[] = [];
  const dc: number[] = [];
  const ar: number[] = [];
  const ai: number[] = [];
  const dv: number[] = [];
  let real = true;
  for (let t = 0; t < nT; t++) {
    const term = terms[t]!;
    tp[t] = term.p;
    tq[t] = term.q;
    const dq = term.q >= 0 ? dims[term.q]! : 1;
    tdq[t] = dq;
    rowBase[t] = rs.length;
    const m = term.op;
    const nn = m.n;
    for (let r = 0; r < nn; r++) {
      rs.push(dc.length);
      const rp = term.q >= 0 ? Math.floor(r / dq) : r;
      const rq = term.q >= 0 ? r % dq : 0;
      let diag = 0;
      for (let c = 0; c < nn; c++) {
        const re = m.re[r * nn + c]!;
        const im = m.im[r * nn + c]!;
        if (re === 0 && im === 0) continue;
        if (c === r && splitDiagonal) {
          diag = re;
          continue;
        }
        const cp = term.q >= 0 ? Math.floor(c / dq) : c;
        const cq = term.q >= 0 ? c % dq : 0;
        // <b|O|s>: row = local state of b, column = local state of s
        dc.push((cp - rp) * strides[term.p]! + (term.q >= 0 ? (cq - rq) * strides[term.q]! : 0));
        ar.push(re);
        ai.push(im);
        if (im !== 0) real = false;
      }
      dv.push(diag);
    }
    rs.push(dc.length); // sentinel per term (one extra row entry)
  }
  rowBase[nT] = rs.length;
  return {
    nTerms: nT,
    tp,
    tq,
    tdq,
    rowBase,
    rowStart: Int32Array.from(rs),
    dCode: Float64Array.from(dc),
    ampRe: Float64Array.from(ar),
    ampIm: Float64Array.from(ai),
    diagVal: Float64Array.from(dv),
    real,
  };
}

/** Diagonal row index bookkeeping: rowBase[t] + loc indexes both rowStart and (shifted) diagVal. */
function diagIndex(c: Compiled, t: number, loc: number): number {
  return c.rowBase[t]! - t + loc; // one sentinel per earlier term
}

export interface ApplyStats {
  /** Matrix-vector products. */
  matvecs: number;
  /** States x terms visited (work measure). */
  elements: number;
  seconds: number;
}

/**
 * Hamiltonian of one sector, matrix-free. Picks the spin-1/2 bit kernel (U(1) frame, all
 * spins 1/2, <= 30 sites, Lin tables) or the general mixed-radix kernel.
 */
export class SectorHamiltonian {
  readonly sector: Sector;
  readonly diag: Float64Array;
  readonly complex: boolean;
  readonly kernel: "bits" | "generic";
  readonly stats: ApplyStats = { matvecs: 0, elements: 0, seconds: 0 };
  private readonly model: CompiledModel;
  private readonly comp: Compiled;
  private scratch: Float64Array | null = null;
  // bit kernel data
  private readonly bMask: Int32Array | null = null;
  private readonly bP: Int32Array | null = null;
  private readonly coefRe: Float64Array | null = null;
  private readonly coefIm: Float64Array | null = null;

  /** Cached sparse rows (null: matrix-free). */
  private rows: RowCache | null = null;

  /**
   * @param cacheBytes memory allowance for caching the sparse rows of this sector (column index
   *   and coefficient index per non-zero, built once with the same lookups as the matrix-free
   *   kernel; 0 = always matrix-free). The cache is skipped when it would not fit.
   */
  constructor(model: CompiledModel, sector: Sector, cacheBytes = 0) {
    this.model = model;
    this.sector = sector;
    const space = sector.basis.space;
    this.comp = compile({ pairs: model.pairs, sites: model.sites, deltaA: 0 }, space.strides, space.dims, true);
    this.complex = sector.complex;
    const bits =
      sector.basis.repsU32 !== null &&
      space.ib !== null &&
      model.conserved &&
      model.nSites <= 30 &&
      model.pairs.every((t) => t.op.n === 4) &&
      model.sites.every((t) => t.op.n === 2);
    this.kernel = bits ? "bits" : "generic";
    this.diag = this.computeDiagonal();
    const L = sector.L;
    if (bits) {
      // pair transitions: row (0,1) -> column (1,0) amplitude <01|O|10> = op[1][2]; row (1,0): op[2][1]
      const nP = model.pairs.length;
      const mask = new Int32Array(nP);
      const pp = new Int32Array(nP);
      const cre = new Float64Array(nP * 2 * L);
      const cim = new Float64Array(nP * 2 * L);
      for (let t = 0; t < nP; t++) {
        const term = model.pairs[t]!;
        mask[t] = (1 << term.p) | (1 << term.q);
        pp[t] = term.p;
        const m = term.op;
        for (let o = 0; o < 2; o++) {
          const idx = o === 0 ? 1 * 4 + 2 : 2 * 4 + 1; // o = bit of p in the row configuration
          const aRe = m.re[idx]!;
          const aIm = m.im[idx]!;
          for (let l = 0; l < L; l++) {
            const pr = sector.phRe[l]!;
            const pi = sector.phIm[l]!;
            cre[(t * 2 + o) * L + l] = aRe * pr - aIm * pi;
            cim[(t * 2 + o) * L + l] = aRe * pi + aIm * pr;
          }
        }
      }
      this.bMask = mask;
      this.bP = pp;
      this.coefRe = cre;
      this.coefIm = cim;
    } else {
      // generic coefficient table amp[e] * e^{-ikl}, index e * L + l
      const nE = this.comp.dCode.length;
      const cre = new Float64Array(nE * L);
      const cim = new Float64Array(nE * L);
      for (let e = 0; e < nE; e++) {
        const aRe = this.comp.ampRe[e]!;
        const aIm = this.comp.ampIm[e]!;
        for (let l = 0; l < L; l++) {
          const pr = sector.phRe[l]!;
          const pi = sector.phIm[l]!;
          cre[e * L + l] = aRe * pr - aIm * pi;
          cim[e * L + l] = aRe * pi + aIm * pr;
        }
      }
      this.coefRe = cre;
      this.coefIm = cim;
    }
    if (cacheBytes > 0) this.rows = this.buildRows(cacheBytes);
  }

  /** True when the sparse rows are cached. */
  get cached(): boolean {
    return this.rows !== null;
  }

  /** Drops the row cache (back to matrix-free). */
  dropCache(): void {
    this.rows = null;
  }

  private buildRows(maxBytes: number): RowCache | null {
    const sec = this.sector;
    const basis = sec.basis;
    const R = basis.nReps;
    const compat = sec.compat;
    const nCoef = this.coefRe!.length;
    const wide = nCoef > 65535;
    const bytesPer = 4 + (wide ? 4 : 2);
    // pass 1: count
    const ptr = new Int32Array(R + 1);
    let nnz = 0;
    if (this.kernel === "bits") {
      const reps = basis.repsU32!;
      const mask = this.bMask!;
      const nP = mask.length;
      for (let a = 0; a < R; a++) {
        if (compat === null || compat[a] !== 0) {
          const s = reps[a]!;
          for (let t = 0; t < nP; t++) {
            const m = mask[t]!;
            const bb = s & m;
            if (bb !== 0 && bb !== m) nnz++;
          }
        }
        ptr[a + 1] = nnz;
        if ((a & 0xfff) === 0 && nnz * bytesPer + 4 * R > maxBytes) return null;
      }
    } else {
      const { nTerms, tp, tq, tdq, rowBase, rowStart } = this.comp;
      const dims = basis.space.dims;
      const n = dims.length;
      const dig = new Int32Array(n);
      const reps = basis.reps;
      for (let a = 0; a < R; a++) {
        if (compat === null || compat[a] !== 0) {
          let rem = reps[a]!;
          for (let p = 0; p < n; p++) {
            const dp = dims[p]!;
            const q = Math.floor(rem / dp);
            dig[p] = rem - q * dp;
            rem = q;
          }
          for (let t = 0; t < nTerms; t++) {
            const q = tq[t]!;
            const loc = q >= 0 ? dig[tp[t]!]! * tdq[t]! + dig[q]! : dig[tp[t]!]!;
            const r0 = rowBase[t]! + loc;
            nnz += rowStart[r0 + 1]! - rowStart[r0]!;
          }
        }
        ptr[a + 1] = nnz;
        if ((a & 0xfff) === 0 && nnz * bytesPer + 4 * R > maxBytes) return null;
      }
    }
    if (nnz * bytesPer + 4 * R > maxBytes) return null;
    const col = new Int32Array(nnz);
    const cidx = wide ? new Uint32Array(nnz) : new Uint16Array(nnz);
    // pass 2: fill
    const table = basis.table;
    const space = basis.space;
    let e = 0;
    if (this.kernel === "bits") {
      const reps = basis.repsU32!;
      const mask = this.bMask!;
      const pp = this.bP!;
      const nP = mask.length;
      const ia = space.ia!;
      const ib = space.ib!;
      const nLo = space.nLo;
      const loMask = space.W - 1;
      const L = sec.L;
      for (let a = 0; a < R; a++) {
        if (compat !== null && compat[a] === 0) continue;
        const s = reps[a]!;
        for (let t = 0; t < nP; t++) {
          const m = mask[t]!;
          const bb = s & m;
          if (bb === 0 || bb === m) continue;
          const s2 = s ^ m;
          const rank = ib[s2 >>> nLo]! + ia[s2 & loMask]!;
          const o = (s >>> pp[t]!) & 1;
          if (table !== null) {
            const info = table[rank]!;
            col[e] = info >>> 8;
            cidx[e] = (t * 2 + o) * L + (info & 255);
          } else {
            col[e] = rank;
            cidx[e] = t * 2 + o;
          }
          e++;
        }
      }
    } else {
      const { nTerms, tp, tq, tdq, rowBase, rowStart, dCode } = this.comp;
      const dims = basis.space.dims;
      const n = dims.length;
      const dig = new Int32Array(n);
      const reps = basis.reps;
      const L = sec.L;
      for (let a = 0; a < R; a++) {
        if (compat !== null && compat[a] === 0) continue;
        const code = reps[a]!;
        let rem = code;
        for (let p = 0; p < n; p++) {
          const dp = dims[p]!;
          const q = Math.floor(rem / dp);
          dig[p] = rem - q * dp;
          rem = q;
        }
        for (let t = 0; t < nTerms; t++) {
          const q = tq[t]!;
          const loc = q >= 0 ? dig[tp[t]!]! * tdq[t]! + dig[q]! : dig[tp[t]!]!;
          const r0 = rowBase[t]! + loc;
          const e1 = rowStart[r0 + 1]!;
          for (let x = rowStart[r0]!; x < e1; x++) {
            const rank = space.rank(code + dCode[x]!);
            if (table !== null) {
              const info = table[rank]!;
              col[e] = info >>> 8;
              cidx[e] = x * L + (info & 255);
            } else {
              col[e] = rank;
              cidx[e] = x;
            }
            e++;
          }
        }
      }
    }
    return { ptr, col, cidx };
  }

  get bytes(): number {
    const r = this.rows;
    return (
      this.diag.byteLength +
      (this.scratch?.byteLength ?? 0) +
      (r ? r.ptr.byteLength + r.col.byteLength + r.cidx.byteLength : 0)
    );
  }

  private computeDiagonal(): Float64Array {
    const basis = this.sector.basis;
    const R = basis.nReps;
    const out = new Float64Array(R);
    const comp = this.comp;
    const dims = basis.space.dims;
    const n = dims.length;
    const dig = new Int32Array(n);
    const reps = basis.reps;
    for (let a = 0; a < R; a++) {
      let rem = reps[a]!;
      for (let p = 0; p < n; p++) {
        const dp = dims[p]!;
        const q = Math.floor(rem / dp);
        dig[p] = rem - q * dp;
        rem = q;
      }
      let e = 0;
      for (let t = 0; t < comp.nTerms; t++) {
        const q = comp.tq[t]!;
        const loc = q >= 0 ? dig[comp.tp[t]!]! * comp.tdq[t]! + dig[q]! : dig[comp.tp[t]!]!;
        e += comp.diagVal[diagIndex(comp, t, loc)]!;
      }
      out[a] = e;
    }
    return out;
  }

  /** Work per product: states x off-diagonal terms. */
  get termsPerState(): number {
    return this.comp.nTerms;
  }

  /** y = H x (x must be zero on representatives not allowed at this momentum). */
  apply(x: Float64Array, y: Float64Array): void {
    const t0 = performance.now();
    if (this.rows) this.applyRows(this.rows, x, y);
    else if (this.kernel === "bits") this.applyBits(x, y);
    else applyGeneric(this.comp, this.sector, this.sector, x, y, this.diag);
    this.stats.matvecs++;
    this.stats.elements += this.sector.basis.nReps * this.comp.nTerms;
    this.stats.seconds += (performance.now() - t0) / 1000;
  }

  private applyRows(rows: RowCache, x: Float64Array, y: Float64Array): void {
    const sec = this.sector;
    const R = sec.basis.nReps;
    const per = sec.basis.period;
    const { ptr, col, cidx } = rows;
    const cre = this.coefRe!;
    const cim = this.coefIm!;
    const diag = this.diag;
    const compat = sec.compat;
    let xs = x;
    if (per) {
      const len = this.complex ? 2 * R : R;
      if (!this.scratch || this.scratch.length !== len) this.scratch = new Float64Array(len);
      xs = this.scratch;
      if (this.complex)
        for (let a = 0; a < R; a++) {
          const f = INV_SQRT[per[a]!]!;
          xs[2 * a] = x[2 * a]! * f;
          xs[2 * a + 1] = x[2 * a + 1]! * f;
        }
      else for (let a = 0; a < R; a++) xs[a] = x[a]! * INV_SQRT[per[a]!]!;
    }
    if (!this.complex) {
      for (let a = 0; a < R; a++) {
        let acc = 0;
        const e1 = ptr[a + 1]!;
        for (let e = ptr[a]!; e < e1; e++) acc += cre[cidx[e]!]! * xs[col[e]!]!;
        const f = per ? SQRT[per[a]!]! : 1;
        y[a] = compat !== null && compat[a] === 0 ? 0 : diag[a]! * x[a]! + f * acc;
      }
    } else {
      for (let a = 0; a < R; a++) {
        let accR = 0;
        let accI = 0;
        const e1 = ptr[a + 1]!;
        for (let e = ptr[a]!; e < e1; e++) {
          const c = cidx[e]!;
          const cr = cre[c]!;
          const cm = cim[c]!;
          const j = 2 * col[e]!;
          const xr = xs[j]!;
          const xi = xs[j + 1]!;
          accR += cr * xr - cm * xi;
          accI += cr * xi + cm * xr;
        }
        if (compat !== null && compat[a] === 0) {
          y[2 * a] = 0;
          y[2 * a + 1] = 0;
          continue;
        }
        const f = per ? SQRT[per[a]!]! : 1;
        const d = diag[a]!;
        y[2 * a] = d * x[2 * a]! + f * accR;
        y[2 * a + 1] = d * x[2 * a + 1]! + f * accI;
      }
    }
  }

  private applyBits(x: Float64Array, y: Float64Array): void {
    const sec = this.sector;
    const basis = sec.basis;
    const R = basis.nReps;
    const reps = basis.repsU32!;
    const space = basis.space;
    const ia = space.ia!;
    const ib = space.ib!;
    const nLo = space.nLo;
    const loMask = space.W - 1;
    const mask = this.bMask!;
    const pp = this.bP!;
    const nP = mask.length;
    const diag = this.diag;
    const cre = this.coefRe!;
    const cim = this.coefIm!;
    const table = basis.table;
    const per = basis.period;
    const compat = sec.compat;
    const L = sec.L;
    if (!table || !per) {
      // no translations: rank is the index, coefficients have l = 0
      if (!this.complex) {
        for (let a = 0; a < R; a++) {
          const s = reps[a]!;
          let acc = diag[a]! * x[a]!;
          for (let t = 0; t < nP; t++) {
            const m = mask[t]!;
            const bb = s & m;
            if (bb === 0 || bb === m) continue;
            const s2 = s ^ m;
            const o = (s >>> pp[t]!) & 1;
            acc += cre[t * 2 + o]! * x[ib[s2 >>> nLo]! + ia[s2 & loMask]!]!;
          }
          y[a] = acc;
        }
      } else {
        for (let a = 0; a < R; a++) {
          const s = reps[a]!;
          const d = diag[a]!;
          let accR = d * x[2 * a]!;
          let accI = d * x[2 * a + 1]!;
          for (let t = 0; t < nP; t++) {
            const m = mask[t]!;
            const bb = s & m;
            if (bb === 0 || bb === m) continue;
            const s2 = s ^ m;
            const o = (s >>> pp[t]!) & 1;
            const j = 2 * (ib[s2 >>> nLo]! + ia[s2 & loMask]!);
            const cr = cre[t * 2 + o]!;
            const ci = cim[t * 2 + o]!;
            const xr = x[j]!;
            const xi = x[j + 1]!;
            accR += cr * xr - ci * xi;
            accI += cr * xi + ci * xr;
          }
          y[2 * a] = accR;
          y[2 * a + 1] = accI;
        }
      }
      return;
    }
    // translations: pre-scale x by 1/sqrt(p)
    const len = this.complex ? 2 * R : R;
    if (!this.scratch || this.scratch.length !== len) this.scratch = new Float64Array(len);
    const xs = this.scratch;
    if (!this.complex) {
      for (let a = 0; a < R; a++) xs[a] = x[a]! * INV_SQRT[per[a]!]!;
      for (let a = 0; a < R; a++) {
        if (compat !== null && compat[a] === 0) {
          y[a] = 0;
          continue;
        }
        const s = reps[a]!;
        let acc = 0;
        for (let t = 0; t < nP; t++) {
          const m = mask[t]!;
          const bb = s & m;
          if (bb === 0 || bb === m) continue;
          const s2 = s ^ m;
          const info = table[ib[s2 >>> nLo]! + ia[s2 & loMask]!]!;
          const o = (s >>> pp[t]!) & 1;
          acc += cre[(t * 2 + o) * L + (info & 255)]! * xs[info >>> 8]!;
        }
        y[a] = diag[a]! * x[a]! + SQRT[per[a]!]! * acc;
      }
    } else {
      for (let a = 0; a < R; a++) {
        const f = INV_SQRT[per[a]!]!;
        xs[2 * a] = x[2 * a]! * f;
        xs[2 * a + 1] = x[2 * a + 1]! * f;
      }
      for (let a = 0; a < R; a++) {
        if (compat !== null && compat[a] === 0) {
          y[2 * a] = 0;
          y[2 * a + 1] = 0;
          continue;
        }
        const s = reps[a]!;
        let accR = 0;
        let accI = 0;
        for (let t = 0; t < nP; t++) {
          const m = mask[t]!;
          const bb = s & m;
          if (bb === 0 || bb === m) continue;
          const s2 = s ^ m;
          const info = table[ib[s2 >>> nLo]! + ia[s2 & loMask]!]!;
          const o = (s >>> pp[t]!) & 1;
          const ci = (t * 2 + o) * L + (info & 255);
          const cr = cre[ci]!;
          const cm = cim[ci]!;
          const j = 2 * (info >>> 8);
          const xr = xs[j]!;
          const xi = xs[j + 1]!;
          accR += cr * xr - cm * xi;
          accI += cr * xi + cm * xr;
        }
        const d = diag[a]!;
        const sp = SQRT[per[a]!]!;
        y[2 * a] = d * x[2 * a]! + sp * accR;
        y[2 * a + 1] = d * x[2 * a + 1]! + sp * accI;
      }
    }
  }
}

/**
 * General gather kernel: y (target sector) = O x (source sector). With `diag` the operator's
 * diagonal was split off at compile time and is added from the per-representative array
 * (only for src === dst).
 */
function applyGeneric(
  comp: Compiled,
  src: Sector,
  dst: Sector,
  x: Float64Array,
  y: Float64Array,
  diag: Float64Array | null,
): void {
  const complex = dst.complex;
  if (src.complex !== complex) throw new Error("applyGeneric: source and target must both be real or complex");
  const dBasis = dst.basis;
  const sBasis = src.basis;
  const sSpace = sBasis.space;
  const dims = dBasis.space.dims;
  const n = dims.length;
  const dig = new Int32Array(n);
  const R = dBasis.nReps;
  const reps = dBasis.reps;
  const table = sBasis.table;
  const sPer = sBasis.period;
  const dPer = dBasis.period;
  const compat = dst.compat;
  const phRe = src.phRe;
  const phIm = src.phIm;
  const { nTerms, tp, tq, tdq, rowBase, rowStart, dCode, ampRe, ampIm } = comp;
  const sDigitSum = sSpace.digitSum;
  for (let b = 0; b < R; b++) {
    if (compat !== null && compat[b] === 0) {
      if (complex) {
        y[2 * b] = 0;
        y[2 * b + 1] = 0;
      } else y[b] = 0;
      continue;
    }
    const code = reps[b]!;
    let rem = code;
    for (let p = 0; p < n; p++) {
      const dp = dims[p]!;
      const q = Math.floor(rem / dp);
      dig[p] = rem - q * dp;
      rem = q;
    }
    let accR = 0;
    let accI = 0;
    const pb = dPer ? dPer[b]! : 1;
    for (let t = 0; t < nTerms; t++) {
      const q = tq[t]!;
      const loc = q >= 0 ? dig[tp[t]!]! * tdq[t]! + dig[q]! : dig[tp[t]!]!;
      const r0 = rowBase[t]! + loc;
      const e1 = rowStart[r0 + 1]!;
      for (let e = rowStart[r0]!; e < e1; e++) {
        const s = code + dCode[e]!;
        let a: number;
        let cr = ampRe[e]!;
        let ci = ampIm[e]!;
        if (table !== null) {
          const info = table[sSpace.rank(s)]!;
          a = info >>> 8;
          const l = info & 255;
          const f = Math.sqrt(pb / sPer![a]!);
          const pr = phRe[l]! * f;
          const pi = phIm[l]! * f;
          const tr = cr * pr - ci * pi;
          ci = cr * pi + ci * pr;
          cr = tr;
        } else {
          if (sDigitSum === null && sSpace.ib === null) a = s;
          else a = sSpace.rank(s);
        }
        if (complex) {
          const xr = x[2 * a]!;
          const xi = x[2 * a + 1]!;
          accR += cr * xr - ci * xi;
          accI += cr * xi + ci * xr;
        } else accR += cr * x[a]!;
      }
    }
    if (diag) {
      const d = diag[b]!;
      if (complex) {
        accR += d * x[2 * b]!;
        accI += d * x[2 * b + 1]!;
      } else accR += d * x[b]!;
    }
    if (complex) {
      y[2 * b] = accR;
      y[2 * b + 1] = accI;
    } else y[b] = accR;
  }
}

/** A compiled local operator mapping one sector to another (for correlators). */
export class SectorOperator {
  private readonly comp: Compiled;
  constructor(
    op: LocalOperator,
    readonly src: Sector,
    readonly dst: Sector,
  ) {
    if (src.basis.space.dims !== dst.basis.space.dims && src.basis.space.dims.join() !== dst.basis.space.dims.join())
      throw new Error("SectorOperator: incompatible spaces");
    this.comp = compile(op, dst.basis.space.strides, dst.basis.space.dims, false);
  }
  apply(x: Float64Array, y: Float64Array): void {
    applyGeneric(this.comp, this.src, this.dst, x, y, null);
  }
}

/** Promotes a real vector to complex interleaved storage. */
export function toComplex(v: Float64Array, n: number): Float64Array {
  if (v.length === 2 * n) return v;
  const out = new Float64Array(2 * n);
  for (let a = 0; a < n; a++) out[2 * a] = v[a]!;
  return out;
}
