// Zero-temperature magnetization curve, velocities and susceptibility of the spin-1/2 XXZ chain
// (-1 < Delta <= 1) from the Bethe-ansatz linear integral equations. Physics layer: pure functions.
// Units: H = J sum (Sx Sx + Sy Sy + Delta Sz Sz) - h sum Sz with J = 1 (J > 0 antiferromagnetic);
// every energy and field is in units of J, m = <Sz_tot>/N per site (saturation 1/2). Caller converts to meV.
//
// Equations (Griffiths, Phys. Rev. 133, A768 (1964); Takahashi, Thermodynamics of one-dimensional
// solvable models (1999)). Down spins over the fully polarized state are magnons with rapidity
// lambda. Gapless regime Delta = cos(gamma), 0 < gamma < pi:
//   e^{ik} = sinh(lambda + i gamma/2) / sinh(lambda - i gamma/2),
//   bare magnon energy  eps0(lambda) = h + J (cos k - Delta) = h - pi J sin(gamma) a1(lambda),
//   a_n(lambda) = (1/pi) sin(n gamma) / (cosh 2 lambda - cos n gamma)
//               = sin(n gamma) / (2 pi (sinh^2 lambda + sin^2(n gamma / 2)))   (no cancellation near gamma -> 0),
// and at Delta = 1 the rational limit e^{ik} = (x + i/2)/(x - i/2), eps0(x) = h - pi J a1(x),
// a_n(x) = (1/pi) (n/2) / (x^2 + n^2/4). In both cases int a_1 = 1 - gamma/pi (rational: 1).
// The ground state fills [-B, B] with rapidities; with K(lambda) = -a2(lambda) the equations are
//   rho(l) + int_{-B}^{B} a2(l - u) rho(u) du = a1(l)          (root density, m = 1/2 - int rho,
//                                                               evaluated without cancellation below)
//   eps(l) + int_{-B}^{B} a2(l - u) eps(u) du = eps0(l),        eps(+-B) = 0 fixes h.
// Because eps0 = h * 1 - E a1 (E = pi J sin gamma, or pi J when rational), linearity gives
//   eps = h Z - E rho,   Z + a2 * Z = 1   (Z is the dressed charge),
// so the field belonging to a Fermi rapidity B is explicit: h(B) = E rho(B) / Z(B). We solve the two
// equations by Gauss-Legendre Nystrom on [0, B] (the solutions are even) and invert h(B) or m(B)
// by Brent's method in B. Dressed velocity v = eps'(B) / (2 pi rho(B)); susceptibility
// dm/dh = Z(B)^2 / (pi v) (derivation at xxzSusceptibility).

/** Which route produced a number (kept in results so the analysis can say how it was obtained). */
export type BetheMethod =
  | "bethe-ansatz nystrom"
  | "zero field (spin-flip symmetry)"
  | "saturated (exact one-magnon threshold)"
  | "small-field linear extrapolation";

export interface XxzMagnetizationResult {
  /** Magnetization per site, units of hbar (saturation 1/2). */
  readonly m: number;
  readonly method: BetheMethod;
  /** True when two quadrature orders agree in m to 1e-9 or better (or the value is exact). */
  readonly converged: boolean;
  /** |m(order 1) - m(order 2)|: the quadrature error estimate (0 for exact values). */
  readonly quadratureDifference: number;
  /** Fermi rapidity B (Infinity at h = 0, 0 at saturation). */
  readonly fermiRapidity: number;
  /** Gauss-Legendre nodes on [0, B] used for the returned value. */
  readonly nodeCount: number;
}

export interface XxzFieldResult {
  /** Field h = g muB B in units of J. */
  readonly h: number;
  readonly method: BetheMethod;
  readonly converged: boolean;
  readonly quadratureDifference: number;
  readonly fermiRapidity: number;
}

/** Field of the exact one-magnon instability of the polarized state: h_sat = J (1 + Delta). */
export function xxzSaturationField(delta: number): number {
  // One flipped spin above the polarized state has E1(k) = J (cos k - Delta) (magnons.ts); its
  // minimum -J (1 + Delta) at k = pi crosses zero at h = J (1 + Delta). For -1 < Delta <= 1 the
  // Bethe solution confirms it: h(B -> 0) = E a1(0) = 1 + Delta.
  checkDelta(delta);
  return 1 + delta;
}

/**
 * Spinon velocity at zero field in units of J a: v = (pi/2) sin(gamma)/gamma, Delta = cos(gamma)
 * (Takahashi 1999; at Delta = 1 the limit pi/2 is des Cloizeaux & Pearson, Phys. Rev. 128, 2131
 * (1962)). Derivation: at B = infinity rho(l) = 1/(2 gamma cosh(pi l / gamma)) by Fourier transform,
 * eps = -E rho, so eps'/(2 pi rho) -> (pi/2) sin(gamma)/gamma as l -> infinity.
 */
export function xxzVelocity(delta: number): number {
  checkDelta(delta);
  if (delta === 1) return Math.PI / 2;
  const gamma = Math.acos(delta);
  return ((Math.PI / 2) * Math.sin(gamma)) / gamma;
}

/** Magnetization m(h) at T = 0 (h in units of J, any sign). */
export function xxzMagnetization(delta: number, h: number): XxzMagnetizationResult {
  const kernels = makeKernels(delta);
  if (!Number.isFinite(h)) throw new RangeError(`field must be finite, got ${h}`);
  const sign = h < 0 ? -1 : 1;
  const hAbs = Math.abs(h);
  const hSat = 1 + delta;
  if (hAbs === 0) {
    return exactM(0, "zero field (spin-flip symmetry)", Infinity);
  }
  if (hAbs >= hSat) {
    return exactM(sign * 0.5, "saturated (exact one-magnon threshold)", 0);
  }
  if (hAbs < SMALL_FIELD_RATIO * hSat) {
    // Below 1e-12 h_sat the Fermi rapidity is so large that rho(B) loses its relative accuracy;
    // m = chi h with chi taken at the floor is a linear extrapolation (at Delta = 1, where chi keeps
    // falling logarithmically toward 1/pi^2, it is slightly too large), flagged as not converged.
    const floor = SMALL_FIELD_RATIO * hSat;
    const chi = xxzSusceptibility(delta, floor).chi;
    return { ...exactM(sign * chi * hAbs, "small-field linear extrapolation", Infinity), converged: false };
  }
  const logTarget = Math.log(hAbs);
  const fieldMismatch = (level: number) => (B: number) =>
    B === 0 ? Math.log(hSat) - logTarget : Math.log(fieldAtRapidity(solveAtRapidity(kernels, B, level))) - logTarget;

  const f1 = fieldMismatch(1);
  const bracketHigh = bracketDecreasing(f1, initialRapidityGuess(kernels, hAbs / hSat));
  const B1 = brent(f1, 0, Math.log(hSat) - logTarget, bracketHigh.x, bracketHigh.f, 1e-14);
  const s1 = solveAtRapidity(kernels, B1, 1);
  const m1 = magnetizationFromSolution(s1);

  const f2 = fieldMismatch(QUADRATURE_LEVEL_2);
  const B2 = refineRoot(f2, B1, kernels.width);
  const s2 = solveAtRapidity(kernels, B2, QUADRATURE_LEVEL_2);
  const m2 = magnetizationFromSolution(s2);
  const difference = Math.abs(m2 - m1);
  return {
    m: sign * m2,
    method: "bethe-ansatz nystrom",
    converged: difference < CONVERGENCE_TOLERANCE,
    quadratureDifference: difference,
    fermiRapidity: B2,
    nodeCount: s2.nodes.length,
  };
}

/** Field h(m) at which the T = 0 magnetization per site is m (0 <= |m| <= 1/2). */
export function xxzFieldForMagnetization(delta: number, m: number): XxzFieldResult {
  const kernels = makeKernels(delta);
  if (!Number.isFinite(m) || Math.abs(m) > 0.5) throw new RangeError(`m must lie in [-1/2, 1/2], got ${m}`);
  const sign = m < 0 ? -1 : 1;
  const mAbs = Math.abs(m);
  if (mAbs === 0) return exactH(0, "zero field (spin-flip symmetry)", Infinity);
  if (mAbs === 0.5) return exactH(sign * (1 + delta), "saturated (exact one-magnon threshold)", 0);
  if (mAbs < SMALL_MAGNETIZATION) {
    // Same floor as in xxzMagnetization: linear extrapolation h = m / chi, flagged as not converged.
    const floorField = xxzFieldForMagnetization(delta, SMALL_MAGNETIZATION).h;
    const chi = xxzSusceptibility(delta, floorField).chi;
    return { ...exactH(sign * (mAbs / chi), "small-field linear extrapolation", Infinity), converged: false };
  }
  const B1 = rapidityForMagnetization(kernels, mAbs, 1, null);
  const h1 = fieldAtRapidity(solveAtRapidity(kernels, B1, 1));
  const B2 = rapidityForMagnetization(kernels, mAbs, QUADRATURE_LEVEL_2, B1);
  const h2 = fieldAtRapidity(solveAtRapidity(kernels, B2, QUADRATURE_LEVEL_2));
  const difference = Math.abs(h2 - h1);
  return {
    h: sign * h2,
    method: "bethe-ansatz nystrom",
    converged: difference < CONVERGENCE_TOLERANCE,
    quadratureDifference: difference,
    fermiRapidity: B2,
  };
}

/**
 * Dressed (Fermi-point) velocity v(m) = eps'(B) / (2 pi rho(B)) in units of J a: the slope
 * d eps / dk of the dressed magnon band at the Fermi point, since dk/dlambda = 2 pi rho.
 * Limits: xxzVelocity(delta) at m = 0, and 0 at saturation (band bottom).
 */
export function xxzDressedVelocity(delta: number, m: number): number {
  const kernels = makeKernels(delta);
  const mAbs = Math.abs(m);
  if (!(mAbs <= 0.5)) throw new RangeError(`m must lie in [-1/2, 1/2], got ${m}`);
  if (mAbs === 0) return xxzVelocity(delta);
  if (mAbs === 0.5) return 0;
  // Below m = 1e-12 the value at m = 1e-12 is returned (see SMALL_MAGNETIZATION).
  const B = rapidityForMagnetization(kernels, Math.max(mAbs, SMALL_MAGNETIZATION), QUADRATURE_LEVEL_2, null);
  const s = solveAtRapidity(kernels, B, QUADRATURE_LEVEL_2);
  return fermiVelocity(s, fieldAtRapidity(s));
}

export interface XxzSusceptibilityResult {
  /** dm/dh per site in units of 1/J (g muB = 1). */
  readonly chi: number;
  readonly m: number;
  /** Dressed charge Z(B) at the Fermi point. */
  readonly dressedCharge: number;
  /** Dressed velocity at the Fermi point (units of J a). */
  readonly velocity: number;
  readonly method: "dressed charge" | "zero-field limit (closed form)" | "saturated";
}

/**
 * Differential susceptibility dm/dh at field h (units 1/J per site).
 * Derivation (follows from the equations above): d eps(l)/dh = Z(l) because eps(+-B) = 0 kills
 * the boundary terms; eps(B(h)) = 0 then gives dB/dh = -Z(B)/eps'(B). For the density, dn/dB =
 * 2 rho(B) Z(B) (same resolvent identity). Hence dm/dh = 2 Z^2 rho(B)/eps'(B) = Z(B)^2/(pi v).
 * Zero-field limit chi = gamma / (pi (pi - gamma) sin gamma) (Takahashi 1999, from memory; it equals
 * 1/pi at Delta = 0, free fermions, and 1/pi^2 at Delta = 1, Griffiths 1964, i.e. 1/(2 pi v) there).
 * Above saturation chi = 0; at h -> h_sat it diverges like 1/(pi sqrt(2 (h_sat - h))).
 */
export function xxzSusceptibility(delta: number, h: number): XxzSusceptibilityResult {
  const kernels = makeKernels(delta);
  const hAbs = Math.abs(h);
  if (hAbs === 0) {
    const chi = delta === 1 ? 1 / (Math.PI * Math.PI) : zeroFieldSusceptibilityClosedForm(kernels.gamma);
    return { chi, m: 0, dressedCharge: NaN, velocity: xxzVelocity(delta), method: "zero-field limit (closed form)" };
  }
  if (hAbs >= 1 + delta) {
    return {
      chi: hAbs === 1 + delta ? Infinity : 0,
      m: Math.sign(h) * 0.5,
      dressedCharge: 1,
      velocity: 0,
      method: "saturated",
    };
  }
  // Below the small-field floor the value at the floor is returned (see SMALL_FIELD_RATIO).
  const hEvaluated = Math.max(hAbs, SMALL_FIELD_RATIO * (1 + delta));
  const result = xxzMagnetization(delta, hEvaluated);
  const s = solveAtRapidity(kernels, result.fermiRapidity, QUADRATURE_LEVEL_2);
  const z = evaluateAt(s, s.B, "z");
  const v = fermiVelocity(s, hEvaluated);
  return {
    chi: (z * z) / (Math.PI * v),
    m: Math.sign(h) * xxzMagnetization(delta, hAbs).m,
    dressedCharge: z,
    velocity: v,
    method: "dressed charge",
  };
}

/**
 * Ground-state energy per site e(h) in units of J, Zeeman term included:
 *   e = J Delta / 4 - h / 2 + int_{-B}^{B} eps0(l) rho(l) dl
 * (polarized-state energy plus the bare energies of the down spins). At h = 0 it uses the B = infinity
 * density rho = 1/(2 gamma cosh(pi l / gamma)) (rational: 1/(2 cosh(pi x))). Exposed so the
 * thermodynamic identity m = -de/dh can be checked against m from the density.
 */
export function xxzGroundStateEnergy(delta: number, h: number): number {
  const kernels = makeKernels(delta);
  const hAbs = Math.abs(h);
  if (hAbs >= 1 + delta) return delta / 4 - hAbs / 2;
  if (hAbs === 0) return delta / 4 - zeroFieldMagnonEnergy(kernels);
  if (hAbs < SMALL_FIELD_RATIO * (1 + delta)) {
    // e(h) = e(0) - chi h^2 / 2 + ..., and chi h^2 is below 1e-24 here.
    return delta / 4 - zeroFieldMagnonEnergy(kernels) - (xxzSusceptibility(delta, hAbs).chi * hAbs * hAbs) / 2;
  }
  const B = xxzMagnetization(delta, hAbs).fermiRapidity;
  const s = solveAtRapidity(kernels, B, QUADRATURE_LEVEL_2);
  let integral = 0;
  for (let j = 0; j < s.nodes.length; j++) {
    const x = s.nodes[j] ?? 0;
    integral += 2 * (s.weights[j] ?? 0) * (hAbs - kernels.energyScale * kernels.a1(x)) * (s.rho[j] ?? 0);
  }
  return delta / 4 - hAbs / 2 + integral;
}

// ---------------------------------------------------------------------------------------------
// Internals

/** Second quadrature level (node multiplier) used for the convergence check and returned values. */
const QUADRATURE_LEVEL_2 = 1.6;
const CONVERGENCE_TOLERANCE = 1e-9;
/** Fields below this fraction of h_sat (and m below SMALL_MAGNETIZATION) are extrapolated linearly. */
const SMALL_FIELD_RATIO = 1e-12;
const SMALL_MAGNETIZATION = 1e-12;
/** Cap on Gauss-Legendre nodes (reached only for Delta close to -1 at very small fields). */
const MAX_NODES = 900;

interface Kernels {
  readonly rational: boolean;
  readonly gamma: number;
  /** E in eps0 = h - E a1: pi J sin(gamma), or pi J in the rational case. */
  readonly energyScale: number;
  /** Distance from the real axis of the nearest singularity of a1, a2 (sets the node density). */
  readonly width: number;
  /** Nodes per (B / width) at quadrature level 1 (see nodeCount). */
  readonly nodeDensity: number;
  /** Decay rate of rho at B = infinity: rho ~ exp(-decay * l). */
  readonly decay: number;
  /** Dressed charge of the infinite interval, 1/(1 + int a2) = pi/(2 (pi - gamma)) (rational: 1/2). */
  readonly chargeInfinity: number;
  /** theta_n(infinity) - theta_n(x) for x >= 0, with theta_n' = 2 pi a_n (no cancellation at large x). */
  tailPhase(n: number, x: number): number;
  a1(x: number): number;
  a1Prime(x: number): number;
  a2(x: number): number;
  a2Prime(x: number): number;
}

function checkDelta(delta: number): void {
  if (!Number.isFinite(delta) || !(delta > -1 && delta <= 1)) {
    throw new RangeError(`XXZ Bethe solution implemented for -1 < Delta <= 1 (gapless regime), got ${delta}`);
  }
}

function makeKernels(delta: number): Kernels {
  checkDelta(delta);
  if (delta === 1) {
    const an = (n: number) => (x: number) => n / 2 / (Math.PI * (x * x + (n * n) / 4));
    const anPrime = (n: number) => (x: number) => {
      const q = x * x + (n * n) / 4;
      return (-n * x) / (Math.PI * q * q);
    };
    return {
      rational: true,
      gamma: 0,
      energyScale: Math.PI,
      // Poles of a1 at +-i/2 and of a2 at +-i.
      width: 0.5,
      nodeDensity: 2.2,
      decay: Math.PI,
      chargeInfinity: 0.5,
      // theta_n(x) = 2 atan(2x/n), so theta_n(inf) - theta_n(x) = 2 atan2(n/2, x).
      tailPhase: (n: number, x: number) => 2 * Math.atan2(n / 2, x),
      a1: an(1),
      a1Prime: anPrime(1),
      a2: an(2),
      a2Prime: anPrime(2),
    };
  }
  const gamma = Math.acos(delta);
  const an = (n: number) => {
    const sinN = Math.sin(n * gamma);
    const half = Math.sin((n * gamma) / 2) ** 2;
    return (x: number) => sinN / (2 * Math.PI * (Math.sinh(x) ** 2 + half));
  };
  const anPrime = (n: number) => {
    const sinN = Math.sin(n * gamma);
    const half = Math.sin((n * gamma) / 2) ** 2;
    return (x: number) => {
      const q = Math.sinh(x) ** 2 + half;
      return (-sinN * Math.sinh(2 * x)) / (2 * Math.PI * q * q);
    };
  };
  return {
    rational: false,
    gamma,
    energyScale: Math.PI * Math.sin(gamma),
    // a1 has poles at +-i gamma/2, a2 at +-i gamma and +-i (pi - gamma).
    width: Math.min(gamma / 2, Math.PI - gamma),
    nodeDensity: delta >= 0 ? 2.2 : 2.2 + 6 * Math.abs(delta),
    decay: Math.PI / gamma,
    chargeInfinity: Math.PI / (2 * (Math.PI - gamma)),
    // theta_n(x) = 2 atan(c tanh x), c = cot(n gamma / 2); for x >= 0 the difference of the two
    // arctangents is atan(c (1 - tanh x) / (1 + c^2 tanh x)), with 1 - tanh x = 2 / (e^{2x} + 1).
    tailPhase: (n: number, x: number) => {
      const c = 1 / Math.tan((n * gamma) / 2);
      const t = Math.tanh(x);
      return 2 * Math.atan2(c * (2 / (Math.exp(2 * x) + 1)), 1 + c * c * t);
    },
    a1: an(1),
    a1Prime: anPrime(1),
    a2: an(2),
    a2Prime: anPrime(2),
  };
}

function zeroFieldSusceptibilityClosedForm(gamma: number): number {
  return gamma / (Math.PI * (Math.PI - gamma) * Math.sin(gamma));
}

interface RapiditySolution {
  readonly kernels: Kernels;
  readonly B: number;
  readonly nodes: Float64Array;
  readonly weights: Float64Array;
  readonly rho: Float64Array;
  readonly z: Float64Array;
  /** u = Z_infinity - Z on the nodes, solved for directly (see magnetizationFromSolution). */
  readonly chargeDeficit: Float64Array;
}

/**
 * Node count on [0, B]. Gauss-Legendre converges geometrically with a rate set by the ratio of the
 * analyticity strip to the interval, so the count grows linearly with B / width. For Delta < 0 the
 * density decays more slowly than a1 (rate pi/gamma < 2) and the narrow negative kernel must be
 * resolved across the whole interval, which needs more nodes. The constants were chosen by
 * comparing orders (every result reports the difference between two levels).
 */
function nodeCount(B: number, kernels: Kernels, level: number): number {
  return Math.min(MAX_NODES, Math.ceil((14 + kernels.nodeDensity * (B / kernels.width)) * level));
}

function solveAtRapidity(kernels: Kernels, B: number, level: number): RapiditySolution {
  const n = nodeCount(B, kernels, level);
  const rule = gaussLegendre(n);
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  const rootWeights = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    nodes[i] = 0.5 * B * ((rule.x[i] ?? 0) + 1);
    weights[i] = 0.5 * B * (rule.w[i] ?? 0);
    rootWeights[i] = Math.sqrt(weights[i] ?? 0);
  }
  // Even solutions: int_{-B}^{B} a2(l - u) f(u) du = int_0^B [a2(l - u) + a2(l + u)] f(u) du.
  // Scaling by sqrt(w) makes the Nystrom matrix symmetric, S (1 + K) S^-1 with S = diag(sqrt w);
  // it is positive definite because 1 + a2 is a positive operator (its Fourier transform
  // 2 sinh((pi - gamma) w / 2) cosh(gamma w / 2) / sinh(pi w / 2) > 0), so Cholesky applies.
  const matrix = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const xi = nodes[i] ?? 0;
    const si = rootWeights[i] ?? 0;
    for (let j = 0; j <= i; j++) {
      const xj = nodes[j] ?? 0;
      const value = si * (rootWeights[j] ?? 0) * (kernels.a2(xi - xj) + kernels.a2(xi + xj)) + (i === j ? 1 : 0);
      matrix[i * n + j] = value;
      matrix[j * n + i] = value;
    }
  }
  const rho = new Float64Array(n);
  const z = new Float64Array(n);
  const chargeDeficit = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = nodes[i] ?? 0;
    const si = rootWeights[i] ?? 0;
    rho[i] = si * kernels.a1(x);
    z[i] = si;
    // (1 + K_B) u = -Z_inf T(l), T(l) = int_{|u| > B} a2(l - u) du (derivation at magnetizationFromSolution).
    const tail = (kernels.tailPhase(2, B - x) + kernels.tailPhase(2, B + x)) / (2 * Math.PI);
    chargeDeficit[i] = -si * kernels.chargeInfinity * tail;
  }
  choleskySolveInPlace(matrix, n, [rho, z, chargeDeficit]);
  for (let i = 0; i < n; i++) {
    const si = rootWeights[i] ?? 1;
    rho[i] = (rho[i] ?? 0) / si;
    z[i] = (z[i] ?? 0) / si;
    chargeDeficit[i] = (chargeDeficit[i] ?? 0) / si;
  }
  return { kernels, B, nodes, weights, rho, z, chargeDeficit };
}

/** Nystrom interpolation of rho or Z (or their derivatives) at any rapidity. */
function evaluateAt(s: RapiditySolution, x: number, which: "rho" | "z", derivative = false): number {
  const k = s.kernels;
  const values = which === "rho" ? s.rho : s.z;
  let result = which === "rho" ? (derivative ? k.a1Prime(x) : k.a1(x)) : derivative ? 0 : 1;
  for (let j = 0; j < s.nodes.length; j++) {
    const u = s.nodes[j] ?? 0;
    const kernel = derivative ? k.a2Prime(x - u) + k.a2Prime(x + u) : k.a2(x - u) + k.a2(x + u);
    result -= (s.weights[j] ?? 0) * kernel * (values[j] ?? 0);
  }
  return result;
}

/** h(B) = E rho(B) / Z(B), from eps(B) = h Z(B) - E rho(B) = 0. */
function fieldAtRapidity(s: RapiditySolution): number {
  return (s.kernels.energyScale * evaluateAt(s, s.B, "rho")) / evaluateAt(s, s.B, "z");
}

/**
 * m = 1/2 - int_{-B}^{B} rho without the cancellation of two numbers near 1/2 (which would cost all
 * relative accuracy at small m). Derivation (ours, from the equations in the header): by symmetry of
 * the resolvent, int rho = <a1, Z>_B. With Z_inf = 1/(1 + int a2) and u = Z_inf - Z,
 *   (1 + K_B) u = Z_inf (1 + int_{-B}^{B} a2(l - u') du') - 1 = -Z_inf T(l),
 *   T(l) = int_{|u'| > B} a2(l - u') du' = [tail2(B - l) + tail2(B + l)] / (2 pi),
 * and since Z_inf int a1 = 1/2 over the whole line,
 *   m = Z_inf int_{|l| > B} a1 + <a1, u>_B = Z_inf tail1(B) / pi + 2 sum_j w_j a1(l_j) u_j,
 * where tail_n(x) = theta_n(inf) - theta_n(x). Both terms are O(m) and computed directly.
 */
function magnetizationFromSolution(s: RapiditySolution): number {
  const k = s.kernels;
  let total = (k.chargeInfinity * k.tailPhase(1, s.B)) / Math.PI;
  for (let j = 0; j < s.nodes.length; j++) total += 2 * (s.weights[j] ?? 0) * k.a1(s.nodes[j] ?? 0) * (s.chargeDeficit[j] ?? 0);
  return total;
}

/** v = eps'(B) / (2 pi rho(B)), eps = h Z - E rho. */
function fermiVelocity(s: RapiditySolution, h: number): number {
  const epsPrime = h * evaluateAt(s, s.B, "z", true) - s.kernels.energyScale * evaluateAt(s, s.B, "rho", true);
  return epsPrime / (2 * Math.PI * evaluateAt(s, s.B, "rho"));
}

function magnetizationAtRapidity(kernels: Kernels, B: number, level: number): number {
  if (B === 0) return 0.5;
  return magnetizationFromSolution(solveAtRapidity(kernels, B, level));
}

function rapidityForMagnetization(kernels: Kernels, m: number, level: number, near: number | null): number {
  // m(B) falls from 1/2 at B = 0 to 0 as B -> infinity; log m is close to linear at large B.
  const logTarget = Math.log(m);
  const f = (B: number) => {
    const value = magnetizationAtRapidity(kernels, B, level);
    return value > 0 ? Math.log(value) - logTarget : -Infinity;
  };
  if (near !== null) return refineRoot(f, near, kernels.width);
  const high = bracketDecreasing(f, initialRapidityGuess(kernels, m));
  return brent(f, 0, Math.log(0.5) - logTarget, high.x, high.f, 1e-14);
}

/** Rough B for a small ratio r = h/h_sat (or m): B ~ ln(1/r)/decay, plus one kernel width. */
function initialRapidityGuess(kernels: Kernels, ratio: number): number {
  return Math.max(kernels.width, Math.log(4 / ratio) / kernels.decay + kernels.width);
}

/** Finds x > 0 with f(x) < 0 for a function decreasing from f(0) > 0. */
function bracketDecreasing(f: (x: number) => number, start: number): { x: number; f: number } {
  let x = start;
  let value = f(x);
  for (let i = 0; i < 60 && value >= 0; i++) {
    x *= 1.5;
    value = f(x);
  }
  if (value >= 0) throw new Error("Bethe solver: could not bracket the Fermi rapidity");
  return { x, f: value };
}

/** Root near a previous estimate (from a lower quadrature order): tight bracket, then Brent. */
function refineRoot(f: (x: number) => number, near: number, scale: number): number {
  for (let widen = 1e-6; widen < 10; widen *= 10) {
    const lo = Math.max(0, near - widen * (near + scale));
    const hi = near + widen * (near + scale);
    const flo = f(lo);
    const fhi = f(hi);
    if (flo >= 0 && fhi <= 0) return brent(f, lo, flo, hi, fhi, 1e-14);
  }
  throw new Error("Bethe solver: quadrature orders disagree on the Fermi rapidity");
}

/**
 * Brent's method (standard numerical practice): inverse quadratic interpolation with bisection
 * safeguards. Needs f(a), f(b) of opposite sign (or zero).
 */
export function brent(f: (x: number) => number, a0: number, fa0: number, b0: number, fb0: number, relTol: number): number {
  let a = a0;
  let b = b0;
  let fa = fa0;
  let fb = fb0;
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (fa * fb > 0) throw new Error("brent: root not bracketed");
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iteration = 0; iteration < 200; iteration++) {
    if (fb * fc > 0) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + 0.5 * relTol * Math.max(Math.abs(b), 1e-300);
    const half = 0.5 * (c - b);
    if (Math.abs(half) <= tol || fb === 0) return b;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * half * s;
        q = 1 - s;
      } else {
        const qa = fa / fc;
        const r = fb / fc;
        p = s * (2 * half * qa * (qa - r) - (b - a) * (r - 1));
        q = (qa - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * half * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = half;
        e = d;
      }
    } else {
      d = half;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : half > 0 ? tol : -tol;
    fb = f(b);
  }
  return b;
}

/** int_{-inf}^{inf} E a1(l) rho_inf(l) dl at h = 0 (panelled Gauss-Legendre on [0, L]). */
function zeroFieldMagnonEnergy(k: Kernels): number {
  const rhoInfinity = k.rational
    ? (x: number) => 1 / (2 * Math.cosh(Math.PI * x))
    : (x: number) => 1 / (2 * k.gamma * Math.cosh((Math.PI * x) / k.gamma));
  // The integrand decays at least like exp(-decay * l); stop where it is below 1e-18.
  const length = 42 / k.decay;
  const panelWidth = Math.min(k.width, length / 8);
  const panels = Math.ceil(length / panelWidth);
  const rule = gaussLegendre(16);
  let total = 0;
  for (let p = 0; p < panels; p++) {
    const lo = p * panelWidth;
    for (let i = 0; i < rule.x.length; i++) {
      const x = lo + 0.5 * panelWidth * ((rule.x[i] ?? 0) + 1);
      total += 0.5 * panelWidth * (rule.w[i] ?? 0) * k.a1(x) * rhoInfinity(x);
    }
  }
  return 2 * k.energyScale * total;
}

const gaussLegendreCache = new Map<number, { x: Float64Array; w: Float64Array }>();

/** Gauss-Legendre nodes and weights on [-1, 1] (Newton iteration on the three-term recurrence). */
export function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const cached = gaussLegendreCache.get(n);
  if (cached) return cached;
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  const half = Math.floor((n + 1) / 2);
  for (let i = 0; i < half; i++) {
    let t = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let derivative = 1;
    for (let iteration = 0; iteration < 100; iteration++) {
      let p0 = 1;
      let p1 = t;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * t * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      derivative = (n * (t * p1 - p0)) / (t * t - 1);
      const step = p1 / derivative;
      t -= step;
      if (Math.abs(step) < 1e-16) break;
    }
    const weight = 2 / ((1 - t * t) * derivative * derivative);
    x[i] = -t;
    x[n - 1 - i] = t;
    w[i] = weight;
    w[n - 1 - i] = weight;
  }
  const rule = { x, w };
  gaussLegendreCache.set(n, rule);
  return rule;
}

/** Cholesky factorization A = L L^T (lower triangle overwritten) and solves for each right-hand side. */
function choleskySolveInPlace(a: Float64Array, n: number, rhs: Float64Array[]): void {
  for (let j = 0; j < n; j++) {
    let diagonal = a[j * n + j] ?? 0;
    for (let k = 0; k < j; k++) diagonal -= (a[j * n + k] ?? 0) ** 2;
    if (!(diagonal > 0)) throw new Error("Bethe solver: Nystrom matrix not positive definite");
    const ljj = Math.sqrt(diagonal);
    a[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let sum = a[i * n + j] ?? 0;
      const rowI = i * n;
      const rowJ = j * n;
      for (let k = 0; k < j; k++) sum -= (a[rowI + k] ?? 0) * (a[rowJ + k] ?? 0);
      a[rowI + j] = sum / ljj;
    }
  }
  for (const b of rhs) {
    for (let i = 0; i < n; i++) {
      let sum = b[i] ?? 0;
      for (let k = 0; k < i; k++) sum -= (a[i * n + k] ?? 0) * (b[k] ?? 0);
      b[i] = sum / (a[i * n + i] ?? 1);
    }
    for (let i = n - 1; i >= 0; i--) {
      let sum = b[i] ?? 0;
      for (let k = i + 1; k < n; k++) sum -= (a[k * n + i] ?? 0) * (b[k] ?? 0);
      b[i] = sum / (a[i * n + i] ?? 1);
    }
  }
}

function exactM(m: number, method: BetheMethod, B: number): XxzMagnetizationResult {
  return { m, method, converged: true, quadratureDifference: 0, fermiRapidity: B, nodeCount: 0 };
}

function exactH(h: number, method: BetheMethod, B: number): XxzFieldResult {
  return { h, method, converged: true, quadratureDifference: 0, fermiRapidity: B };
}
