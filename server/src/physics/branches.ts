// Closed-form two-branch transverse response near q = 0 of a gapless spin-1/2 chain in a field, its
// leading-order splitting, and the ESR doublet of a chain with uniform DM parallel to the field.
// Physics layer: pure functions of numbers. Units: h = g muB B, v, splitting and D in units of J
// (caller converts to meV); q in radians per lattice step, v in J times lattice spacing.
//
// Source: physics-notes sections 4 and 6 (our current-algebra derivation: mean field on the
// longitudinal part plus RPA on the spin-flip part, marginal coupling g, Delta = 2 pi v g m):
//   w_lower,upper(q) = h + Delta/2 -+ R(q),   R(q) = sqrt((v q)^2 + (Delta/2)^2),
//   weights W_lower,upper = m (1 +- s),       s = (Delta/2) / R(q)     (total 2 m, Larmor sum).
// With signed s the Larmor limit holds for either sign of Delta: at q = 0 the branch at h carries 2m.

export interface SpectralLine {
  /** Energy (units of J). */
  readonly energy: number;
  /** Fraction of the total transverse weight 2m carried by this line, (1 +- s)/2. */
  readonly weightFraction: number;
  /** Weight per site m (1 +- s) (null when no magnetization was given). */
  readonly weight: number | null;
}

export interface TwoBranchPoint {
  readonly q: number;
  readonly lower: SpectralLine;
  readonly upper: SpectralLine;
  /** s = (Delta/2)/sqrt((v q)^2 + (Delta/2)^2), in [-1, 1]. */
  readonly s: number;
  /**
   * v |q| < h: the description is a small-q one; the lower line h - v q reaches zero near
   * q = h/v (about 2 pi m, the soft incommensurate mode), beyond which it has no meaning.
   */
  readonly smallMomentum: boolean;
}

/**
 * Two branches at momentum q for field h, velocity v and splitting Delta (all in units of J).
 * Limits (follow from the formula): q = 0 gives lower = h with weight 2m and upper = h + Delta with
 * weight 0 when Delta > 0 (for Delta < 0 the roles swap: the line at h is then the upper one);
 * v q >> |Delta| gives h + Delta/2 -+ v q with equal weights m; Delta = 0 gives h -+ v q exactly.
 */
export function twoBranches(h: number, v: number, splitting: number, q: number, m?: number): TwoBranchPoint {
  for (const [name, value] of [["h", h], ["v", v], ["Delta", splitting], ["q", q]] as const) {
    if (!Number.isFinite(value)) throw new RangeError(`${name} must be finite, got ${value}`);
  }
  const halfSplitting = splitting / 2;
  const radius = Math.hypot(v * q, halfSplitting);
  // At Delta = 0 and q = 0 the two lines coincide at h; s is then undefined and either split of
  // the weight is correct. We take s = 1 (all weight on the "lower" line) for continuity in Delta > 0.
  const s = radius === 0 ? 1 : halfSplitting / radius;
  const line = (energy: number, sign: 1 | -1): SpectralLine => ({
    energy,
    weightFraction: (1 + sign * s) / 2,
    weight: m === undefined ? null : m * (1 + sign * s),
  });
  return {
    q,
    lower: line(h + halfSplitting - radius, 1),
    upper: line(h + halfSplitting + radius, -1),
    s,
    smallMomentum: Math.abs(v * q) < Math.abs(h),
  };
}

export interface SplittingEstimate {
  /** Leading-order splitting Delta ~ 2 (2 pi v m - h) (units of J). */
  readonly splitting: number;
  /** Dimensionless marginal coupling g = 2 (1 - h / (2 pi v m)) at the field scale. */
  readonly g: number;
  /** True for 0 < m <= 0.05, where the estimate was found within about 10% of exact numerics. */
  readonly valid: boolean;
  readonly note: string;
}

/**
 * Leading-order splitting from the exact magnetization curve (physics-notes section 6): the same
 * mean field gives m = h / (2 pi v (1 - g/2)), so g = 2 (1 - h / (2 pi v m)) and
 * Delta = 2 pi v g m = 2 (2 pi v m - h). Beyond m of about 0.05 band curvature matters as much as g
 * and the estimate fails (40% or worse at m = 1/8 on 24-site rings, physics-notes section 6).
 */
export function fieldTheorySplitting(h: number, v: number, m: number): SplittingEstimate {
  if (!(v > 0) || !(m > 0) || !Number.isFinite(h)) {
    return { splitting: NaN, g: NaN, valid: false, note: "needs v > 0, m > 0 and a finite field" };
  }
  const g = 2 * (1 - h / (2 * Math.PI * v * m));
  const valid = m <= 0.05;
  return {
    splitting: 2 * Math.PI * v * g * m,
    g,
    valid,
    note: valid
      ? "leading order in g; gapless phase, SU(2) or U(1) about the field, h << J"
      : "m > 0.05: leading-order estimate not reliable; take the splitting from exact numerics",
  };
}

export interface DmDoublet {
  /** tan(theta) = D / J: the q = 0 response maps to the symmetric chain at q = theta. */
  readonly theta: number;
  readonly lower: SpectralLine;
  readonly upper: SpectralLine;
  /** Textbook Heisenberg doublet h -+ (pi/2) D, for comparison. */
  readonly naive: { readonly lower: number; readonly upper: number };
  /** h -+ v theta: the two-branch form with Delta = 0 (reduces to naive for v = pi J/2, small D). */
  readonly noSplitting: { readonly lower: number; readonly upper: number };
  /** |Delta| / (v |theta|): the naive form needs this small. */
  readonly splittingRatio: number;
  /** True when |Delta| <= 0.2 v |theta| (our threshold: the Delta/2 shift stays below 10% of v theta). */
  readonly naiveApplies: boolean;
}

/**
 * ESR doublet of a chain with uniform DM vector D parallel to the field (physics-notes section 4):
 * the rotation about the field axis by theta per site, tan(theta) = D/J, removes the DM term (up to
 * an XXZ anisotropy of order (D/J)^2, to be absorbed in v) and turns q = 0 into q = theta, so the
 * lines are the two branches of twoBranches at q = theta. h, v, Delta, D, J in one energy unit.
 */
export function dmDoublet(h: number, v: number, splitting: number, D: number, J: number, m?: number): DmDoublet {
  if (!(J !== 0) || !Number.isFinite(J)) throw new RangeError(`J must be finite and non-zero, got ${J}`);
  const theta = Math.atan(D / J);
  const point = twoBranches(h, v, splitting, theta, m);
  const vTheta = v * Math.abs(theta);
  const ratio = vTheta === 0 ? (splitting === 0 ? 0 : Infinity) : Math.abs(splitting) / vTheta;
  return {
    theta,
    lower: point.lower,
    upper: point.upper,
    naive: { lower: h - (Math.PI / 2) * Math.abs(D), upper: h + (Math.PI / 2) * Math.abs(D) },
    noSplitting: { lower: h - vTheta, upper: h + vTheta },
    splittingRatio: ratio,
    naiveApplies: ratio <= NAIVE_RATIO,
  };
}

/** Our threshold for the naive doublet (see DmDoublet.naiveApplies). */
const NAIVE_RATIO = 0.2;

export interface BranchCurve {
  readonly q: readonly number[];
  readonly lowerEnergy: readonly number[];
  readonly upperEnergy: readonly number[];
  /** Weights per site m (1 +- s). */
  readonly lowerWeight: readonly number[];
  readonly upperWeight: readonly number[];
}

/** Both branches sampled on a momentum grid, for plotting. */
export function branchCurve(h: number, v: number, splitting: number, m: number, qGrid: readonly number[]): BranchCurve {
  const points = qGrid.map((q) => twoBranches(h, v, splitting, q, m));
  return {
    q: points.map((p) => p.q),
    lowerEnergy: points.map((p) => p.lower.energy),
    upperEnergy: points.map((p) => p.upper.energy),
    lowerWeight: points.map((p) => p.lower.weight ?? NaN),
    upperWeight: points.map((p) => p.upper.weight ?? NaN),
  };
}
