// Exact diagonalization of a SpinCluster: public entry `solveExact(cluster, options, hooks)`.
//
// Hamiltonian (physics-notes section 2), energies in the cluster's unit (the caller uses meV):
//   H = sum_bonds S_i.J_b.S_j + sum_i S_i.A_i.S_i - sum_i h_i.S_i
// All spin components below ("z", "+", "-") refer to the WORKING FRAME: z is options.conservedAxis
// when given (then S.n is conserved and the space splits into S^z sectors), otherwise
// options.quantizationAxis, otherwise the direction of the summed fields, otherwise lab z.
// Momenta: with cluster.translations[0] (period L), T|psi> = e^{ik}|psi>, k = 2 pi n / L, and
// S^a_q = sum_j e^{-i q x_j} S^a_j with x_j = positions[j].a / |a|^2 (a = translationVectors[0];
// the cell index along the translation if positions are inconsistent), so S_q maps k to k + q.
// For open clusters x_j = positions[j][0].
//
// METHOD. Every requested sector (S^z, n) is diagonalized matrix-free (sector.ts; the sparse rows
// are cached when the memory budget allows). With levels = 1 the sector energies come from the
// plain three-term Lanczos recurrence (its lowest Ritz value is immune to loss of orthogonality),
// levels > 1 use thick-restart Lanczos with full re-orthogonalisation (lanczos.ts). The sector
// with the lowest energy is then re-run with full re-orthogonalisation for the ground-state
// vector. Convergence: residual ||H x - E x|| <= tolerance x ||H|| (||H|| estimated by the largest
// |Ritz value|), default tolerance 1e-10. Correlators: Lanczos continued fraction on A|0>.
//
// RESULT FIELDS (ExactResult, JSON-serializable):
//   sites                   number of sites N
//   dimension               dimension of the sector that holds the ground state
//   hilbertDimension        prod_i (2 S_i + 1)
//   frameAxis               working-frame z axis in lab coordinates
//   conserved               S.n conservation used (S^z sectors)
//   translationPeriod       L if momentum sectors were used, else null
//   sectors[]               every sector diagonalized: sz (S^z in the working frame, null without
//                           U(1)), k (radians, 2 pi n / L, null without translations), kIndex n,
//                           dimension, lowestEnergyMeV, levelsMeV (lowest distinct levels reached
//                           from a random start: exact degeneracies inside one sector collapse),
//                           residuals (||H x - E x|| per level), matvecs, converged.
//                           When H is real in the S^z basis, E(k) = E(-k) (complex conjugation) and
//                           only 0 <= n <= L/2 is diagonalized (`mirrorMomenta` = true).
//   groundState             {sz, k, kIndex, residual, matvecs, converged} of the ground state: the
//                           lowest sector energy over all diagonalized sectors (ties within 1e-12
//                           relative go to the first sector scanned: increasing S^z, then n).
//   groundEnergyMeV         total ground-state energy; groundEnergyPerSiteMeV = that / N
//   magnetization           <S^z_tot>/N in the ground state (working frame)
//   energiesBySz[]          U(1): {sz, energyMeV (lowest over the momenta, fields included),
//                           zeroFieldEnergyMeV (= energyMeV + h sz for a uniform field, else null)}
//   plateau                 U(1), uniform field, all S^z scanned: {sz of the ground state,
//                           fieldRangeMeV [lo, hi]} such that E0(sz) - h' sz stays lowest for every
//                           h' in [lo, hi] (E0 = zero-field energies; null for an open end); else null
//   correlators[]           {q (radians per translation step), qIndex (n, null without translations),
//                           component, targetSector {sz, kIndex}, poles [{energyMeV (E_n - E_0),
//                           weight}], sumRule {total (sum of pole weights from the tridiagonal
//                           eigen-decomposition), expected (<0|A^dagger A|0>/N = |A|0>|^2/N from the
//                           vector)}, steps (Lanczos steps), unconvergedWeight and largestUnconverged
//                           (total / largest weight fraction of poles whose Ritz residual is above
//                           1e-6 ||H||)}. The fraction stops when largestUnconverged <= weightTol
//                           (default 1e-3) or after maxSteps (default 200). Components, per site
//                           (weights / N), with S^a_q = sum_j e^{-i q x_j} S^a_j:
//                             "-+"       A = S^-_q : weights |<n|S^-_q|0>|^2 / N. For H = H0 - h S^z
//                                        with SU(2) H0 this is 2m delta(w - h) at q = 0 (Larmor):
//                                        the lowering operator creates the excitation at +h.
//                             "+-"       A = S^+_q : weights |<n|S^+_q|0>|^2 / N
//                             "zz"       A = S^z_q (q = 0 includes the elastic pole at w = 0)
//                             "current-" A = K^- = sum_j (S^z_j S^-_{T(j)} - S^-_j S^z_{T(j)}),
//                                        q = 0 only, bonds j -> T(j) along the translation.
//                           Default: "-+" at q = 0, 2 pi/L, 4 pi/L and "current-" (q = 0 only
//                           without translations).
//   larmor                  from "-+" at q = 0: zeemanMeV (uniform field along the frame axis, else
//                           null), singlePole (one pole holds >= 1 - 1e-9 of the weight and sits at
//                           h within relative 1e-9), offsetFromZeemanMeV (mean - h), meanMeV and
//                           widthMeV (first two moments: mean and standard deviation of w over
//                           the weights), weight (total). null if "-+" at q = 0 was not computed.
//   branches[]              "-+" at q = 2 pi/L and 4 pi/L: {q, qIndex, dominant (the two poles of
//                           largest weight, sorted by energy), lower / upper (largest-weight pole
//                           below / above h; without a uniform field the two dominant poles)}.
//   splittingMeV            fromCurrent: dominant pole of "current-" minus h.
//                           fromExtrapolation: linear extrapolation to q = 0 of the upper-branch
//                           offset w_u(q) - h through q1 = 2 pi/L and q2 = 4 pi/L, i.e.
//                           2 (w_u(q1) - h) - (w_u(q2) - h). In the two-branch form of physics-notes
//                           section 6, w_u - h = Delta/2 + sqrt((vq)^2 + (Delta/2)^2), so this
//                           estimate tends to Delta for v q1 << Delta but only to about Delta/2 for
//                           v q1 >> Delta: on 16-24-site rings (J2 = 0-0.24, m = 1/16-1/10) it
//                           came out 15-45 % below fromCurrent.
//                           fromBranchSum: w_u(q1) + w_l(q1) - 2h, which equals Delta exactly in that
//                           two-branch form for every q (no extrapolation); about 15-20 % below
//                           fromCurrent in the same runs.
//                           Branches: lower/upper = the largest-weight pole below/above h.
//                           null where not applicable (no uniform field, pole missing).
//   velocityMeV             (E(k0 + 2 pi/L) - E0)/(2 pi/L) in the zero-field ground-state sector:
//                           S^z sector and momentum k0 of the zero-field ground state, E(k) the lowest
//                           level at that S^z and momentum k (energy x lattice step). Computed with
//                           U(1), translations and a uniform field when all S^z were scanned (or
//                           options.velocity === true, which scans the lowest-|S^z| sector); else null.
//   velocitySector          {sz, kIndex} used for the velocity, or null
//   tolerance               relative residual tolerance used
//   seconds                 wall time
//   warnings[]              non-fatal notes (translation not used, ...)
//   stats                   {matvecs, elementsPerSecond (states x terms per second), kernel}
import type { SpinCluster, Vec3 } from "../types";
import { Basis, ConfigSpace, type Translation } from "./basis";
import { CancelledError, EdInputError, EdSizeError, formatBytes } from "./errors";
import { continuedFraction, lanczosEigen, lanczosLowest, norm, type Pole, type VectorOperator } from "./lanczos";
import { cmatAddScaled, cmatKron, cmatZero, spinOps, type CMat } from "./localOps";
import { compileModel, type CompiledModel } from "./model";
import { Sector, SectorHamiltonian, SectorOperator, toComplex, type LocalOperator } from "./sector";

export type CorrelatorComponent = "-+" | "+-" | "zz" | "current-";

export interface ExactOptions {
  /** U(1) axis n (the caller decides the symmetry): S.n sectors in a frame with n = z. */
  readonly conservedAxis?: Vec3;
  /** Frame axis when no U(1) axis is given (default: summed field direction, else z). */
  readonly quantizationAxis?: Vec3;
  /** Use cluster.translations[0] for momentum sectors (default true). */
  readonly useTranslations?: boolean;
  /** S^z sectors to diagonalize (U(1) only): "all" (default) or a value / list of values. */
  readonly sz?: number | readonly number[] | "all";
  /** Momentum indices n (k = 2 pi n / L) to diagonalize: "all" (default) or a list. */
  readonly momenta?: "all" | readonly number[];
  /** Number of lowest levels per sector (default 1). */
  readonly levels?: number;
  /** Relative residual tolerance of the eigenvectors (default 1e-10). */
  readonly tolerance?: number;
  /** Largest sector dimension (default 3e6). */
  readonly maxStates?: number;
  /** Memory budget in bytes (default 2 GiB). */
  readonly maxMemoryBytes?: number;
  /** Cache the sparse rows of each sector when memory allows (default true; false: matrix-free). */
  readonly cacheRows?: boolean;
  /** Largest Krylov basis of the eigensolver (default 80; reduced to fit memory). */
  readonly maxKrylov?: number;
  /** Matrix-vector products per sector before giving up (default 3000). */
  readonly maxMatvecs?: number;
  /** Dynamical correlators (false: none). Default: "-+" at q = 0, 2pi/L, 4pi/L and "current-". */
  readonly correlators?:
    | false
    | {
        /** Momenta in radians per translation step (multiples of 2 pi / L with translations). */
        readonly q?: readonly number[];
        readonly components?: readonly CorrelatorComponent[];
        /** Lanczos steps per continued fraction (default 200). */
        readonly maxSteps?: number;
        /**
         * Stop when no unconverged pole holds more than this fraction of the weight (default
         * 1e-3). A pole is converged when its Ritz residual is below 1e-6 x ||H|| (energy error
         * of order 1e-12 ||H|| / gap).
         */
        readonly weightTol?: number;
      };
  /** Velocity: default when computable from the scanned sectors; true forces the extra scan. */
  readonly velocity?: boolean;
  readonly seed?: number;
}

export interface ExactHooks {
  onProgress?(fraction: number, stage: string): void;
  signal?: { readonly aborted: boolean };
}

export interface SectorResult {
  sz: number | null;
  k: number | null;
  kIndex: number | null;
  dimension: number;
  lowestEnergyMeV: number;
  levelsMeV: number[];
  residuals: number[];
  matvecs: number;
  converged: boolean;
}

export interface PoleResult {
  energyMeV: number;
  weight: number;
}

export interface CorrelatorResult {
  q: number;
  qIndex: number | null;
  component: CorrelatorComponent;
  targetSector: { sz: number | null; kIndex: number | null };
  poles: PoleResult[];
  sumRule: { total: number; expected: number };
  steps: number;
  unconvergedWeight: number;
  largestUnconverged: number;
}

export interface LarmorResult {
  zeemanMeV: number | null;
  singlePole: boolean;
  offsetFromZeemanMeV: number | null;
  meanMeV: number | null;
  widthMeV: number | null;
  weight: number;
}

export interface BranchResult {
  q: number;
  qIndex: number;
  /** The two poles of largest weight, sorted by energy. */
  dominant: PoleResult[];
  /** Largest-weight pole below h and above h (without a uniform field: the two dominant poles). */
  lower: PoleResult | null;
  upper: PoleResult | null;
}

export interface ExactResult {
  sites: number;
  dimension: number;
  hilbertDimension: number;
  frameAxis: [number, number, number];
  conserved: boolean;
  translationPeriod: number | null;
  mirrorMomenta: boolean;
  sectors: SectorResult[];
  groundState: {
    sz: number | null;
    k: number | null;
    kIndex: number | null;
    /** ||H x - E x|| of the returned ground-state vector and the products it took. */
    residual: number;
    matvecs: number;
    converged: boolean;
  };
  groundEnergyMeV: number;
  groundEnergyPerSiteMeV: number;
  magnetization: number;
  energiesBySz: { sz: number; energyMeV: number; zeroFieldEnergyMeV: number | null }[];
  plateau: { sz: number; fieldRangeMeV: [number | null, number | null] } | null;
  correlators: CorrelatorResult[];
  larmor: LarmorResult | null;
  branches: BranchResult[];
  splittingMeV: { fromCurrent: number | null; fromExtrapolation: number | null; fromBranchSum: number | null };
  velocityMeV: number | null;
  velocitySector: { sz: number; kIndex: number } | null;
  tolerance: number;
  seconds: number;
  warnings: string[];
  stats: { matvecs: number; elementsPerSecond: number; kernel: string };
}

const DEFAULT_MAX_STATES = 3e6;
const DEFAULT_MAX_MEMORY = 2 * 2 ** 30;

class Progress {
  private last = -1;
  private lastTime = 0;
  private lastStage = "";
  constructor(private readonly hooks: ExactHooks) {}
  report(fraction: number, stage: string): void {
    const cb = this.hooks.onProgress;
    if (!cb) return;
    const f = Math.max(0, Math.min(1, fraction));
    const now = Date.now();
    if (stage === this.lastStage && f < 1 && f - this.last < 0.01 && now - this.lastTime < 200) return;
    this.last = f;
    this.lastTime = now;
    this.lastStage = stage;
    cb(f, stage);
  }
}

/** Solves the cluster; throws EdSizeError, EdInputError or CancelledError. */
export function solveExact(cluster: SpinCluster, options: ExactOptions = {}, hooks: ExactHooks = {}): ExactResult {
  const t0 = performance.now();
  const signal = hooks.signal;
  const cancel = (): void => {
    if (signal?.aborted) throw new CancelledError();
  };
  cancel();
  const progress = new Progress(hooks);
  const model = compileModel(cluster, {
    ...(options.conservedAxis ? { conservedAxis: options.conservedAxis } : {}),
    ...(options.quantizationAxis ? { quantizationAxis: options.quantizationAxis } : {}),
    ...(options.useTranslations !== undefined ? { useTranslations: options.useTranslations } : {}),
  });
  const warnings = [...model.warnings];
  const N = model.nSites;
  const tr = model.relabel.translation;
  const L = tr?.L ?? 1;
  const maxStates = options.maxStates ?? DEFAULT_MAX_STATES;
  const maxMemory = options.maxMemoryBytes ?? DEFAULT_MAX_MEMORY;
  const tol = options.tolerance ?? 1e-10;
  const nev = Math.max(1, Math.floor(options.levels ?? 1));
  const maxDigit = Array.from(model.dims).reduce((a, d) => a + d - 1, 0);
  const dimsArr = Array.from(model.dims);
  const bitsOk = model.conserved && N <= 30 && dimsArr.every((d) => d === 2);

  // ---- sectors to scan
  let digitSums: (number | null)[];
  const szOpt = options.sz ?? "all";
  if (model.conserved) {
    if (szOpt === "all") digitSums = Array.from({ length: maxDigit + 1 }, (_, a) => a);
    else {
      const list = typeof szOpt === "number" ? [szOpt] : [...szOpt];
      digitSums = list.map((sz) => {
        const a = sz + model.spinSum;
        if (Math.abs(a - Math.round(a)) > 1e-9 || a < -1e-9 || a > maxDigit + 1e-9)
          throw new EdInputError(`S^z = ${sz} is not an allowed total S^z for this cluster`);
        return Math.round(a);
      });
    }
  } else {
    if (options.sz !== undefined && options.sz !== "all")
      warnings.push("options.sz ignored: no conserved axis, the full space is diagonalized");
    digitSums = [null];
  }
  const mirror = tr !== null && model.real;
  let momenta: number[] | null = null;
  if (tr) {
    if (!options.momenta || options.momenta === "all") {
      momenta = [];
      for (let n = 0; n < L; n++) if (!mirror || n <= L / 2) momenta.push(n);
    } else momenta = options.momenta.map((n) => ((Math.round(n) % L) + L) % L);
  } else if (options.momenta && options.momenta !== "all") {
    warnings.push("options.momenta ignored: no translation symmetry in use");
  }

  // ---- size checks before any allocation
  const maxKrylovOpt = Math.max(nev + 3, options.maxKrylov ?? 80);
  /** Memory allowance for cached sparse rows after reserving the Krylov basis. */
  const cacheAllowance = (heldBytes: number, vecBytes: number): number => {
    if (options.cacheRows === false) return 0;
    const free = maxMemory - heldBytes - (maxKrylovOpt + 6) * vecBytes;
    return Math.max(0, Math.min(free, 0.5 * maxMemory));
  };
  const krylovFor = (R: number, complex: boolean, fixedBytes: number, A: number | null, n: number | null): number => {
    const vecBytes = R * 8 * (complex ? 2 : 1);
    const avail = maxMemory - fixedBytes - 3 * vecBytes;
    const m = Math.min(maxKrylovOpt, Math.floor(avail / vecBytes) - 1);
    const minM = Math.min(nev + 6, Math.max(2, R));
    if (m < minM) {
      const need = fixedBytes + (minM + 4) * vecBytes;
      throw sizeError(model, A, n, R, need, maxStates, maxMemory);
    }
    return m;
  };
  const sectorEstimate = (A: number | null): { D: number; R: number; fixed: number } => {
    const D = ConfigSpace.count(dimsArr, A);
    const R = tr ? Math.ceil(D / L) : D;
    const fixed =
      ConfigSpace.estimateBytes(dimsArr, A) + Basis.estimateBytes(D, tr ? L : null, bitsOk) + R * (8 + 1 + 16);
    return { D, R, fixed };
  };
  for (const A of digitSums) {
    const { R, fixed } = sectorEstimate(A);
    if (R > maxStates) throw sizeError(model, A, null, R, fixed + 20 * R * 16, maxStates, maxMemory);
    // the ground-state vector and basis of an earlier sector may be held at the same time
    krylovFor(R, !model.real || (tr !== null && L > 2), fixed * 2, A, null);
  }

  // ---- work estimate for progress
  const corrOpt = options.correlators;
  const corrComponents: CorrelatorComponent[] =
    corrOpt === false
      ? []
      : [...(corrOpt?.components ?? ((tr ? ["-+", "current-"] : ["-+"]) as CorrelatorComponent[]))];
  const totalWork =
    digitSums.reduce<number>((s, A) => s + sectorEstimate(A).D, 0) +
    (corrComponents.length > 0 ? 3 * sectorEstimate(digitSums[0] ?? null).D * 0.5 : 0);
  let doneWork = 0;

  // ---- scan
  const sectors: SectorResult[] = [];
  let best: { energy: number; A: number | null; n: number | null } | null = null;
  let totalMatvecs = 0;
  let totalElements = 0;
  let totalKernelSeconds = 0;
  let kernelName = "";
  const energyOf = new Map<string, number>();
  const key = (A: number | null, n: number | null): string => `${A}:${n}`;

  const seed = options.seed ?? 20240601;
  const maxMatvecs = options.maxMatvecs ?? 3000;
  /** Builds the sector Hamiltonian with a row cache when memory allows. */
  const makeHam = (basis: Basis, sector: Sector, extraHeld: number): SectorHamiltonian => {
    const held = basis.bytes + extraHeld + sector.length * 8 + sector.basis.nReps * 9;
    const ham = new SectorHamiltonian(model, sector, cacheAllowance(held, sector.length * 8));
    kernelName = ham.kernel + (ham.cached ? "+rows" : "");
    return ham;
  };
  const account = (ham: SectorHamiltonian): void => {
    totalMatvecs += ham.stats.matvecs;
    totalElements += ham.stats.elements;
    totalKernelSeconds += ham.stats.seconds;
  };

  /** Lowest levels of the sectors (A, n) for n in ns; energies only. */
  const diagonalize = (A: number | null, ns: (number | null)[], stage: string, workD: number): void => {
    const est = sectorEstimate(A);
    cancel();
    const space = ConfigSpace.create(dimsArr, A);
    if (space.size === 0) return;
    const basis = Basis.build(space, tr, bitsOk, cancel);
    for (const n of ns) {
      cancel();
      const sector = new Sector(basis, n, !model.real);
      if (sector.dim === 0) continue;
      if (sector.dim > maxStates)
        throw sizeError(model, A, n, sector.dim, est.fixed + 20 * sector.dim * 16, maxStates, maxMemory);
      const ham = makeHam(basis, sector, 0);
      const op = hamOperator(ham);
      const share = workD / ns.length;
      const onStep = (mv: number): void => {
        cancel();
        progress.report((doneWork + share * Math.min(0.95, mv / 150)) / totalWork, stage);
      };
      let values: number[];
      let residuals: number[];
      let matvecs: number;
      let converged: boolean;
      if (nev === 1) {
        const r = lanczosLowest(op, { tol, maxMatvecs, seed }, { onStep });
        values = [r.value];
        residuals = [r.residual];
        matvecs = r.matvecs;
        converged = r.converged;
      } else {
        const m = krylovFor(sector.basis.nReps, sector.complex, basis.bytes + ham.bytes, A, n);
        const r = lanczosEigen(op, { nev, tol, maxKrylov: m, maxMatvecs, vectors: 0, seed }, { onStep });
        values = r.values;
        residuals = r.residuals;
        matvecs = r.matvecs;
        converged = r.converged;
      }
      doneWork += share;
      account(ham);
      const sz = A === null ? null : A - model.spinSum;
      sectors.push({
        sz,
        k: n === null ? null : (2 * Math.PI * n) / L,
        kIndex: n,
        dimension: sector.dim,
        lowestEnergyMeV: values[0]!,
        levelsMeV: values,
        residuals,
        matvecs,
        converged,
      });
      if (!converged)
        warnings.push(`sector Sz=${sz} n=${n}: Lanczos not converged (residual ${residuals[0]?.toExponential(2)})`);
      energyOf.set(key(A, n), values[0]!);
      if (best === null || values[0]! < best.energy - 1e-12 * Math.max(1, Math.abs(best.energy))) {
        best = { energy: values[0]!, A, n };
      }
      progress.report(doneWork / totalWork, stage);
    }
  };

  for (const A of digitSums) diagonalize(A, momenta ?? [null], "sectors", sectorEstimate(A).D);
  if (best === null) throw new EdInputError("no sector with states was diagonalized");
  const bestSector: { energy: number; A: number | null; n: number | null } = best;

  // ---- ground-state vector: full re-orthogonalisation (thick restart) in the lowest sector
  let gs: GroundState;
  {
    cancel();
    const A = bestSector.A;
    const basis = Basis.build(ConfigSpace.create(dimsArr, A), tr, bitsOk, cancel);
    const sector = new Sector(basis, bestSector.n, !model.real);
    const ham = makeHam(basis, sector, 0);
    const m = krylovFor(sector.basis.nReps, sector.complex, basis.bytes + ham.bytes, A, bestSector.n);
    const gsWork = sectorEstimate(A).D / Math.max(1, (momenta ?? [null]).length);
    const r = lanczosEigen(
      hamOperator(ham),
      { nev: 1, tol, maxKrylov: m, maxMatvecs, vectors: 1, seed },
      {
        onStep: (mv) => {
          cancel();
          progress.report((doneWork + gsWork * Math.min(0.95, mv / 150)) / totalWork, "ground state");
        },
      },
    );
    doneWork += gsWork;
    account(ham);
    if (!r.converged) warnings.push(`ground-state vector not converged (residual ${r.residuals[0]?.toExponential(2)})`);
    ham.dropCache();
    gs = {
      energy: r.values[0]!,
      A,
      n: bestSector.n,
      vec: r.vectors[0]!,
      sector,
      residual: r.residuals[0]!,
      matvecs: r.matvecs,
      converged: r.converged,
    };
  }
  const E0 = gs.energy;
  const gsSz = gs.A === null ? null : gs.A - model.spinSum;

  // ---- magnetization
  let magnetization: number;
  if (gsSz !== null) magnetization = gsSz / N;
  else {
    const v = gs.vec;
    const reps = gs.sector.basis.reps;
    let s = 0;
    for (let a = 0; a < reps.length; a++) {
      const w = gs.sector.complex ? v[2 * a]! ** 2 + v[2 * a + 1]! ** 2 : v[a]! ** 2;
      if (w !== 0) s += w * (gs.sector.digitSumOf(reps[a]!) - model.spinSum);
    }
    magnetization = s / N;
  }

  // ---- magnetization plateau: lowest energy per S^z and the field window of the ground sector
  const energiesBySz: { sz: number; energyMeV: number; zeroFieldEnergyMeV: number | null }[] = [];
  let plateau: { sz: number; fieldRangeMeV: [number | null, number | null] } | null = null;
  if (model.conserved) {
    const bySz = new Map<number, number>();
    for (const sct of sectors) if (sct.sz !== null && (!bySz.has(sct.sz) || bySz.get(sct.sz)! > sct.lowestEnergyMeV)) bySz.set(sct.sz, sct.lowestEnergyMeV);
    const hz = model.zeeman;
    for (const [sz, e] of [...bySz.entries()].sort((a, b) => a[0] - b[0]))
      energiesBySz.push({ sz, energyMeV: e, zeroFieldEnergyMeV: hz === null ? null : e + hz * sz });
    if (hz !== null && gsSz !== null && szOpt === "all") {
      // E0(Sz) - h' Sz is lowest at the ground sector for h' in [lo, hi]
      const e0 = (sz: number): number => bySz.get(sz)! + hz * sz;
      let lo = -Infinity;
      let hi = Infinity;
      for (const sz of bySz.keys()) {
        if (sz < gsSz) lo = Math.max(lo, (e0(gsSz) - e0(sz)) / (gsSz - sz));
        if (sz > gsSz) hi = Math.min(hi, (e0(sz) - e0(gsSz)) / (sz - gsSz));
      }
      plateau = { sz: gsSz, fieldRangeMeV: [Number.isFinite(lo) ? lo : null, Number.isFinite(hi) ? hi : null] };
    }
  }

  // ---- correlators
  const correlators: CorrelatorResult[] = [];
  if (corrComponents.length > 0) {
    const qList = correlatorMomenta(corrOpt === false ? undefined : corrOpt?.q, tr, warnings);
    const maxSteps = (corrOpt === false ? undefined : corrOpt?.maxSteps) ?? 200;
    const weightTol = (corrOpt === false ? undefined : corrOpt?.weightTol) ?? 1e-3;
    const basisCache = new Map<string, Basis>();
    basisCache.set(String(gs.A), gs.sector.basis);
    const basisFor = (A: number | null): Basis | null => {
      const k = String(A);
      const hit = basisCache.get(k);
      if (hit) return hit;
      if (A !== null && (A < 0 || A > maxDigit)) return null;
      const space = ConfigSpace.create(dimsArr, A);
      if (space.size === 0) return null;
      const est = sectorEstimate(A);
      // target basis, ground state held, and the continued fraction's few complex vectors
      const need = est.fixed + gs.sector.basis.bytes + 8 * gs.vec.length + 6 * 16 * est.R;
      if (Math.ceil(est.R) > maxStates || need > maxMemory)
        throw sizeError(model, A, null, est.R, need, maxStates, maxMemory);
      const b = Basis.build(space, tr, bitsOk, cancel);
      // keep at most three bases (ground state and two neighbours)
      if (basisCache.size >= 3)
        for (const kk of basisCache.keys())
          if (kk !== String(gs.A)) {
            basisCache.delete(kk);
            break;
          }
      basisCache.set(k, b);
      return b;
    };
    const tasks: { comp: CorrelatorComponent; q: number; qIndex: number | null }[] = [];
    for (const comp of corrComponents) {
      if (comp === "current-") {
        if (!tr) {
          warnings.push('correlator "current-" needs a translation (bonds j -> T(j)); skipped');
          continue;
        }
        tasks.push({ comp, q: 0, qIndex: 0 });
      } else for (const q of qList) tasks.push({ comp, q: q.q, qIndex: q.n });
    }
    const corrWorkEach = tasks.length > 0 ? (totalWork - doneWork) / tasks.length : 0;
    for (const task of tasks) {
      cancel();
      const dA = task.comp === "-+" || task.comp === "current-" ? -1 : task.comp === "+-" ? 1 : 0;
      const tA = gs.A === null ? null : gs.A + dA;
      const tn = tr ? (((gs.n ?? 0) + (task.qIndex ?? 0)) % L + L) % L : null;
      const tBasis = basisFor(tA);
      const targetSz = tA === null ? null : tA - model.spinSum;
      const entry: CorrelatorResult = {
        q: task.q,
        qIndex: task.qIndex,
        component: task.comp,
        targetSector: { sz: targetSz, kIndex: tn },
        poles: [],
        sumRule: { total: 0, expected: 0 },
        steps: 0,
        unconvergedWeight: 0,
        largestUnconverged: 0,
      };
      if (tBasis) {
        const tSector = new Sector(tBasis, tn, true);
        if (tSector.dim > 0) {
          const srcSector = gs.sector.complex ? gs.sector : new Sector(gs.sector.basis, gs.n, true);
          const psi = toComplex(gs.vec, gs.sector.basis.nReps);
          const local = correlatorOperator(task.comp, task.q, model, cluster, gs.A === null);
          const aop = new SectorOperator(local, srcSector, tSector);
          const phi = tSector.newVector();
          aop.apply(psi, phi);
          const ham = new SectorHamiltonian(
            model,
            tSector,
            cacheAllowance(gs.sector.basis.bytes + tBasis.bytes + 8 * gs.vec.length, 0) / 1,
          );
          const op = hamOperator(ham);
          const cf = continuedFraction(
            op,
            phi,
            { maxSteps, poleTol: 1e-6, weightTol, mergeTol: 1e-10 },
            {
              onStep: (s) => {
                cancel();
                progress.report((doneWork + corrWorkEach * Math.min(0.95, s / maxSteps)) / totalWork, "correlators");
              },
            },
          );
          totalMatvecs += ham.stats.matvecs;
          totalElements += ham.stats.elements;
          totalKernelSeconds += ham.stats.seconds;
          const poles = cf.poles.map((p: Pole) => ({ energyMeV: p.energy - E0, weight: p.weight / N }));
          entry.poles = poles;
          entry.sumRule = { total: poles.reduce((s, p) => s + p.weight, 0), expected: norm(phi) ** 2 / N };
          entry.steps = cf.steps;
          entry.unconvergedWeight = cf.unconvergedWeight;
          entry.largestUnconverged = cf.largestUnconverged;
        }
      }
      correlators.push(entry);
      doneWork += corrWorkEach;
      progress.report(doneWork / totalWork, "correlators");
    }
  }

  // ---- derived numbers
  const h = model.zeeman;
  const find = (comp: CorrelatorComponent, n: number | null, q: number): CorrelatorResult | undefined =>
    correlators.find(
      (c) => c.component === comp && (n !== null && c.qIndex !== null ? c.qIndex === n : Math.abs(c.q - q) < 1e-12),
    );
  let larmor: LarmorResult | null = null;
  const c0 = find("-+", 0, 0);
  if (c0) {
    const total = c0.poles.reduce((s, p) => s + p.weight, 0);
    if (total > 0) {
      const mean = c0.poles.reduce((s, p) => s + p.weight * p.energyMeV, 0) / total;
      const varc = c0.poles.reduce((s, p) => s + p.weight * (p.energyMeV - mean) ** 2, 0) / total;
      const top = c0.poles.reduce((a, b) => (b.weight > a.weight ? b : a));
      const single =
        h !== null &&
        top.weight >= (1 - 1e-9) * total &&
        Math.abs(top.energyMeV - h) <= 1e-9 * (Math.abs(h) > 0 ? Math.abs(h) : model.scale);
      larmor = {
        zeemanMeV: h,
        singlePole: single,
        offsetFromZeemanMeV: h === null ? null : mean - h,
        meanMeV: mean,
        widthMeV: Math.sqrt(Math.max(0, varc)),
        weight: total,
      };
    } else larmor = { zeemanMeV: h, singlePole: false, offsetFromZeemanMeV: null, meanMeV: null, widthMeV: null, weight: 0 };
  }
  const branches: BranchResult[] = [];
  if (tr) {
    for (const n of [1, 2]) {
      const c = find("-+", n % L, (2 * Math.PI * n) / L);
      if (!c || c.poles.length === 0) continue;
      const byWeight = [...c.poles].sort((a, b) => b.weight - a.weight);
      const dominant = byWeight.slice(0, 2).sort((a, b) => a.energyMeV - b.energyMeV);
      let lower: PoleResult | null;
      let upper: PoleResult | null;
      if (h !== null) {
        lower = byWeight.find((p) => p.energyMeV < h) ?? null;
        upper = byWeight.find((p) => p.energyMeV > h) ?? null;
      } else {
        lower = dominant[0] ?? null;
        upper = dominant.length > 1 ? dominant[1]! : null;
      }
      branches.push({ q: (2 * Math.PI * n) / L, qIndex: n, dominant, lower, upper });
    }
  }
  let fromCurrent: number | null = null;
  const cur = correlators.find((c) => c.component === "current-");
  if (cur && cur.poles.length > 0 && h !== null) {
    const top = cur.poles.reduce((a, b) => (b.weight > a.weight ? b : a));
    fromCurrent = top.energyMeV - h;
  }
  let fromExtrapolation: number | null = null;
  let fromBranchSum: number | null = null;
  if (h !== null && branches.length === 2 && branches[0]!.upper && branches[1]!.upper) {
    const b1 = branches[0]!;
    const b2 = branches[1]!;
    const u1 = b1.upper!.energyMeV - h;
    const u2 = b2.upper!.energyMeV - h;
    fromExtrapolation = 2 * u1 - u2;
  }
  if (h !== null && branches.length >= 1 && branches[0]!.upper && branches[0]!.lower) {
    const b1 = branches[0]!;
    fromBranchSum = b1.upper!.energyMeV + b1.lower!.energyMeV - 2 * h;
  }

  // ---- velocity
  let velocityMeV: number | null = null;
  let velocitySector: { sz: number; kIndex: number } | null = null;
  if (model.conserved && tr && h !== null && options.velocity !== false && momenta) {
    const allSz = szOpt === "all";
    let candidates = digitSums.filter((A): A is number => A !== null);
    if (!allSz && options.velocity === true) {
      // lowest |Sz| sector
      const A = Math.floor(maxDigit / 2);
      candidates = [A];
      const missing: number[] = [];
      for (let n = 0; n < L; n++) if ((!mirror || n <= L / 2) && !energyOf.has(key(A, n))) missing.push(n);
      if (missing.length > 0) diagonalize(A, missing, "velocity", sectorEstimate(A).D);
    }
    if (allSz || options.velocity === true) {
      const eAt = (A: number, n: number): number | undefined => {
        const nn = ((n % L) + L) % L;
        return energyOf.get(key(A, nn)) ?? (mirror ? energyOf.get(key(A, (L - nn) % L)) : undefined);
      };
      let bestE = Infinity;
      let bestA = -1;
      let bestN = -1;
      for (const A of candidates)
        for (let n = 0; n < L; n++) {
          const e = eAt(A, n);
          if (e === undefined) continue;
          const e0 = e + h * (A - model.spinSum); // zero-field energy
          if (bestA < 0 || e0 < bestE - 1e-12 * Math.max(1, Math.abs(bestE))) {
            bestE = e0;
            bestA = A;
            bestN = n;
          }
        }
      if (bestA >= 0) {
        const e1 = eAt(bestA, bestN + 1);
        if (e1 !== undefined) {
          const k = (2 * Math.PI) / L;
          velocityMeV = (e1 + h * (bestA - model.spinSum) - bestE) / k;
          velocitySector = { sz: bestA - model.spinSum, kIndex: bestN };
        }
      }
    }
  }

  progress.report(1, "done");
  return {
    sites: N,
    dimension: gs.sector.dim,
    hilbertDimension: dimsArr.reduce((a, d) => a * d, 1),
    frameAxis: [model.frameAxis[0], model.frameAxis[1], model.frameAxis[2]],
    conserved: model.conserved,
    translationPeriod: tr ? L : null,
    mirrorMomenta: mirror,
    sectors,
    groundState: {
      sz: gsSz,
      k: gs.n === null ? null : (2 * Math.PI * gs.n) / L,
      kIndex: gs.n,
      residual: gs.residual,
      matvecs: gs.matvecs,
      converged: gs.converged,
    },
    groundEnergyMeV: E0,
    groundEnergyPerSiteMeV: E0 / N,
    magnetization,
    energiesBySz,
    plateau,
    correlators,
    larmor,
    branches,
    splittingMeV: { fromCurrent, fromExtrapolation, fromBranchSum },
    velocityMeV,
    velocitySector,
    tolerance: tol,
    seconds: (performance.now() - t0) / 1000,
    warnings,
    stats: {
      matvecs: totalMatvecs,
      elementsPerSecond: totalKernelSeconds > 0 ? totalElements / totalKernelSeconds : 0,
      kernel: kernelName,
    },
  };
}

interface GroundState {
  energy: number;
  A: number | null;
  n: number | null;
  vec: Float64Array;
  sector: Sector;
  residual: number;
  matvecs: number;
  converged: boolean;
}

function hamOperator(ham: SectorHamiltonian): VectorOperator {
  const sector = ham.sector;
  return {
    length: sector.length,
    complex: sector.complex,
    dim: sector.dim,
    apply: (x, y) => ham.apply(x, y),
    mask: (v) => sector.mask(v),
  };
}

function sizeError(
  model: CompiledModel,
  A: number | null,
  n: number | null,
  dim: number,
  bytes: number,
  maxStates: number,
  maxMemory: number,
): EdSizeError {
  const sz = A === null ? "all S^z" : `S^z = ${A - model.spinSum}`;
  const k = n === null ? (model.relabel.translation ? ", per momentum" : "") : `, k index ${n}`;
  const what = model.relabel.translation ? "about " : "";
  const msg =
    `exact diagonalization too large: sector (${sz}${k}) has ${what}${Math.round(dim).toLocaleString("en-US")} states ` +
    `and would need about ${formatBytes(bytes)} ` +
    `(limits: ${maxStates.toLocaleString("en-US")} states, ${formatBytes(maxMemory)})`;
  return new EdSizeError(msg, Math.round(dim), Math.round(bytes), maxStates, maxMemory);
}

function correlatorMomenta(
  q: readonly number[] | undefined,
  tr: Translation | null,
  warnings: string[],
): { q: number; n: number | null }[] {
  if (!tr) {
    return (q ?? [0]).map((x) => ({ q: x, n: null }));
  }
  const L = tr.L;
  const list = q ?? [0, (2 * Math.PI) / L, (4 * Math.PI) / L];
  const out: { q: number; n: number | null }[] = [];
  for (const x of list) {
    const n = (x * L) / (2 * Math.PI);
    if (Math.abs(n - Math.round(n)) > 1e-9) {
      warnings.push(`q = ${x} is not a multiple of 2 pi / ${L}; skipped`);
      continue;
    }
    out.push({ q: x, n: ((Math.round(n) % L) + L) % L });
  }
  return out;
}

/** Local terms of the correlator operator A (positions relabelled). */
function correlatorOperator(
  comp: CorrelatorComponent,
  q: number,
  model: CompiledModel,
  cluster: SpinCluster,
  _full: boolean,
): LocalOperator {
  const N = model.nSites;
  if (comp === "current-") {
    const perm = cluster.translations![0]!;
    const pos = model.relabel.position;
    const pairs: { p: number; q: number; op: CMat }[] = [];
    for (let j = 0; j < N; j++) {
      const p = pos[j]!;
      const pq = pos[perm[j]!]!;
      const oi = spinOps(model.spins[p]!);
      const oj = spinOps(model.spins[pq]!);
      const op = cmatZero(oi.d * oj.d);
      cmatAddScaled(op, cmatKron(oi.z, oj.minus), 1, 0);
      cmatAddScaled(op, cmatKron(oi.minus, oj.z), -1, 0);
      pairs.push({ p, q: pq, op });
    }
    return { pairs, sites: [], deltaA: -1 };
  }
  const sites: { p: number; op: CMat }[] = [];
  for (let p = 0; p < N; p++) {
    const o = spinOps(model.spins[p]!);
    const base = comp === "-+" ? o.minus : comp === "+-" ? o.plus : o.z;
    const op = cmatZero(o.d);
    const ph = -q * model.x[p]!;
    cmatAddScaled(op, base, Math.cos(ph), Math.sin(ph));
    sites.push({ p, op });
  }
  return { pairs: [], sites, deltaA: comp === "-+" ? -1 : comp === "+-" ? 1 : 0 };
}
