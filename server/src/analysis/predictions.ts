// Field-dependent predictions for spin-1/2 chains in a field: magnetization, saturation field,
// velocity, the two q = 0 branches and their splitting, the near-saturation bound-state branch and
// the DM doublet. Every number carries its method; outside a method's validity we give a reason
// instead of a number. Energies in meV (the physics layer works in units of J). Analysis layer.
import type { SpinModel } from "../model/model";
import { MU_B_MEV_PER_T } from "../model/units";
import { xxzDressedVelocity, xxzFieldForMagnetization, xxzMagnetization, xxzVelocity } from "../physics/bethe";
import { branchCurve, dmDoublet, fieldTheorySplitting, twoBranches } from "../physics/branches";
import { dot3, normMat3 } from "../physics/linalg3";
import { nearSaturationBranch, saturationFieldWithBoundStates, type ChainBond } from "../physics/magnons";
import { decomposeExchange } from "../physics/symmetry";
import type { Vec3 } from "../physics/types";
import { chainBondSums } from "./family";
import type { PhysicsSummary } from "./physics";

/** Thresholds of the regimes, in m per site (saturation 1/2); see docs/predictions.md. */
export const FIELD_THEORY_MAX_M = 0.05;
export const TWO_BRANCH_MAX_M = 0.25;
export const NEAR_SATURATION_MIN_M = 0.4;
/** Longest bond (in cells) for which the chain predictions are computed. */
export const MAX_CHAIN_RANGE = 6;

/** Exact finite-ring numbers for one coupling set (from the exact solver), in meV. */
export interface ExactCalibration {
  readonly sites: number;
  /** Ground-state energy of each S^z sector at zero field, index = S^z (meV). */
  readonly sectorEnergiesMeV: readonly number[];
  /** Splitting Delta at the ring's magnetizations m = S^z/N (meV), from the spin-current pole. */
  readonly splittings: readonly { readonly m: number; readonly splittingMeV: number; readonly method: string }[];
  /** Lowest excitation at k = 2 pi/N divided by 2 pi/N (meV times lattice spacing). */
  readonly velocityMeV: number | null;
  readonly method: string;
}

/** Supplies exact calibrations for a coupling set when they have been computed (cached). */
export type ExactProvider = (couplings: ChainCouplings) => ExactCalibration | null;

export interface ChainCouplings {
  /** Nearest-neighbour transverse coupling, the unit of energy of the physics layer (meV). */
  readonly jMeV: number;
  /** Bond families about the field axis, in units of jMeV. */
  readonly bonds: readonly ChainBond[];
  /** Uniform nearest-neighbour DM component along the field (meV), 0 if none. */
  readonly dmMeV: number;
  /** Delta of the nearest-neighbour bond and whether only nearest neighbours couple. */
  readonly delta: number;
  readonly nearestOnly: boolean;
  /** A string that identifies the coupling set (cache key for exact calibrations). */
  readonly key: string;
}

export interface Valued<T> {
  readonly value: T | null;
  readonly method: string;
  readonly valid: boolean;
  readonly reason: string | null;
}

export interface Predictions {
  readonly applicable: boolean;
  readonly reason: string | null;
  readonly couplings: ChainCouplings | null;
  readonly zeemanMeV: number | null;
  readonly magnetization: Valued<number>;
  readonly saturationMeV: Valued<number>;
  readonly saturationFieldT: number | null;
  readonly saturationMechanism: string | null;
  readonly velocityMeV: Valued<number>;
  readonly branches: {
    readonly valid: boolean;
    readonly reason: string | null;
    readonly lowerAtZeroMeV: number | null;
    readonly upperAtZeroMeV: number | null;
    readonly splittingMeV: number | null;
    readonly splittingOverZeeman: number | null;
    readonly coupling: number | null;
    readonly method: string;
    readonly alternatives: readonly { readonly method: string; readonly splittingMeV: number | null; readonly valid: boolean; readonly note: string }[];
  };
  readonly nearSaturation: {
    readonly valid: boolean;
    readonly reason: string | null;
    readonly upperAtZeroMeV: number | null;
    readonly weight: string | null;
    readonly method: string;
    readonly points: readonly { readonly qOverPi: number; readonly upperMeV: number | null }[];
  };
  readonly dmDoublet: {
    readonly valid: boolean;
    readonly reason: string | null;
    readonly lowerMeV: number | null;
    readonly upperMeV: number | null;
    readonly lowerWeightFraction: number | null;
    readonly upperWeightFraction: number | null;
    readonly naiveLowerMeV: number | null;
    readonly naiveUpperMeV: number | null;
    readonly naiveApplies: boolean | null;
    readonly method: string;
  } | null;
  readonly regime: "zero field" | "two-branch" | "between" | "near saturation" | "saturated" | null;
  readonly curve: readonly { readonly qOverPi: number; readonly lowerMeV: number; readonly upperMeV: number; readonly lowerWeight: number; readonly upperWeight: number }[];
  readonly sweep: readonly { readonly fieldT: number; readonly zeemanMeV: number; readonly m: number | null; readonly splittingMeV: number | null; readonly method: string; readonly splittingMethod: string | null }[];
}

const saturationCache = new Map<string, ReturnType<typeof saturationFieldWithBoundStates>>();

function cached<T>(cache: Map<string, T>, key: string, compute: () => T, limit = 64): T {
  const hit = cache.get(key);
  if (hit !== undefined) return hit;
  const value = compute();
  if (cache.size > limit) cache.delete(cache.keys().next().value as string);
  cache.set(key, value);
  return value;
}

const magnetizationCache = new Map<string, ReturnType<typeof xxzMagnetization>>();

/** Bethe-ansatz m(h), memoized: the sweep and the plot ask for the same points on every keystroke. */
function betheMagnetization(delta: number, h: number): ReturnType<typeof xxzMagnetization> {
  return cached(magnetizationCache, `${delta}|${h}`, () => xxzMagnetization(delta, h), 4096);
}

const none = <T>(reason: string, method = "none"): Valued<T> => ({ value: null, method, valid: false, reason });

/** Scratch for chainCouplings: the symmetric part of one bond sum, row-major. */
const SYM = new Float64Array(9);

/** Chain couplings about the field axis n, or a reason why the chain is not U(1) about n. */
export function chainCouplings(model: SpinModel, axis: Vec3): { ok: true; value: ChainCouplings } | { ok: false; reason: string } {
  const L = model.lattice;
  if (!L || L.dimension !== 1 || L.sites.length !== 1) return { ok: false, reason: "the field-dependent predictions are implemented for chains with one site per cell" };
  if (L.sites[0]?.spin !== 0.5) return { ok: false, reason: "the field-dependent predictions are implemented for spin 1/2" };
  const byOffset = chainBondSums(model);
  // The magnon problems grow with the bond range; beyond a few neighbours they would cost seconds
  // on every keystroke for models the formulas here do not cover anyway.
  const longest = Math.max(0, ...byOffset.keys());
  if (longest > MAX_CHAIN_RANGE) return { ok: false, reason: `couplings beyond ${MAX_CHAIN_RANGE} neighbours are not covered by the chain predictions` };
  const n0 = axis[0];
  const n1 = axis[1];
  const n2 = axis[2];
  const bonds: { offset: number; jPerp: number; jZ: number }[] = [];
  let dm = 0;
  for (const [offset, m] of [...byOffset.entries()].sort((a, b) => a[0] - b[0])) {
    const d = decomposeExchange(m);
    const dAlong = dot3(d.dm, axis);
    // The symmetric part, written out as m - (m - (m + m^T)/2) entry by entry (the same
    // floating-point operations as that matrix expression, without its temporaries).
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) SYM[3 * i + j] = m[i]![j]! - (m[i]![j]! - (m[i]![j]! + m[j]![i]!) * 0.5);
    const w0 = SYM[0]! * n0 + SYM[1]! * n1 + SYM[2]! * n2;
    const w1 = SYM[3]! * n0 + SYM[4]! * n1 + SYM[5]! * n2;
    const w2 = SYM[6]! * n0 + SYM[7]! * n1 + SYM[8]! * n2;
    const jZ = n0 * w0 + n1 * w1 + n2 * w2;
    const jPerp = (SYM[0]! + SYM[4]! + SYM[8]! - jZ) / 2;
    // Distance of the symmetric part from the uniaxial form (1 - n n^T) jPerp + n n^T jZ.
    let rowSum = 0;
    for (let i = 0; i < 3; i++) {
      let row = 0;
      for (let j = 0; j < 3; j++) {
        const nn = axis[j]! * axis[i]!;
        const r = ((i === j ? 1 : 0) - nn) * jPerp + nn * jZ - SYM[3 * i + j]!;
        row = j === 0 ? r * r : row + r * r;
      }
      rowSum = i === 0 ? row : rowSum + row;
    }
    const scale = Math.max(1e-300, normMat3(m));
    if (Math.sqrt(rowSum) > 1e-9 * scale || Math.abs(Math.hypot(d.dm[0], d.dm[1], d.dm[2]) - Math.abs(dAlong)) > 1e-9 * scale)
      return { ok: false, reason: `the bond at offset ${offset} is not U(1)-symmetric about the field axis` };
    if (Math.abs(dAlong) > 1e-12 * scale) {
      if (offset !== 1) return { ok: false, reason: "DM terms beyond nearest neighbours are not covered" };
      dm = dAlong;
    }
    bonds.push({ offset, jPerp, jZ });
  }
  const first = bonds.find((b) => b.offset === 1);
  if (!first || !(first.jPerp > 0)) return { ok: false, reason: "the predictions need an antiferromagnetic nearest-neighbour transverse exchange (J > 0)" };
  const J = first.jPerp;
  // Ratios equal to 1 within rounding are set to exactly 1, so that an isotropic chain is treated
  // as the isotropic point (Delta = 1) of the Bethe-ansatz solution rather than just above it.
  const snap = (x: number): number => (Math.abs(x - 1) < 1e-12 ? 1 : x);
  const scaled = bonds.map((b) => ({ offset: b.offset, jPerp: snap(b.jPerp / J), jZ: snap(b.jZ / J) }));
  return {
    ok: true,
    value: {
      jMeV: J,
      bonds: scaled,
      dmMeV: dm,
      delta: snap(first.jZ / first.jPerp),
      nearestOnly: scaled.every((b) => b.offset === 1),
      key: JSON.stringify(scaled.map((b) => [b.offset, Number(b.jPerp.toPrecision(12)), Number(b.jZ.toPrecision(12))])),
    },
  };
}

/**
 * m(h) on a finite ring from the zero-field sector energies. The ring's curve is a staircase with
 * steps at the level crossings h_n = E(n+1) - E(n); we draw the line through the step midpoints
 * (h_n, (n + 1/2)/N), the usual finite-size estimate of the thermodynamic curve (common practice,
 * no source), and m = 1/2 at and above the last crossing.
 */
export function ringMagnetization(c: ExactCalibration, hMeV: number): number {
  const e = c.sectorEnergiesMeV;
  const pts: { h: number; m: number }[] = [{ h: 0, m: 0 }];
  for (let n = 0; n + 1 < e.length; n++) {
    const hn = (e[n + 1] ?? NaN) - (e[n] ?? NaN);
    if (Number.isFinite(hn) && hn > (pts[pts.length - 1] as { h: number }).h) pts.push({ h: hn, m: (n + 0.5) / c.sites });
  }
  const last = pts[pts.length - 1] as { h: number; m: number };
  if (hMeV >= last.h) return 0.5;
  for (let i = 1; i < pts.length; i++) {
    const a = pts[i - 1] as { h: number; m: number };
    const b = pts[i] as { h: number; m: number };
    if (hMeV <= b.h) return a.m + ((b.m - a.m) * (hMeV - a.h)) / (b.h - a.h);
  }
  return 0.5;
}

/** Linear interpolation of the exact splittings in m (documented fit: piecewise linear, and Delta -> 0 as m -> 0). */
export function interpolateSplitting(c: ExactCalibration, m: number): number | null {
  const pts = [{ m: 0, splittingMeV: 0 }, ...c.splittings].sort((a, b) => a.m - b.m);
  const last = pts[pts.length - 1];
  if (!last || m > last.m + 1e-12) return null;
  for (let i = 1; i < pts.length; i++) {
    const a = pts[i - 1] as { m: number; splittingMeV: number };
    const b = pts[i] as { m: number; splittingMeV: number };
    if (m <= b.m + 1e-12) return a.splittingMeV + ((b.splittingMeV - a.splittingMeV) * (m - a.m)) / (b.m - a.m || 1);
  }
  return null;
}

export function predict(model: SpinModel, physics: Omit<PhysicsSummary, "predictions">, exactFor?: ExactProvider): Predictions {
  const empty = (reason: string): Predictions => ({
    applicable: false,
    reason,
    couplings: null,
    zeemanMeV: physics.resonance.zeemanMeV,
    magnetization: none(reason),
    saturationMeV: none(reason),
    saturationFieldT: null,
    saturationMechanism: null,
    velocityMeV: none(reason),
    branches: { valid: false, reason, lowerAtZeroMeV: null, upperAtZeroMeV: null, splittingMeV: null, splittingOverZeeman: null, coupling: null, method: "none", alternatives: [] },
    nearSaturation: { valid: false, reason, upperAtZeroMeV: null, weight: null, method: "none", points: [] },
    dmDoublet: null,
    regime: null,
    curve: [],
    sweep: [],
  });
  if (!model.field) return empty("no field statement: the predictions are field-dependent");
  const h = physics.resonance.zeemanMeV;
  if (h === null) return empty("the g-tensor is not uniform, so there is no single Zeeman energy");
  const axis = model.field.direction;
  const sym = physics.symmetry;
  const aboutField = sym.h0 === "su2" || (sym.h0 === "u1" && sym.axis !== null && Math.abs(Math.abs(dot3(sym.axis, axis)) - 1) < 1e-9);
  if (!aboutField) return empty("the Hamiltonian is neither SU(2) nor U(1) about the field direction, so S^z along the field is not conserved");
  const cc = chainCouplings(model, axis);
  if (!cc.ok) return empty(cc.reason);
  const c = cc.value;
  const exact = exactFor?.(c) ?? null;
  const J = c.jMeV;
  const hJ = h / J;
  const gAlong = physics.resonance.gAlongField ?? 2;

  // Saturation: exact one-magnon instability, checked against two-magnon bound states (cached per
  // coupling set: it depends only on the couplings and costs ~100 ms).
  const sat = cached(saturationCache, c.key, () => saturationFieldWithBoundStates(c.bonds));
  const saturationMeV: Valued<number> = {
    value: sat.hSat * J,
    method: sat.mechanism === "one-magnon" ? "exact one-magnon instability of the polarized state (two-magnon bound states checked)" : "two-magnon bound state goes soft before the single magnon",
    valid: true,
    reason: null,
  };

  // Magnetization.
  const xxzBethe = c.nearestOnly && c.delta > -1 && c.delta <= 1;
  let magnetization: Valued<number>;
  if (h >= sat.hSat * J) magnetization = { value: 0.5, method: "saturated: the field exceeds the saturation field", valid: true, reason: null };
  else if (xxzBethe) {
    const r = betheMagnetization(c.delta, hJ);
    magnetization = { value: r.m, method: `Bethe ansatz, dressed-energy equation (Griffiths 1964), ${r.method === "bethe-ansatz nystrom" ? "solved by Gauss-Legendre (Nystrom) quadrature" : r.method}`, valid: r.converged, reason: r.converged ? null : "quadrature not converged" };
  } else if (exact) magnetization = { value: ringMagnetization(exact, h), method: `exact diagonalization, ${exact.sites}-site ring, level crossings E(Sz+1) - E(Sz), line through the step midpoints`, valid: true, reason: null };
  else magnetization = none("no closed form for this chain: run the exact check (--exact in the CLI, the exact-check lens in the editor) for m(h)", "unavailable");
  const m = magnetization.value;

  // Velocity.
  let velocityMeV: Valued<number>;
  if (xxzBethe) velocityMeV = { value: xxzVelocity(c.delta) * J, method: "Bethe ansatz, v = (pi/2) J sin(gamma)/gamma (des Cloizeaux & Pearson 1962)", valid: true, reason: null };
  else if (exact?.velocityMeV) velocityMeV = { value: exact.velocityMeV, method: `exact diagonalization, lowest excitation at k = 2 pi/${exact.sites}`, valid: true, reason: null };
  else velocityMeV = none("no closed form for this chain: run the exact check (--exact) for the velocity", "unavailable");
  const v = velocityMeV.value;

  const gapless = physics.family.placement?.gapless ?? (c.nearestOnly && c.delta > -1 && c.delta <= 1 ? true : null);
  const regime: Predictions["regime"] = m === null ? null : m === 0 ? "zero field" : m >= 0.5 ? "saturated" : m >= NEAR_SATURATION_MIN_M ? "near saturation" : m > TWO_BRANCH_MAX_M ? "between" : "two-branch";

  // The two q = 0 branches.
  const alternatives: Predictions["branches"]["alternatives"][number][] = [];
  let branchReason: string | null = null;
  let splitting: number | null = null;
  let coupling: number | null = null;
  let method = "none";
  // The two-branch form places the lower branch at h by the Larmor theorem, and reads the
  // interaction off the susceptibility (2 pi v m - h): both hold for isotropic exchange only. With
  // an XXZ anisotropy the q = 0 line is not pinned, and m deviates from h / (2 pi v) already
  // without the marginal interaction (the Luttinger parameter), so that estimate measures the
  // anisotropy (physics notes sections 4 and 6). A DM term along the field is handled below.
  const anisotropic = c.bonds.find((b) => Math.abs(b.jZ - b.jPerp) > 1e-9 * Math.max(1, Math.abs(b.jPerp)));
  if (anisotropic)
    branchReason = `the two-branch formulas need isotropic exchange; here Jz/J = ${Number((anisotropic.jZ / anisotropic.jPerp).toPrecision(4))} on the bond at offset ${anisotropic.offset}, so the q = 0 line is not pinned at the Zeeman energy, and 2 (2 pi v m - h) would measure the anisotropy rather than the interaction`;
  else if (gapless !== true) branchReason = "the two-branch theory needs the gapless phase; these couplings are outside it (see the region)";
  else if (m === null) branchReason = magnetization.reason;
  else if (m === 0) branchReason = "no magnetization at this field: the two branches meet at h = 0";
  else if (m >= 0.5) branchReason = "the chain is saturated: the response is a single magnon line";
  else {
    if (v !== null) {
      const ft = fieldTheorySplitting(hJ, v / J, m);
      alternatives.push({ method: "leading-order field theory, Delta = 2 (2 pi v m - h)", splittingMeV: ft.splitting * J, valid: ft.valid, note: ft.note });
      if (ft.valid) {
        splitting = ft.splitting * J;
        coupling = ft.g;
        method = "leading-order field theory, Delta = 2 (2 pi v m - h) (valid for m <= 0.05)";
      }
    }
    const ex = exact ? interpolateSplitting(exact, m) : null;
    if (exact && ex !== null) {
      alternatives.push({ method: `exact diagonalization, ${exact.sites}-site ring, spin-current pole, linear in m between ring values`, splittingMeV: ex, valid: true, note: "finite-ring value" });
      splitting = ex;
      method = `exact diagonalization, ${exact.sites}-site ring (spin-current pole), interpolated in m`;
      coupling = v !== null ? ex / (2 * Math.PI * v * m) : null;
    }
    if (splitting === null) branchReason = m > FIELD_THEORY_MAX_M ? `m = ${m.toFixed(3)} is beyond the field-theory range (m <= ${FIELD_THEORY_MAX_M}); run the exact check (--exact) for the splitting` : "the velocity is unknown; run the exact check (--exact)";
    else if (m > TWO_BRANCH_MAX_M) branchReason = null;
  }
  const branchesValid = splitting !== null && branchReason === null;

  // Curve for plots: velocity at the actual magnetization when known (Bethe dressed velocity).
  const vAtM = m !== null && xxzBethe && m > 0 && m < 0.5 ? xxzDressedVelocity(c.delta, m) * J : v;
  const curve: Predictions["curve"][number][] = [];
  if (branchesValid && vAtM !== null && m !== null && splitting !== null) {
    // Small q only: the lower branch reaches zero near q = h/v, where the description ends.
    const grid = Array.from({ length: 41 }, (_, i) => (i / 40) * Math.min(Math.PI, (0.8 * Math.abs(h)) / Math.max(1e-300, vAtM)));
    const bc = branchCurve(h, vAtM, splitting, m, grid);
    bc.q.forEach((q, i) =>
      curve.push({ qOverPi: q / Math.PI, lowerMeV: bc.lowerEnergy[i] ?? NaN, upperMeV: bc.upperEnergy[i] ?? NaN, lowerWeight: bc.lowerWeight[i] ?? NaN, upperWeight: bc.upperWeight[i] ?? NaN }),
    );
  }

  // Near saturation.
  let nearSaturation: Predictions["nearSaturation"];
  if (m === null || m < NEAR_SATURATION_MIN_M) {
    nearSaturation = { valid: false, reason: m === null ? magnetization.reason : `m = ${m.toFixed(3)} is below the near-saturation regime (m >= ${NEAR_SATURATION_MIN_M})`, upperAtZeroMeV: null, weight: null, method: "exact two-magnon problem", points: [] };
  } else if (m >= 0.5) {
    nearSaturation = { valid: false, reason: "saturated: no magnons are present to bind", upperAtZeroMeV: null, weight: null, method: "exact two-magnon problem", points: [] };
  } else {
    const qs = [0, 0.05, 0.1, 0.2].map((x) => x * Math.PI);
    const br = nearSaturationBranch(c.bonds, hJ, qs, 400);
    const at0 = br.points[0];
    nearSaturation = {
      valid: !!at0?.exists,
      reason: at0?.exists ? null : "no two-magnon state above the continuum at q = 0 (for example the XX chain: free fermions, no upper branch)",
      upperAtZeroMeV: at0?.exists && at0.energy !== null ? at0.energy * J : null,
      weight: br.weightStatement,
      method: "exact two-magnon problem above the polarized state, 400-site ring: w_upper(q) = E2(k0 + q) - E1(k0) + h",
      points: br.points.map((p) => ({ qOverPi: p.q / Math.PI, upperMeV: p.exists && p.energy !== null ? p.energy * J : null })),
    };
  }

  // DM doublet: the symmetric chain's branches at q = theta, tan theta = D/J.
  let doublet: Predictions["dmDoublet"] = null;
  if (c.dmMeV !== 0) {
    const base = { valid: false, lowerMeV: null, upperMeV: null, lowerWeightFraction: null, upperWeightFraction: null, naiveLowerMeV: null, naiveUpperMeV: null, naiveApplies: null };
    if (anisotropic) doublet = { ...base, reason: "needs isotropic symmetric exchange (the two branches of a Heisenberg chain)", method: "two-branch form at q = theta" };
    else if (v === null || m === null) doublet = { ...base, reason: "needs the velocity and the magnetization of the symmetric chain", method: "two-branch form at q = theta" };
    else {
      const s = splitting ?? 0;
      const d = dmDoublet(hJ, (vAtM ?? v) / J, s / J, c.dmMeV / J, 1, m);
      doublet = {
        valid: splitting !== null,
        reason: splitting === null ? "the splitting of the symmetric chain is unknown at this m (shown with Delta = 0)" : null,
        lowerMeV: d.lower.energy * J,
        upperMeV: d.upper.energy * J,
        lowerWeightFraction: d.lower.weightFraction,
        upperWeightFraction: d.upper.weightFraction,
        naiveLowerMeV: d.naive.lower * J,
        naiveUpperMeV: d.naive.upper * J,
        naiveApplies: d.naiveApplies,
        method: `two branches of the symmetric chain at q = theta, tan theta = D/J, ${splitting === null ? "with Delta = 0" : `Delta from ${method}`}`,
      };
    }
  }

  // Field sweep tables.
  const sweep: Predictions["sweep"][number][] = [];
  if (model.field.sweep) {
    const { fromT, toT, steps } = model.field.sweep;
    for (let i = 0; i < steps; i++) {
      const B = fromT + ((toT - fromT) * i) / (steps - 1);
      const hz = gAlong * MU_B_MEV_PER_T * B;
      let mm: number | null = null;
      let how = "unavailable";
      if (hz >= sat.hSat * J) {
        mm = 0.5;
        how = "saturated";
      } else if (xxzBethe) {
        mm = betheMagnetization(c.delta, hz / J).m;
        how = "Bethe ansatz";
      } else if (exact) {
        mm = ringMagnetization(exact, hz);
        how = `exact ${exact.sites}-site ring`;
      }
      let dd: number | null = null;
      let ddHow: string | null = null;
      if (mm !== null && mm > 0 && mm < 0.5 && gapless === true && !anisotropic) {
        const ex = exact ? interpolateSplitting(exact, mm) : null;
        if (ex !== null) {
          dd = ex;
          ddHow = `exact ${exact?.sites}-site ring`;
        } else if (mm <= FIELD_THEORY_MAX_M && v !== null) {
          dd = fieldTheorySplitting(hz / J, v / J, mm).splitting * J;
          ddHow = "field theory";
        }
      }
      sweep.push({ fieldT: B, zeemanMeV: hz, m: mm, splittingMeV: dd, method: how, splittingMethod: ddHow });
    }
  }

  const lowerAt0 = branchesValid ? twoBranches(h, v ?? 1, splitting ?? 0, 0).lower.energy : null;
  return {
    applicable: true,
    reason: null,
    couplings: c,
    zeemanMeV: h,
    magnetization,
    saturationMeV,
    saturationFieldT: (sat.hSat * J) / (gAlong * MU_B_MEV_PER_T),
    saturationMechanism: sat.mechanism,
    velocityMeV,
    branches: {
      valid: branchesValid,
      reason: branchReason,
      lowerAtZeroMeV: lowerAt0,
      upperAtZeroMeV: branchesValid && splitting !== null ? h + splitting : null,
      splittingMeV: branchesValid ? splitting : null,
      splittingOverZeeman: branchesValid && splitting !== null ? splitting / h : null,
      coupling: branchesValid ? coupling : null,
      method,
      alternatives,
    },
    nearSaturation,
    dmDoublet: doublet,
    regime,
    curve,
    sweep,
  };
}

export { xxzFieldForMagnetization };

/**
 * m(h) on a grid from 0 to 1.1 times the saturation field, by the same method as the file's own
 * magnetization (Bethe ansatz or the exact ring); null when neither applies. For plots.
 */
export function magnetizationCurve(p: Predictions, exact: ExactCalibration | null, points = 48): { zeemanMeV: number; m: number }[] | null {
  const c = p.couplings;
  const hs = p.saturationMeV.value;
  if (!c || hs === null) return null;
  const bethe = c.nearestOnly && c.delta > -1 && c.delta <= 1;
  if (!bethe && !exact) return null;
  const out: { zeemanMeV: number; m: number }[] = [];
  for (let i = 0; i <= points; i++) {
    const h = (1.1 * hs * i) / points;
    const m = h >= hs ? 0.5 : bethe ? betheMagnetization(c.delta, h / c.jMeV).m : ringMagnetization(exact as ExactCalibration, h);
    out.push({ zeemanMeV: h, m });
  }
  return out;
}
