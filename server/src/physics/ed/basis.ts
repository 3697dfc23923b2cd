// Configuration spaces (fixed total digit sum, i.e. fixed S^z, or all configurations), the
// translation relabelling and momentum representatives.
//
// A configuration is a mixed-radix integer code = sum_p a_p * w_p with w_p = prod_{q<p} d_q,
// stored exactly in a double (total code space below 2^53). Site positions p are the
// *relabelled* sites: with a translation of period L and c sites per cell, site (cell t,
// sublattice u) sits at p = t * c + u, so that the translation is a rotation of the code by one
// cell block (a bit rotation for spin 1/2).
//
// Ranking inside a space (code -> index in increasing code order) uses H. Q. Lin's two-table
// scheme (Phys. Rev. B 42, 6561 (1990)): code = hi * W + lo, rank = ib[hi] + ia[lo], where ia
// ranks lo among the low parts with the same digit sum and ib is the offset of block hi. When the
// tables would be much larger than the space itself (few-magnon sectors of long chains) a binary
// search in the sorted code list is used instead.

export interface CancelCheck {
  (): void;
}

export class ConfigSpace {
  readonly nSites: number;
  readonly dims: Int32Array;
  readonly strides: Float64Array;
  /** Total digit sum A = sum_p a_p of every configuration (null: all configurations). */
  readonly digitSum: number | null;
  readonly size: number;
  readonly total: number;
  /** Lin tables (null in binary-search mode). */
  readonly nLo: number;
  readonly W: number;
  readonly ia: Int32Array | null;
  readonly ib: Int32Array | null;
  /** Sorted codes (binary-search mode, or on request). */
  private codes: Float64Array | null = null;
  /** Low parts grouped by digit sum (Lin mode): loStart[s]..loStart[s+1] in loCodes. */
  private readonly loStart: Int32Array | null;
  private readonly loCodes: Int32Array | null;
  private readonly hiSum: Int32Array | null;

  private constructor(
    dims: Int32Array,
    digitSum: number | null,
    size: number,
    nLo: number,
    tables: {
      ia: Int32Array;
      ib: Int32Array;
      loStart: Int32Array;
      loCodes: Int32Array;
      hiSum: Int32Array;
    } | null,
    codes: Float64Array | null,
  ) {
    this.nSites = dims.length;
    this.dims = dims;
    this.strides = new Float64Array(dims.length + 1);
    let w = 1;
    for (let p = 0; p < dims.length; p++) {
      this.strides[p] = w;
      w *= dims[p]!;
    }
    this.strides[dims.length] = w;
    this.total = w;
    this.digitSum = digitSum;
    this.size = size;
    this.nLo = nLo;
    this.W = this.strides[nLo]!;
    this.ia = tables?.ia ?? null;
    this.ib = tables?.ib ?? null;
    this.loStart = tables?.loStart ?? null;
    this.loCodes = tables?.loCodes ?? null;
    this.hiSum = tables?.hiSum ?? null;
    this.codes = codes;
  }

  /** Number of configurations with the given digit sum (null: all), without building anything. */
  static count(dims: readonly number[], digitSum: number | null): number {
    if (digitSum === null) return dims.reduce((a, d) => a * d, 1);
    return countTable(dims)[dims.length]![digitSum] ?? 0;
  }

  static create(dims: readonly number[], digitSum: number | null): ConfigSpace {
    const d = Int32Array.from(dims);
    const n = d.length;
    const total = dims.reduce((a, x) => a * x, 1);
    if (!(total < 2 ** 53)) throw new Error(`configuration space too large to index (${total} codes)`);
    const size = ConfigSpace.count(dims, digitSum);
    // Split: low sites 0..nLo-1 with W close to sqrt(total).
    let nLo = 0;
    let W = 1;
    while (nLo < n && W * W < total) {
      W *= d[nLo]!;
      nLo++;
    }
    const nHi = total / W;
    const lin = W + nHi <= Math.max(4 * size, 1 << 16) && W <= 2 ** 28 && nHi <= 2 ** 28;
    if (lin) return new ConfigSpace(d, digitSum, size, nLo, buildLin(d, nLo, W, nHi, digitSum), null);
    return new ConfigSpace(d, digitSum, size, nLo, null, enumerateSorted(d, digitSum, size));
  }

  /** Rank of a valid code of this space (index in increasing code order). */
  rank(code: number): number {
    const ib = this.ib;
    if (ib !== null) {
      const hi = Math.floor(code / this.W);
      return ib[hi]! + this.ia![code - hi * this.W]!;
    }
    const codes = this.codes!;
    let lo = 0;
    let hi = codes.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (codes[mid]! < code) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  }

  /** Calls fn(code, rank) for every configuration in increasing code order. */
  forEach(fn: (code: number, rank: number) => void, cancel?: CancelCheck): void {
    if (this.codes) {
      const c = this.codes;
      for (let r = 0; r < c.length; r++) {
        if (cancel && (r & 0xffff) === 0) cancel();
        fn(c[r]!, r);
      }
      return;
    }
    const W = this.W;
    const hiSum = this.hiSum!;
    const loStart = this.loStart!;
    const loCodes = this.loCodes!;
    const nHi = hiSum.length;
    let rank = 0;
    for (let hi = 0; hi < nHi; hi++) {
      if (cancel && (hi & 0xff) === 0) cancel();
      let a0: number;
      let a1: number;
      if (this.digitSum === null) {
        a0 = 0;
        a1 = loCodes.length;
      } else {
        const s = this.digitSum - hiSum[hi]!;
        if (s < 0 || s >= loStart.length - 1) continue;
        a0 = loStart[s]!;
        a1 = loStart[s + 1]!;
      }
      const base = hi * W;
      for (let q = a0; q < a1; q++) fn(base + loCodes[q]!, rank++);
    }
  }

  /** Sorted list of all codes (built on demand). */
  allCodes(): Float64Array {
    if (this.codes) return this.codes;
    const out = new Float64Array(this.size);
    this.forEach((c, r) => {
      out[r] = c;
    });
    this.codes = out;
    return out;
  }

  /** Bytes held by the ranking structures. */
  get bytes(): number {
    return (
      (this.ia?.byteLength ?? 0) +
      (this.ib?.byteLength ?? 0) +
      (this.loCodes?.byteLength ?? 0) +
      (this.hiSum?.byteLength ?? 0) +
      (this.codes?.byteLength ?? 0)
    );
  }

  /** Estimated bytes for create() without building. */
  static estimateBytes(dims: readonly number[], digitSum: number | null): number {
    const total = dims.reduce((a, x) => a * x, 1);
    const size = ConfigSpace.count(dims, digitSum);
    let W = 1;
    let nLo = 0;
    while (nLo < dims.length && W * W < total) W *= dims[nLo++]!;
    const nHi = total / W;
    if (W + nHi <= Math.max(4 * size, 1 << 16)) return 4 * (2 * W + 2 * nHi);
    return 8 * size;
  }
}

/** cnt[p][s] = number of digit strings on sites 0..p-1 with digit sum s. */
const countCache = new Map<string, number[][]>();
function countTable(dims: readonly number[]): number[][] {
  const key = dims.join(",");
  const hit = countCache.get(key);
  if (hit) return hit;
  const cnt: number[][] = [[1]];
  for (let p = 0; p < dims.length; p++) {
    const prev = cnt[p]!;
    const d = dims[p]!;
    const next = new Array<number>(prev.length + d - 1).fill(0);
    for (let s = 0; s < prev.length; s++) for (let a = 0; a < d; a++) next[s + a]! += prev[s]!;
    cnt.push(next);
  }
  if (countCache.size > 64) countCache.clear();
  countCache.set(key, cnt);
  return cnt;
}

function buildLin(d: Int32Array, nLo: number, W: number, nHi: number, digitSum: number | null) {
  const n = d.length;
  // digit sums of low parts
  const loSum = new Int32Array(W);
  {
    const dig = new Int32Array(nLo);
    let s = 0;
    for (let lo = 0; lo < W; lo++) {
      loSum[lo] = s;
      // increment mixed-radix counter
      for (let p = 0; p < nLo; p++) {
        dig[p]!++;
        s++;
        if (dig[p]! < d[p]!) break;
        s -= dig[p]!;
        dig[p] = 0;
      }
    }
  }
  const hiSum = new Int32Array(nHi);
  {
    const dig = new Int32Array(n - nLo);
    let s = 0;
    for (let hi = 0; hi < nHi; hi++) {
      hiSum[hi] = s;
      for (let p = 0; p < n - nLo; p++) {
        dig[p]!++;
        s++;
        if (dig[p]! < d[nLo + p]!) break;
        s -= dig[p]!;
        dig[p] = 0;
      }
    }
  }
  let maxLoSum = 0;
  for (let p = 0; p < nLo; p++) maxLoSum += d[p]! - 1;
  const loCount = new Int32Array(maxLoSum + 1);
  const ia = new Int32Array(W);
  for (let lo = 0; lo < W; lo++) {
    const s = loSum[lo]!;
    ia[lo] = digitSum === null ? lo : loCount[s]!;
    loCount[s]!++;
  }
  const loStart = new Int32Array(maxLoSum + 2);
  for (let s = 0; s <= maxLoSum; s++) loStart[s + 1] = loStart[s]! + loCount[s]!;
  const loCodes = new Int32Array(W);
  if (digitSum === null) {
    for (let lo = 0; lo < W; lo++) loCodes[lo] = lo;
  } else {
    const fill = loStart.slice(0, maxLoSum + 1);
    for (let lo = 0; lo < W; lo++) loCodes[fill[loSum[lo]!]!++] = lo;
  }
  const ib = new Int32Array(nHi);
  let offset = 0;
  for (let hi = 0; hi < nHi; hi++) {
    if (digitSum === null) {
      ib[hi] = offset;
      offset += W;
      continue;
    }
    const s = digitSum - hiSum[hi]!;
    if (s < 0 || s > maxLoSum) {
      ib[hi] = -1;
      continue;
    }
    ib[hi] = offset;
    offset += loCount[s]!;
  }
  return { ia, ib, loStart, loCodes, hiSum };
}

function enumerateSorted(d: Int32Array, digitSum: number | null, size: number): Float64Array {
  const n = d.length;
  const out = new Float64Array(size);
  if (digitSum === null) {
    for (let c = 0; c < size; c++) out[c] = c;
    return out;
  }
  const cnt = countTable(Array.from(d));
  const strides: number[] = [];
  let w = 1;
  for (let p = 0; p < n; p++) {
    strides.push(w);
    w *= d[p]!;
  }
  let k = 0;
  // most significant site first, digits increasing: increasing code order
  const rec = (p: number, remaining: number, base: number): void => {
    if (p < 0) {
      if (remaining === 0) out[k++] = base;
      return;
    }
    const below = cnt[p]!;
    for (let a = 0; a < d[p]! && a <= remaining; a++) {
      if ((below[remaining - a] ?? 0) === 0) continue;
      rec(p - 1, remaining - a, base + a * strides[p]!);
    }
  };
  rec(n - 1, digitSum, 0);
  return out;
}

/** Translation structure after relabelling (see file header). */
export interface Translation {
  /** Period L (number of cells). */
  readonly L: number;
  /** Sites per cell c. */
  readonly c: number;
  /** Code block size of one cell: prod of the c local dimensions. */
  readonly blockSize: number;
  /** blockSize^(L-1). */
  readonly topStride: number;
}

/**
 * Relabelling of sites. position[origSite] = relabelled position p; origOf[p] = original site.
 * With a translation permutation (perm[s] = image of site s), orbits are laid out cell by cell.
 */
export interface Relabelling {
  readonly position: Int32Array;
  readonly origOf: Int32Array;
  readonly translation: Translation | null;
  /** For each original site: (cell index t, sublattice u). */
  readonly cell: Int32Array;
  readonly sublattice: Int32Array;
}

export function identityRelabelling(n: number): Relabelling {
  const position = new Int32Array(n);
  for (let s = 0; s < n; s++) position[s] = s;
  return {
    position,
    origOf: position.slice(),
    translation: null,
    cell: new Int32Array(n),
    sublattice: position.slice(),
  };
}

/**
 * Relabelling for a translation permutation; returns an error string if the permutation is not
 * a free translation (all orbits of one common length L, equal spins along each orbit).
 */
export function translationRelabelling(perm: readonly number[], dims: readonly number[]): Relabelling | string {
  const n = dims.length;
  if (perm.length !== n) return `translation has ${perm.length} entries for ${n} sites`;
  const seen = new Uint8Array(n);
  for (const p of perm) {
    if (!Number.isInteger(p) || p < 0 || p >= n || seen[p]) return "translation is not a permutation of the sites";
    seen[p] = 1;
  }
  seen.fill(0);
  const orbits: number[][] = [];
  for (let s = 0; s < n; s++) {
    if (seen[s]) continue;
    const orbit: number[] = [];
    let t = s;
    while (!seen[t]) {
      seen[t] = 1;
      orbit.push(t);
      t = perm[t]!;
    }
    if (t !== s) return "translation is not a permutation of the sites";
    orbits.push(orbit);
  }
  const L = orbits[0]!.length;
  if (orbits.some((o) => o.length !== L)) return "translation orbits have different lengths (not a free translation)";
  if (L < 2) return "translation is the identity";
  if (L > 255) return `translation period ${L} above the supported 255`;
  const c = orbits.length;
  const position = new Int32Array(n);
  const origOf = new Int32Array(n);
  const cell = new Int32Array(n);
  const sublattice = new Int32Array(n);
  let blockSize = 1;
  for (let u = 0; u < c; u++) {
    const orbit = orbits[u]!;
    const d0 = dims[orbit[0]!]!;
    for (let t = 0; t < L; t++) {
      const s = orbit[t]!;
      if (dims[s] !== d0) return "translation maps sites of different spin onto each other";
      const p = t * c + u;
      position[s] = p;
      origOf[p] = s;
      cell[s] = t;
      sublattice[s] = u;
    }
    blockSize *= d0;
  }
  return {
    position,
    origOf,
    translation: { L, c, blockSize, topStride: blockSize ** (L - 1) },
    cell,
    sublattice,
  };
}

/** One translation step applied to a code (rotation by one cell block). */
export function translateCode(code: number, tr: Translation): number {
  const top = Math.floor(code / tr.topStride);
  return (code - top * tr.topStride) * tr.blockSize + top;
}

/**
 * Basis of one configuration space resolved by translations: representatives (smallest code of
 * each orbit), their periods, and, with translations, a table rank -> (rep index << 8 | shift l)
 * with config = T^l(rep). Without translations every configuration is its own representative
 * and the rank is the index.
 */
export class Basis {
  readonly space: ConfigSpace;
  readonly tr: Translation | null;
  readonly nReps: number;
  readonly reps: Float64Array;
  /** Same as reps for bit kernels (spin 1/2, <= 30 sites), else null. */
  readonly repsU32: Uint32Array | null;
  readonly period: Uint8Array | null;
  readonly table: Int32Array | null;

  private constructor(
    space: ConfigSpace,
    tr: Translation | null,
    reps: Float64Array,
    period: Uint8Array | null,
    table: Int32Array | null,
    bits: boolean,
  ) {
    this.space = space;
    this.tr = tr;
    this.reps = reps;
    this.nReps = reps.length;
    this.period = period;
    this.table = table;
    this.repsU32 = bits ? Uint32Array.from(reps) : null;
  }

  static build(space: ConfigSpace, tr: Translation | null, bits: boolean, cancel?: CancelCheck): Basis {
    if (!tr) return new Basis(space, null, space.allCodes(), null, null, bits);
    const D = space.size;
    const table = new Int32Array(D).fill(-1);
    // upper bound of reps: D; collect in a growable buffer
    let repsBuf = new Float64Array(Math.max(16, Math.ceil((D / tr.L) * 1.1) + 64));
    let perBuf = new Uint8Array(repsBuf.length);
    let nReps = 0;
    const L = tr.L;
    space.forEach((code, rank) => {
      if (table[rank] !== -1) return;
      if (nReps >= repsBuf.length) {
        const nb = new Float64Array(repsBuf.length * 2);
        nb.set(repsBuf);
        repsBuf = nb;
        const np = new Uint8Array(perBuf.length * 2);
        np.set(perBuf);
        perBuf = np;
      }
      const idx = nReps++;
      if (idx >= 2 ** 23) throw new Error("more than 2^23 representatives: above the internal index limit");
      repsBuf[idx] = code;
      table[rank] = idx << 8;
      let c = code;
      let p = 1;
      for (; p < L; p++) {
        c = translateCode(c, tr);
        if (c === code) break;
        table[space.rank(c)] = (idx << 8) | p;
      }
      perBuf[idx] = p;
    }, cancel);
    return new Basis(space, tr, repsBuf.slice(0, nReps), perBuf.slice(0, nReps), table, bits);
  }

  /** Estimated bytes of build() for a space of size D (the table dominates). */
  static estimateBytes(D: number, L: number | null, bits: boolean): number {
    if (!L) return 8 * D + (bits ? 4 * D : 0);
    const R = D / L;
    return 4 * D + R * (9 + (bits ? 4 : 0)) * 1.1;
  }

  get bytes(): number {
    return (
      this.reps.byteLength +
      (this.repsU32?.byteLength ?? 0) +
      (this.period?.byteLength ?? 0) +
      (this.table?.byteLength ?? 0) +
      this.space.bytes
    );
  }
}
