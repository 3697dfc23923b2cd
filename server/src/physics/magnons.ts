// One- and two-magnon states above the fully polarized state of a spin-1/2 model with U(1)-symmetric
// bonds (chain and 2D Bravais lattice for one magnon, chain for two): saturation field, bound states,
// near-saturation second branch. Physics layer: pure functions of numbers. Units: energies in units of
// the caller's J (dimensionless here; the caller converts to meV), momenta in radians per lattice step.
//
// Conventions (physics-notes section 2): every site i carries each bond family once,
//   H = sum_i sum_b [ jPerp (Sx_i Sx_{i+d} + Sy_i Sy_{i+d}) + jZ Sz_i Sz_{i+d} ] - h sum_i Sz_i,
// so jPerp > 0 is antiferromagnetic in-plane exchange; the spin-flip hopping is jPerp / 2
// (jPerp (SxSx + SySy) = (jPerp / 2)(S+S- + S-S+)). Energies below are measured from the polarized
// state with the Zeeman term excluded: a state with n flipped spins has Zeeman energy + n h on top.

/** A bond family of a chain: site i couples to i + offset (integer, non-zero). */
export interface ChainBond {
  readonly offset: number;
  readonly jPerp: number;
  readonly jZ: number;
}

/** A bond family of a 2D Bravais lattice: offset in units of the two primitive vectors. */
export interface PlaneBond {
  readonly offset: readonly [number, number];
  readonly jPerp: number;
  readonly jZ: number;
}

/** Momentum of a 2D lattice as phases along the primitive vectors, k_i = k . a_i (radians). */
export type PlaneMomentum = readonly [number, number];

// ---------------------------------------------------------------------------------------------
// One magnon

/**
 * One flipped spin with momentum k: E1(k) = sum_b [jPerp cos(k . d) - jZ].
 * Derivation: flipping site i changes the two bonds of family b that touch i from +jZ/4 to -jZ/4
 * (-jZ in total) and lets the down spin hop by +-d with amplitude jPerp/2, giving jPerp cos(k . d).
 */
export function oneMagnonDispersion(bonds: readonly ChainBond[], k: number): number;
export function oneMagnonDispersion(bonds: readonly PlaneBond[], k: PlaneMomentum): number;
export function oneMagnonDispersion(bonds: readonly (ChainBond | PlaneBond)[], k: number | PlaneMomentum): number {
  let energy = 0;
  for (const bond of bonds) energy += bond.jPerp * Math.cos(phase(bond, k)) - bond.jZ;
  return energy;
}

export interface ChainMagnonMinimum {
  /** Momentum of the band minimum, folded into [0, pi] (E1(k) = E1(-k)). */
  readonly k: number;
  readonly energy: number;
}

export interface PlaneMagnonMinimum {
  /** Momentum of one band minimum, components in (-pi, pi]. */
  readonly k: PlaneMomentum;
  readonly energy: number;
}

/** Global minimum of E1(k): dense grid, then Newton refinement of the best local minima. */
export function oneMagnonMinimum(bonds: readonly ChainBond[]): ChainMagnonMinimum;
export function oneMagnonMinimum(bonds: readonly PlaneBond[]): PlaneMagnonMinimum;
export function oneMagnonMinimum(
  bonds: readonly (ChainBond | PlaneBond)[],
): ChainMagnonMinimum | PlaneMagnonMinimum {
  if (bonds.length === 0) throw new RangeError("at least one bond is needed");
  if (isChain(bonds)) {
    validateChainBonds(bonds);
    const series = bonds.map((b) => ({ d: Math.abs(b.offset), a: b.jPerp }));
    const constant = -bonds.reduce((sum, b) => sum + b.jZ, 0);
    const min = cosineSeriesExtremum(series, constant, "min");
    return { k: min.k, energy: min.value };
  }
  validatePlaneBonds(bonds as readonly PlaneBond[]);
  return planeMinimum(bonds as readonly PlaneBond[]);
}

/**
 * Field at which one flipped spin becomes degenerate with the polarized state: h = -min_k E1(k)
 * (the polarized state is stable against single spin flips for h > h_sat). Exact one-magnon
 * instability; multi-magnon bound states can go soft first (saturationFieldWithBoundStates).
 */
export function saturationField(bonds: readonly ChainBond[] | readonly PlaneBond[]): number {
  return -(oneMagnonMinimum(bonds as readonly ChainBond[]) as { energy: number }).energy;
}

// ---------------------------------------------------------------------------------------------
// Two magnons on a ring

export interface TwoMagnonState {
  /** Energy relative to the polarized state, Zeeman excluded. */
  readonly energy: number;
  /** Which side of the two-magnon continuum the state lies on. */
  readonly side: "below" | "above";
  /** Distance to the nearest continuum edge (positive). */
  readonly distanceFromContinuum: number;
  /** <r> = sum_r r |psi(r)|^2 in lattice steps (for psi = x^r it is 1/(1 - x^2)). */
  readonly meanSeparation: number;
  /** 1 / sum_r psi(r)^4: the number of separations that carry the state. */
  readonly participationNumber: number;
  /** Normalized relative wavefunction psi(r), r = 1, 2, ... (largest component positive). */
  readonly wavefunction: readonly number[];
}

export interface TwoMagnonSpectrum {
  /** Total momentum actually used, 2 pi n / L in [0, 2 pi). */
  readonly momentum: number;
  readonly ringLength: number;
  /** All eigenvalues of the relative problem at this momentum, ascending. */
  readonly energies: readonly number[];
  /** Infinite-chain two-magnon continuum at this momentum: min/max_k E1(K/2 + k) + E1(K/2 - k). */
  readonly continuum: { readonly min: number; readonly max: number };
  /** Eigenstates outside the continuum (bound below it or "antibound" above it). */
  readonly outside: readonly TwoMagnonState[];
}

/**
 * Exact two-magnon spectrum at total momentum K on a ring of L sites (K is rounded to the nearest
 * ring momentum 2 pi n / L; `momentum` reports the value used).
 *
 * Derivation (ours, standard two-body reduction). With |x; r> = S-_x S-_{x+r} |F> and
 * |K; r> = sum_x e^{iK(x + r/2)} |x; r>, the phase e^{iKr/2} makes the problem real:
 *   H |K; r> = V(r) |K; r> + sum_b t_b (|K; r + d_b> + |K; r - d_b>),   t_b = jPerp_b cos(K d_b / 2),
 *   V(r) = -2 sum_b jZ_b + sum_b jZ_b [r = |d_b|]  (two flips on one bond restore its +jZ/4).
 * On the ring |K; -r> = |K; r> and |K; r + L> = e^{iKL/2} |K; r> = (-1)^n |K; r>, so the independent
 * separations are r = 1 .. floor(L/2); r = 0 is excluded (hard core); the r = L/2 state (L even)
 * vanishes for odd n and has twice the norm for even n, which the basis normalization accounts for.
 * Needs L > 2 max|d|. The matrix is real symmetric with half-bandwidth max|d|.
 */
export function twoMagnonSpectrum(bonds: readonly ChainBond[], K: number, L: number): TwoMagnonSpectrum {
  validateChainBonds(bonds);
  const range = maxRange(bonds);
  if (!Number.isInteger(L) || L < 4 || L <= 2 * range) {
    throw new RangeError(`ring length must be an integer >= 4 and > 2 * (bond range ${range}), got ${L}`);
  }
  if (!Number.isFinite(K)) throw new RangeError(`momentum must be finite, got ${K}`);
  const n = (((Math.round((K * L) / (2 * Math.PI)) % L) + L) % L);
  const momentum = (2 * Math.PI * n) / L;
  const relative = ringRelativeHamiltonian(bonds, n, L);
  const energies = bandedSymmetricEigenvalues(relative.matrix.slice(), relative.size, range);
  const continuum = twoMagnonContinuum(bonds, momentum);
  const outside = collectOutsideStates(relative, range, energies, continuum, energyScale(bonds));
  return { momentum, ringLength: L, energies: Array.from(energies), continuum, outside };
}

/** The states of twoMagnonSpectrum that lie outside the two-magnon continuum. */
export function boundStates(bonds: readonly ChainBond[], K: number, L: number): readonly TwoMagnonState[] {
  return twoMagnonSpectrum(bonds, K, L).outside;
}

/** Continuum of two free magnons with total momentum K: sum_b [2 t_b cos(k d_b) - 2 jZ_b] over k. */
export function twoMagnonContinuum(bonds: readonly ChainBond[], K: number): { min: number; max: number } {
  const series = bonds.map((b) => ({ d: Math.abs(b.offset), a: 2 * b.jPerp * Math.cos((K * Math.abs(b.offset)) / 2) }));
  const constant = -2 * bonds.reduce((sum, b) => sum + b.jZ, 0);
  return {
    min: cosineSeriesExtremum(series, constant, "min").value,
    max: cosineSeriesExtremum(series, constant, "max").value,
  };
}

export interface SaturationResult {
  /** Field above which the polarized state is stable against one and two flipped spins. */
  readonly hSat: number;
  readonly mechanism: "one-magnon" | "two-magnon bound state";
  /** Momentum of the softening mode (one-magnon k0, or total momentum K of the pair), in [0, pi]. */
  readonly k: number;
  readonly oneMagnonField: number;
  /** -min_K E2(K) / 2 over the lowest two-magnon state (continuum bottom 2 min E1 if nothing binds). */
  readonly twoMagnonField: number;
  /** 2 min E1 - min E2: positive when a pair binds below two free magnons. */
  readonly pairBindingEnergy: number;
  readonly note: string;
}

/**
 * Saturation field including two-magnon bound states (chain bonds). A pair state at total momentum K
 * becomes degenerate with the polarized state at h = -E2(K)/2 (two flips cost 2h); it goes soft
 * before the single magnon when min_K E2(K) / 2 < min_k E1(k). The minimum over K is taken on the
 * infinite chain: the relative problem at arbitrary K truncated at separation R (hard wall), which
 * leaves bound states exact up to exp(-R / localization length); scan of K in [0, pi] (E2 is even and
 * 2 pi periodic in K), then golden-section refinement.
 */
export function saturationFieldWithBoundStates(
  bonds: readonly ChainBond[],
  options: { readonly maxSeparation?: number; readonly momentumSamples?: number } = {},
): SaturationResult {
  validateChainBonds(bonds);
  const range = maxRange(bonds);
  const one = oneMagnonMinimum(bonds);
  const R = options.maxSeparation ?? Math.max(200, 40 * range);
  const samples = options.momentumSamples ?? 97;
  const lowest = (K: number, size: number) => {
    const relative = openRelativeHamiltonian(bonds, K, size);
    const values = bandedSymmetricEigenvalues(relative.matrix, relative.size, range);
    return values[0] ?? Infinity;
  };
  // Coarse scan on a shorter relative range (it only has to locate the minimum), refinement on R.
  const coarseSize = Math.max(80, 20 * range);
  let bestIndex = 0;
  let bestValue = Infinity;
  const step = Math.PI / (samples - 1);
  for (let i = 0; i < samples; i++) {
    const value = lowest(i * step, coarseSize);
    if (value < bestValue) {
      bestValue = value;
      bestIndex = i;
    }
  }
  const scale = energyScale(bonds);
  const atSample = { x: bestIndex * step, value: lowest(bestIndex * step, R) };
  const refined = goldenSectionMinimum(
    (K) => lowest(K, R),
    Math.max(0, (bestIndex - 1) * step),
    Math.min(Math.PI, (bestIndex + 1) * step),
    1e-9,
  );
  const twoMin = refined.value < atSample.value - 1e-13 * scale ? refined : atSample;
  // Scattering states of the truncated problem sit above 2 min E1 (the continuum bottom at
  // K = 2 k0) by O(1/R^2); only a bound state can go below it.
  const pairEnergy = Math.min(twoMin.value, 2 * one.energy);
  const oneField = -one.energy;
  const twoField = -pairEnergy / 2;
  const binding = 2 * one.energy - pairEnergy;
  const tolerance = 1e-9 * scale;
  const note = "three- and more-magnon bound states are not checked";
  if (binding > tolerance) {
    return {
      hSat: twoField,
      mechanism: "two-magnon bound state",
      k: twoMin.x,
      oneMagnonField: oneField,
      twoMagnonField: twoField,
      pairBindingEnergy: binding,
      note,
    };
  }
  return {
    hSat: oneField,
    mechanism: "one-magnon",
    k: one.k,
    oneMagnonField: oneField,
    twoMagnonField: twoField,
    pairBindingEnergy: binding,
    note,
  };
}

// ---------------------------------------------------------------------------------------------
// Near saturation: the bound-state branch (physics-notes section 7)

export interface NearSaturationPoint {
  /** Requested momentum transfer q (radians per lattice step). */
  readonly qRequested: number;
  /** q actually used: K - k0 with K the nearest ring momentum. */
  readonly q: number;
  /** Total two-magnon momentum K = k0 + q. */
  readonly K: number;
  /** True when a two-magnon state above the continuum (the second, upper branch) exists at K. */
  readonly exists: boolean;
  /**
   * w_upper = E2_bound(K) - E1(k0) + h, or null. With several states above the continuum the one
   * with the largest pair overlap (below) is taken, ties going to the one nearest the continuum.
   */
  readonly energy: number | null;
  /**
   * |<psi_bound | S-_q one magnon at k0>|^2 in the two-body problem (relative amplitude 2 cos(a r),
   * a = (q - k0)/2). To leading order in the magnon density n = 1/2 - m the branch weight per site is
   * about n times this factor (our derivation; dilute two-body estimate, not an exact weight).
   */
  readonly pairOverlapFactor: number | null;
  /** Range of the two-magnon continuum at K on the same energy axis, h + E2 - E1(k0). */
  readonly continuum: { readonly min: number; readonly max: number };
  /** Bound states below the continuum on the same axis (attractive pairs), if any. */
  readonly boundBelow: readonly number[];
}

export interface NearSaturationBranch {
  readonly k0: number;
  readonly oneMagnonMinimum: number;
  /** One-magnon saturation field -E1(k0); the branch is meaningful just below it. */
  readonly oneMagnonSaturationField: number;
  readonly belowSaturation: boolean;
  /** True when every bond has jPerp = jZ (SU(2)): the q = 0 weight then sits on the Larmor line. */
  readonly su2: boolean;
  readonly points: readonly NearSaturationPoint[];
  readonly weightStatement: string;
}

/**
 * Second (upper) branch of S-+(q, w) just below saturation: one magnon sits at the band minimum k0,
 * S-_q adds another, and the pair can form a bound state, so w_upper(q) ~ E2(k0 + q) - E1(k0) + h
 * (physics-notes section 7). Energies from the exact two-magnon problem on a ring of L sites.
 * For incommensurate k0 only the minimum in [0, pi] is used.
 */
export function nearSaturationBranch(
  bonds: readonly ChainBond[],
  h: number,
  qList: readonly number[],
  L = 400,
): NearSaturationBranch {
  validateChainBonds(bonds);
  const one = oneMagnonMinimum(bonds);
  const k0Index = Math.round((one.k * L) / (2 * Math.PI));
  const k0Ring = (2 * Math.PI * k0Index) / L;
  const su2 = bonds.every((b) => b.jPerp === b.jZ);
  const points = qList.map((qRequested): NearSaturationPoint => {
    const spectrum = twoMagnonSpectrum(bonds, k0Ring + qRequested, L);
    const K = spectrum.momentum;
    const q = wrapToPi(K - k0Ring);
    const shift = h - one.energy;
    const above = spectrum.outside.filter((s) => s.side === "above");
    const below = spectrum.outside.filter((s) => s.side === "below").map((s) => s.energy + shift);
    const continuum = { min: spectrum.continuum.min + shift, max: spectrum.continuum.max + shift };
    if (above.length === 0) {
      return { qRequested, q, K, exists: false, energy: null, pairOverlapFactor: null, continuum, boundBelow: below };
    }
    const amplitude = pairAmplitude(K / 2 - k0Ring, L, Math.round((K * L) / (2 * Math.PI)));
    let chosen = above[0] as TwoMagnonState;
    let chosenOverlap = -1;
    for (const state of above) {
      const overlap = overlapSquared(state.wavefunction, amplitude);
      if (overlap > chosenOverlap + 1e-14 || (Math.abs(overlap - chosenOverlap) <= 1e-14 && state.distanceFromContinuum < chosen.distanceFromContinuum)) {
        chosen = state;
        chosenOverlap = overlap;
      }
    }
    return {
      qRequested,
      q,
      K,
      exists: true,
      energy: chosen.energy + shift,
      pairOverlapFactor: chosenOverlap,
      continuum,
      boundBelow: below,
    };
  });
  return {
    k0: one.k,
    oneMagnonMinimum: one.energy,
    oneMagnonSaturationField: -one.energy,
    belowSaturation: h < -one.energy,
    su2,
    points,
    weightStatement:
      "The bound-state branch carries weight proportional to the magnon density 1/2 - m; in SU(2) models it " +
      "vanishes at q = 0, where the Larmor line takes all the weight, and grows with q. Only the dilute " +
      "two-body overlap factor is computed here, not the weight itself.",
  };
}

// ---------------------------------------------------------------------------------------------
// Small symmetric eigen-solver (banded -> tridiagonal -> implicit QR), exported for tests

/**
 * Eigenvalues (ascending) of a real symmetric band matrix given in dense row-major storage with
 * half-bandwidth w. The input array is overwritten. Band reduction by Givens rotations with bulge
 * chasing, then implicit symmetric tridiagonal QR with the Wilkinson shift (both standard numerical
 * linear algebra, common practice, no source). Cost O(n^2 w).
 */
export function bandedSymmetricEigenvalues(a: Float64Array, n: number, w: number): Float64Array {
  if (n === 0) return new Float64Array(0);
  const { diagonal, offDiagonal } = bandToTridiagonal(a, n, Math.max(1, Math.min(w, n - 1)));
  tridiagonalEigenvaluesInPlace(diagonal, offDiagonal);
  return diagonal.sort();
}

function bandToTridiagonal(a: Float64Array, n: number, w: number): { diagonal: Float64Array; offDiagonal: Float64Array } {
  if (w > 1) {
    for (let j = 0; j < n - 2; j++) {
      for (let i = Math.min(j + w, n - 1); i >= j + 2; i--) {
        if ((a[i * n + j] ?? 0) === 0) continue;
        annihilate(a, n, w, i, j);
        // The rotation in plane (i-1, i) puts a bulge at (i + w, i - 1); chase it off the matrix.
        let row = i + w;
        let col = i - 1;
        while (row < n && (a[row * n + col] ?? 0) !== 0) {
          annihilate(a, n, w, row, col);
          col = row - 1;
          row += w;
        }
      }
    }
  }
  const diagonal = new Float64Array(n);
  const offDiagonal = new Float64Array(Math.max(0, n - 1));
  for (let k = 0; k < n; k++) {
    diagonal[k] = a[k * n + k] ?? 0;
    if (k + 1 < n) offDiagonal[k] = a[(k + 1) * n + k] ?? 0;
  }
  return { diagonal, offDiagonal };
}

/** Similarity rotation in plane (row - 1, row) that zeroes a[row][col] against a[row - 1][col]. */
function annihilate(a: Float64Array, n: number, w: number, row: number, col: number): void {
  const p = row - 1;
  const x = a[p * n + col] ?? 0;
  const y = a[row * n + col] ?? 0;
  const r = Math.hypot(x, y);
  if (r === 0) return;
  const c = x / r;
  const s = y / r;
  const lo = Math.max(0, p - w - 1);
  const hi = Math.min(n - 1, row + w + 1);
  for (let k = lo; k <= hi; k++) {
    const u = a[p * n + k] ?? 0;
    const v = a[row * n + k] ?? 0;
    a[p * n + k] = c * u + s * v;
    a[row * n + k] = -s * u + c * v;
  }
  for (let k = lo; k <= hi; k++) {
    const u = a[k * n + p] ?? 0;
    const v = a[k * n + row] ?? 0;
    a[k * n + p] = c * u + s * v;
    a[k * n + row] = -s * u + c * v;
  }
  a[row * n + col] = 0;
  a[col * n + row] = 0;
}

/** Implicit symmetric QR with Wilkinson shift on (diagonal, offDiagonal); eigenvalues left in diagonal. */
function tridiagonalEigenvaluesInPlace(d: Float64Array, e: Float64Array): void {
  const n = d.length;
  let hi = n - 1;
  let iterations = 0;
  while (hi > 0) {
    const small = (k: number) => Math.abs(e[k] ?? 0) <= Number.EPSILON * (Math.abs(d[k] ?? 0) + Math.abs(d[k + 1] ?? 0));
    if (small(hi - 1)) {
      e[hi - 1] = 0;
      hi--;
      iterations = 0;
      continue;
    }
    let lo = hi - 1;
    while (lo > 0 && !small(lo - 1)) lo--;
    if (++iterations > 100) throw new Error("tridiagonal QR did not converge");
    const delta = ((d[hi - 1] ?? 0) - (d[hi] ?? 0)) / 2;
    const b = e[hi - 1] ?? 0;
    const shift = (d[hi] ?? 0) - (b * b) / (delta + (delta >= 0 ? 1 : -1) * Math.hypot(delta, b));
    let x = (d[lo] ?? 0) - shift;
    let z = e[lo] ?? 0;
    for (let k = lo; k < hi; k++) {
      const r = Math.hypot(x, z);
      const c = r === 0 ? 1 : x / r;
      const s = r === 0 ? 0 : z / r;
      if (k > lo) e[k - 1] = r;
      const dk = d[k] ?? 0;
      const dk1 = d[k + 1] ?? 0;
      const ek = e[k] ?? 0;
      d[k] = c * c * dk + 2 * c * s * ek + s * s * dk1;
      d[k + 1] = s * s * dk - 2 * c * s * ek + c * c * dk1;
      e[k] = c * s * (dk1 - dk) + (c * c - s * s) * ek;
      if (k < hi - 1) {
        const next = e[k + 1] ?? 0;
        z = s * next;
        e[k + 1] = c * next;
        x = e[k] ?? 0;
      }
    }
  }
}

/**
 * Eigenvector for a known eigenvalue by inverse iteration on the band matrix (Gaussian elimination
 * with partial pivoting restricted to the band, upper bandwidth 2w after pivoting).
 */
function inverseIteration(a: Float64Array, n: number, w: number, eigenvalue: number): Float64Array {
  const scale = Math.max(1e-300, ...Array.from({ length: n }, (_, i) => Math.abs(a[i * n + i] ?? 0)), Math.abs(eigenvalue));
  const lu = new Float64Array(a);
  for (let i = 0; i < n; i++) lu[i * n + i] = (lu[i * n + i] ?? 0) - eigenvalue;
  const pivots = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    const rowEnd = Math.min(n - 1, k + w);
    let pivotRow = k;
    for (let i = k + 1; i <= rowEnd; i++) {
      if (Math.abs(lu[i * n + k] ?? 0) > Math.abs(lu[pivotRow * n + k] ?? 0)) pivotRow = i;
    }
    pivots[k] = pivotRow;
    const colEnd = Math.min(n - 1, k + 2 * w);
    if (pivotRow !== k) {
      for (let j = k; j <= colEnd; j++) {
        const t = lu[k * n + j] ?? 0;
        lu[k * n + j] = lu[pivotRow * n + j] ?? 0;
        lu[pivotRow * n + j] = t;
      }
    }
    if (Math.abs(lu[k * n + k] ?? 0) < Number.EPSILON * scale) lu[k * n + k] = Number.EPSILON * scale;
    const pivot = lu[k * n + k] ?? 1;
    for (let i = k + 1; i <= rowEnd; i++) {
      const factor = (lu[i * n + k] ?? 0) / pivot;
      lu[i * n + k] = factor;
      if (factor === 0) continue;
      for (let j = k + 1; j <= colEnd; j++) lu[i * n + j] = (lu[i * n + j] ?? 0) - factor * (lu[k * n + j] ?? 0);
    }
  }
  // Start vector with no special symmetry, then two solves (each one multiplies the wanted
  // component by about 1/eps relative to the others).
  let x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = 1 + 0.37 * Math.sin(1.3 * i + 0.2);
  for (let sweep = 0; sweep < 3; sweep++) {
    const y = new Float64Array(x);
    for (let k = 0; k < n; k++) {
      const p = pivots[k] ?? k;
      if (p !== k) {
        const t = y[k] ?? 0;
        y[k] = y[p] ?? 0;
        y[p] = t;
      }
      const rowEnd = Math.min(n - 1, k + w);
      for (let i = k + 1; i <= rowEnd; i++) y[i] = (y[i] ?? 0) - (lu[i * n + k] ?? 0) * (y[k] ?? 0);
    }
    for (let i = n - 1; i >= 0; i--) {
      let sum = y[i] ?? 0;
      const colEnd = Math.min(n - 1, i + 2 * w);
      for (let j = i + 1; j <= colEnd; j++) sum -= (lu[i * n + j] ?? 0) * (y[j] ?? 0);
      y[i] = sum / (lu[i * n + i] ?? 1);
    }
    let norm = 0;
    for (let i = 0; i < n; i++) norm += (y[i] ?? 0) ** 2;
    norm = Math.sqrt(norm);
    for (let i = 0; i < n; i++) y[i] = (y[i] ?? 0) / norm;
    x = y;
  }
  let largest = 0;
  for (let i = 1; i < n; i++) if (Math.abs(x[i] ?? 0) > Math.abs(x[largest] ?? 0)) largest = i;
  if ((x[largest] ?? 0) < 0) for (let i = 0; i < n; i++) x[i] = -(x[i] ?? 0);
  return x;
}

// ---------------------------------------------------------------------------------------------
// Internals

interface RelativeHamiltonian {
  readonly matrix: Float64Array;
  readonly size: number;
  /** Separation r of each basis index (index i <-> r = i + 1). */
  readonly separations: Int32Array;
}

function ringRelativeHamiltonian(bonds: readonly ChainBond[], n: number, L: number): RelativeHamiltonian {
  const sign = n % 2 === 0 ? 1 : -1; // e^{iKL/2} = (-1)^n
  const half = Math.floor(L / 2);
  const hasHalf = L % 2 === 0 && sign === 1;
  const size = L % 2 === 0 ? (hasHalf ? half : half - 1) : half;
  const K = (2 * Math.PI * n) / L;
  const norm = (r: number) => (hasHalf && r === half ? Math.SQRT2 : 1);
  // Maps any separation s to (basis separation, phase) using psi(-s) = psi(s), psi(s + L) = sign psi(s).
  const fold = (s: number): [number, number] | null => {
    let phase = 1;
    let r = s < 0 ? -s : s;
    if (r > L / 2) {
      r = L - r;
      phase = sign;
    }
    if (r === 0) return null;
    if (L % 2 === 0 && r === half && !hasHalf) return null;
    return [r, phase];
  };
  return assembleRelative(bonds, K, size, fold, norm);
}

function openRelativeHamiltonian(bonds: readonly ChainBond[], K: number, R: number): RelativeHamiltonian {
  const fold = (s: number): [number, number] | null => {
    const r = s < 0 ? -s : s;
    return r === 0 || r > R ? null : [r, 1];
  };
  return assembleRelative(bonds, K, R, fold, () => 1);
}

/** H_{r'r} = A_{r'r} nu(r') / nu(r) with A the action on the unnormalized |K; r> (see twoMagnonSpectrum). */
function assembleRelative(
  bonds: readonly ChainBond[],
  K: number,
  size: number,
  fold: (s: number) => [number, number] | null,
  norm: (r: number) => number,
): RelativeHamiltonian {
  const matrix = new Float64Array(size * size);
  const separations = new Int32Array(size);
  const isingFar = -2 * bonds.reduce((sum, b) => sum + b.jZ, 0);
  for (let i = 0; i < size; i++) {
    const r = i + 1;
    separations[i] = r;
    let diagonal = isingFar;
    for (const b of bonds) if (Math.abs(b.offset) === r) diagonal += b.jZ;
    matrix[i * size + i] = (matrix[i * size + i] ?? 0) + diagonal;
    for (const b of bonds) {
      const d = Math.abs(b.offset);
      const t = b.jPerp * Math.cos((K * d) / 2);
      if (t === 0) continue;
      for (const s of [r + d, r - d]) {
        const target = fold(s);
        if (target === null) continue;
        const j = target[0] - 1;
        matrix[j * size + i] = (matrix[j * size + i] ?? 0) + (t * target[1] * norm(target[0])) / norm(r);
      }
    }
  }
  // The construction is symmetric by derivation; average away rounding differences.
  for (let i = 0; i < size; i++) {
    for (let j = 0; j < i; j++) {
      const mean = 0.5 * ((matrix[i * size + j] ?? 0) + (matrix[j * size + i] ?? 0));
      matrix[i * size + j] = mean;
      matrix[j * size + i] = mean;
    }
  }
  return { matrix, size, separations };
}

function collectOutsideStates(
  relative: RelativeHamiltonian,
  range: number,
  energies: Float64Array,
  continuum: { min: number; max: number },
  scale: number,
): TwoMagnonState[] {
  // Scattering states of the ring have real relative momenta and lie inside the continuum up to
  // rounding; anything beyond this tolerance is a bound (or antibound) state.
  const tolerance = 1e-9 * scale;
  const states: TwoMagnonState[] = [];
  for (const energy of energies) {
    const below = energy < continuum.min - tolerance;
    const above = energy > continuum.max + tolerance;
    if (!below && !above) continue;
    const psi = inverseIteration(relative.matrix, relative.size, range, energy);
    let mean = 0;
    let fourth = 0;
    for (let i = 0; i < relative.size; i++) {
      const p2 = (psi[i] ?? 0) ** 2;
      mean += (relative.separations[i] ?? 0) * p2;
      fourth += p2 * p2;
    }
    states.push({
      energy,
      side: below ? "below" : "above",
      distanceFromContinuum: below ? continuum.min - energy : energy - continuum.max,
      meanSeparation: mean,
      participationNumber: 1 / fourth,
      wavefunction: Array.from(psi),
    });
  }
  return states;
}

/**
 * Relative amplitude of S-_q |k0> (|k0> a normalized one-magnon state, S-_q = sum_y e^{iqy} S-_y) at
 * total momentum K = k0 + q, in the normalized ring basis of twoMagnonSpectrum. Derivation (ours):
 * S-_q |k0> = L^{-1/2} sum_{s=1}^{L-1} e^{i a s} |K; s>,  a = q - K/2 = K/2 - k0, with K the same
 * representative that the relative Hamiltonian uses; folding s with L - s combines the phases to
 * 2 cos(a r) for r < L/2 (K and k0 are both ring momenta), and sqrt(2) cos(a L/2) at r = L/2.
 * Its norm squared is L - 1, the norm of S-_q |k0>; the overlap with a bound state psi is therefore
 * |<psi | S-_q | k0>|^2 itself, and its per-site weight for one magnon on L sites is n |<.>|^2, n = 1/L.
 */
function pairAmplitude(a: number, L: number, momentumIndex: number): Float64Array {
  const hasHalf = L % 2 === 0 && momentumIndex % 2 === 0;
  const half = Math.floor(L / 2);
  const size = L % 2 === 0 ? (hasHalf ? half : half - 1) : half;
  const amplitude = new Float64Array(size);
  for (let i = 0; i < size; i++) {
    const r = i + 1;
    amplitude[i] = hasHalf && r === half ? Math.SQRT2 * Math.cos(a * r) : 2 * Math.cos(a * r);
  }
  return amplitude;
}

function overlapSquared(psi: readonly number[], amplitude: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < amplitude.length; i++) sum += (psi[i] ?? 0) * (amplitude[i] ?? 0);
  return sum * sum;
}

/** Extremum of c0 + sum a_d cos(k d) over k in [0, pi]: dense grid, then safeguarded Newton. */
function cosineSeriesExtremum(
  series: readonly { readonly d: number; readonly a: number }[],
  constant: number,
  kind: "min" | "max",
): { k: number; value: number } {
  const sgn = kind === "min" ? 1 : -1;
  const f = (k: number) => {
    let v = constant;
    for (const t of series) v += t.a * Math.cos(k * t.d);
    return sgn * v;
  };
  const df = (k: number) => {
    let v = 0;
    for (const t of series) v -= t.a * t.d * Math.sin(k * t.d);
    return sgn * v;
  };
  const d2f = (k: number) => {
    let v = 0;
    for (const t of series) v -= t.a * t.d * t.d * Math.cos(k * t.d);
    return sgn * v;
  };
  const range = series.reduce((m, t) => Math.max(m, t.d), 1);
  const points = Math.max(720, 64 * range);
  const step = Math.PI / points;
  const values = new Float64Array(points + 1);
  for (let i = 0; i <= points; i++) values[i] = f(i * step);
  const candidates: number[] = [];
  for (let i = 0; i <= points; i++) {
    const v = values[i] ?? 0;
    const left = i > 0 ? (values[i - 1] ?? 0) : (values[1] ?? 0);
    const right = i < points ? (values[i + 1] ?? 0) : (values[points - 1] ?? 0);
    if (v <= left && v <= right) candidates.push(i);
  }
  candidates.sort((i, j) => (values[i] ?? 0) - (values[j] ?? 0));
  let bestK = 0;
  let bestValue = Infinity;
  for (const i of candidates.slice(0, 8)) {
    const lo = Math.max(0, (i - 1) * step);
    const hi = Math.min(Math.PI, (i + 1) * step);
    let k = i * step;
    for (let iteration = 0; iteration < 50; iteration++) {
      const curvature = d2f(k);
      const slope = df(k);
      let next = curvature > 0 ? k - slope / curvature : k - Math.sign(slope) * step * 0.25;
      if (!(next >= lo && next <= hi)) next = Math.min(hi, Math.max(lo, next));
      if (Math.abs(next - k) < 1e-15) break;
      k = next;
    }
    const value = f(k);
    const gridValue = values[i] ?? Infinity;
    const [kk, vv] = value <= gridValue ? [k, value] : [i * step, gridValue];
    if (vv < bestValue) {
      bestValue = vv;
      bestK = kk;
    }
  }
  return { k: bestK, value: sgn * bestValue };
}

function planeMinimum(bonds: readonly PlaneBond[]): PlaneMagnonMinimum {
  const range = bonds.reduce((m, b) => Math.max(m, Math.abs(b.offset[0]), Math.abs(b.offset[1])), 1);
  const points = Math.max(120, 24 * range);
  const step = (2 * Math.PI) / points;
  const f = (k: PlaneMomentum) => oneMagnonDispersion(bonds, k);
  const grid = new Float64Array(points * points);
  for (let i = 0; i < points; i++) for (let j = 0; j < points; j++) grid[i * points + j] = f([i * step, j * step]);
  const at = (i: number, j: number) => grid[(((i % points) + points) % points) * points + (((j % points) + points) % points)] ?? 0;
  const candidates: [number, number][] = [];
  for (let i = 0; i < points; i++) {
    for (let j = 0; j < points; j++) {
      const v = at(i, j);
      let isMin = true;
      for (let di = -1; di <= 1 && isMin; di++) for (let dj = -1; dj <= 1; dj++) if ((di || dj) && at(i + di, j + dj) < v) isMin = false;
      if (isMin) candidates.push([i, j]);
    }
  }
  candidates.sort((p, q) => at(p[0], p[1]) - at(q[0], q[1]));
  let best: { k: PlaneMomentum; energy: number } = { k: [0, 0], energy: Infinity };
  for (const [i, j] of candidates.slice(0, 12)) {
    let k: [number, number] = [i * step, j * step];
    let value = f(k);
    for (let iteration = 0; iteration < 60; iteration++) {
      // Gradient and Hessian of sum_b jPerp cos(k . d).
      let g0 = 0;
      let g1 = 0;
      let h00 = 0;
      let h01 = 0;
      let h11 = 0;
      for (const b of bonds) {
        const [n1, n2] = b.offset;
        const p = k[0] * n1 + k[1] * n2;
        const s = b.jPerp * Math.sin(p);
        const c = b.jPerp * Math.cos(p);
        g0 -= s * n1;
        g1 -= s * n2;
        h00 -= c * n1 * n1;
        h01 -= c * n1 * n2;
        h11 -= c * n2 * n2;
      }
      const det = h00 * h11 - h01 * h01;
      let d0: number;
      let d1: number;
      if (h00 > 0 && det > 0) {
        d0 = -(h11 * g0 - h01 * g1) / det;
        d1 = -(-h01 * g0 + h00 * g1) / det;
      } else {
        d0 = -g0 * step;
        d1 = -g1 * step;
      }
      let accepted = false;
      for (let t = 1; t > 1e-6; t /= 2) {
        const trial: [number, number] = [k[0] + t * d0, k[1] + t * d1];
        const trialValue = f(trial);
        if (trialValue <= value) {
          accepted = Math.hypot(t * d0, t * d1) > 1e-15;
          k = trial;
          value = trialValue;
          break;
        }
      }
      if (!accepted) break;
    }
    if (value < best.energy) best = { k: [wrapToPi(k[0]), wrapToPi(k[1])], energy: value };
  }
  return best;
}

function goldenSectionMinimum(f: (x: number) => number, a0: number, b0: number, tol: number): { x: number; value: number } {
  const ratio = (Math.sqrt(5) - 1) / 2;
  let a = a0;
  let b = b0;
  let c = b - ratio * (b - a);
  let d = a + ratio * (b - a);
  let fc = f(c);
  let fd = f(d);
  while (b - a > tol) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - ratio * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + ratio * (b - a);
      fd = f(d);
    }
  }
  return fc < fd ? { x: c, value: fc } : { x: d, value: fd };
}

function phase(bond: ChainBond | PlaneBond, k: number | PlaneMomentum): number {
  if (typeof bond.offset === "number") {
    if (typeof k !== "number") throw new TypeError("chain bond needs a scalar momentum");
    return k * bond.offset;
  }
  if (typeof k === "number") throw new TypeError("lattice bond needs a two-component momentum");
  return k[0] * bond.offset[0] + k[1] * bond.offset[1];
}

function isChain(bonds: readonly (ChainBond | PlaneBond)[]): bonds is readonly ChainBond[] {
  return bonds.every((b) => typeof b.offset === "number");
}

function validateChainBonds(bonds: readonly ChainBond[]): void {
  if (bonds.length === 0) throw new RangeError("at least one bond is needed");
  for (const b of bonds) {
    if (typeof b.offset !== "number" || !Number.isInteger(b.offset) || b.offset === 0) {
      throw new RangeError(`chain bond offset must be a non-zero integer, got ${String(b.offset)}`);
    }
    if (!Number.isFinite(b.jPerp) || !Number.isFinite(b.jZ)) throw new RangeError("bond couplings must be finite");
  }
}

function validatePlaneBonds(bonds: readonly PlaneBond[]): void {
  for (const b of bonds) {
    const [n1, n2] = b.offset;
    if (!Number.isInteger(n1) || !Number.isInteger(n2) || (n1 === 0 && n2 === 0)) {
      throw new RangeError(`lattice bond offset must be a non-zero integer pair, got [${n1}, ${n2}]`);
    }
    if (!Number.isFinite(b.jPerp) || !Number.isFinite(b.jZ)) throw new RangeError("bond couplings must be finite");
  }
}

function maxRange(bonds: readonly ChainBond[]): number {
  return bonds.reduce((m, b) => Math.max(m, Math.abs(b.offset)), 0);
}

function energyScale(bonds: readonly ChainBond[]): number {
  return Math.max(1e-300, bonds.reduce((s, b) => s + Math.abs(b.jPerp) + Math.abs(b.jZ), 0));
}

function wrapToPi(x: number): number {
  const twoPi = 2 * Math.PI;
  let y = ((x % twoPi) + twoPi) % twoPi;
  if (y > Math.PI) y -= twoPi;
  return y;
}
