// Tests of the one- and two-magnon solvers (magnons.ts): exact limits, Bethe's two-magnon bound
// state, a brute-force real-space check of the ring reduction, and the eigen-solver against mathjs.
// Physics layer tests; energies in units of J, Zeeman excluded unless a field h is passed.
import { eigs } from "mathjs";
import { describe, expect, it } from "vitest";
import { xxzSaturationField } from "./bethe";
import {
  bandedSymmetricEigenvalues,
  boundStates,
  nearSaturationBranch,
  oneMagnonDispersion,
  oneMagnonMinimum,
  saturationField,
  saturationFieldWithBoundStates,
  twoMagnonContinuum,
  twoMagnonSpectrum,
  type ChainBond,
  type PlaneBond,
} from "./magnons";

const xxz = (delta: number): ChainBond[] => [{ offset: 1, jPerp: 1, jZ: delta }];
const j1j2 = (j1: number, j2: number): ChainBond[] => [
  { offset: 1, jPerp: j1, jZ: j1 },
  { offset: 2, jPerp: j2, jZ: j2 },
];

describe("one magnon", () => {
  it("XXZ chain: E1(k) = cos k - Delta, h_sat = 1 + Delta (derivable; agrees with bethe.ts)", () => {
    for (const delta of [1, 0.5, -0.5, 2]) {
      for (const k of [0, 0.3, 1.7, Math.PI]) {
        expect(oneMagnonDispersion(xxz(delta), k)).toBeCloseTo(Math.cos(k) - delta, 15);
      }
      const min = oneMagnonMinimum(xxz(delta));
      expect(min.k).toBeCloseTo(Math.PI, 12);
      expect(saturationField(xxz(delta))).toBeCloseTo(1 + delta, 14);
      if (delta <= 1) expect(saturationField(xxz(delta))).toBeCloseTo(xxzSaturationField(delta), 14);
    }
  });

  it.each([0, 0.1, 0.25])("J1-J2 chain, J2 = %s <= J1/4: h_sat = 2 J1 at k = pi (physics-notes 5, derivable)", (j2) => {
    const min = oneMagnonMinimum(j1j2(1, j2));
    expect(-min.energy).toBeCloseTo(2, 12);
    if (j2 < 0.25) expect(min.k).toBeCloseTo(Math.PI, 10);
  });

  it.each([0.3, 0.5, 1, 2])("J1-J2 chain, J2 = %s > J1/4: h_sat = J1 + 2 J2 + J1^2/(8 J2)", (j2) => {
    // Derivable: d/dk [cos k + J2 cos 2k] = 0 at cos k0 = -J1/(4 J2) (physics-notes section 5).
    const min = oneMagnonMinimum(j1j2(1, j2));
    expect(-min.energy).toBeCloseTo(1 + 2 * j2 + 1 / (8 * j2), 12);
    expect(min.k).toBeCloseTo(Math.acos(-1 / (4 * j2)), 7);
  });

  it("square lattice Heisenberg: minimum -4 J at (pi, pi), h_sat = 4 J (derivable)", () => {
    const bonds: PlaneBond[] = [
      { offset: [1, 0], jPerp: 1, jZ: 1 },
      { offset: [0, 1], jPerp: 1, jZ: 1 },
    ];
    const min = oneMagnonMinimum(bonds);
    expect(min.energy).toBeCloseTo(-4, 12);
    expect(Math.abs(min.k[0])).toBeCloseTo(Math.PI, 8);
    expect(Math.abs(min.k[1])).toBeCloseTo(Math.PI, 8);
    expect(saturationField(bonds)).toBeCloseTo(4, 12);
  });

  it("triangular lattice Heisenberg: minimum -9/2 J at the corner (2pi/3, -2pi/3) (derivable)", () => {
    // Bonds a1, a2, a1 - a2: E1 = cos k1 + cos k2 + cos(k1 - k2) - 3, smallest sum -3/2.
    const bonds: PlaneBond[] = [
      { offset: [1, 0], jPerp: 1, jZ: 1 },
      { offset: [0, 1], jPerp: 1, jZ: 1 },
      { offset: [1, -1], jPerp: 1, jZ: 1 },
    ];
    const min = oneMagnonMinimum(bonds);
    expect(min.energy).toBeCloseTo(-4.5, 12);
    expect(Math.abs(min.k[0])).toBeCloseTo((2 * Math.PI) / 3, 7);
    expect(min.k[1]).toBeCloseTo(-min.k[0], 7);
  });

  it("rejects a zero offset", () => {
    expect(() => oneMagnonMinimum([{ offset: 0, jPerp: 1, jZ: 1 }])).toThrow(RangeError);
  });
});

describe("two magnons: Bethe's bound state of the XXZ chain", () => {
  // Bethe, Z. Phys. 71, 205 (1931) (physics-notes section 7): psi(r) = x^r, x = c/Delta,
  // c = cos(K/2), exists for |c| < |Delta|, E2 = -J (Delta - c^2/Delta). For psi = x^r the mean
  // separation is sum r x^{2r} / sum x^{2r} = 1/(1 - x^2) (derivable). We keep |x| <= 0.9, so the
  // ring correction x^L is below 1e-18.
  const L = 400;
  const cases: [number, number][] = [];
  for (const delta of [1, 0.5, 2, -0.5, -2]) {
    for (const n of [120, 150, 173, 200, 230, 281]) {
      const c = Math.cos((Math.PI * n) / L);
      if (Math.abs(c / delta) <= 0.9) cases.push([delta, n]);
    }
  }

  it.each(cases)("Delta = %s, K = 2 pi %s / 400", (delta, n) => {
    const K = (2 * Math.PI * n) / L;
    const c = Math.cos(K / 2);
    const x = c / delta;
    const states = boundStates(xxz(delta), K, L);
    expect(states).toHaveLength(1);
    const state = states[0];
    expect(state?.energy ?? NaN).toBeCloseTo(-(delta - (c * c) / delta), 8);
    expect(state?.side).toBe(delta > 0 ? "above" : "below");
    expect(state?.meanSeparation ?? NaN).toBeCloseTo(1 / (1 - x * x), 6);
  });

  it("no bound state where |cos(K/2)| > |Delta| (Delta = 0.5, K = pi/2)", () => {
    expect(boundStates(xxz(0.5), Math.PI / 2, L)).toHaveLength(0);
  });

  it("XX chain (Delta = 0, free fermions): no state outside the continuum at any K", () => {
    for (let n = 0; n < L; n += 23) expect(boundStates(xxz(0), (2 * Math.PI * n) / L, L)).toHaveLength(0);
  });

  it("continuum edges: nearest neighbour -2 Delta +- 2 |cos(K/2)| (derivable)", () => {
    for (const K of [0, 0.4, 1.9, Math.PI, 4.1]) {
      const c = Math.abs(Math.cos(K / 2));
      const range = twoMagnonContinuum(xxz(0.7), K);
      expect(range.min).toBeCloseTo(-1.4 - 2 * c, 12);
      expect(range.max).toBeCloseTo(-1.4 + 2 * c, 12);
    }
  });

  it("continuum edges with longer bonds match a brute-force scan of E1(K/2 + k) + E1(K/2 - k)", () => {
    const bonds: ChainBond[] = [
      { offset: 1, jPerp: 1, jZ: 0.8 },
      { offset: 2, jPerp: 0.45, jZ: 0.2 },
      { offset: 3, jPerp: -0.3, jZ: 0.1 },
    ];
    for (const K of [0, 0.7, 2.2, Math.PI, 5.0]) {
      let lo = Infinity;
      let hi = -Infinity;
      for (let i = 0; i <= 200000; i++) {
        const k = (2 * Math.PI * i) / 200000;
        const e = oneMagnonDispersion(bonds, K / 2 + k) + oneMagnonDispersion(bonds, K / 2 - k);
        lo = Math.min(lo, e);
        hi = Math.max(hi, e);
      }
      const range = twoMagnonContinuum(bonds, K);
      expect(range.min).toBeLessThanOrEqual(lo + 1e-12);
      expect(range.min).toBeGreaterThan(lo - 1e-8);
      expect(range.max).toBeGreaterThanOrEqual(hi - 1e-12);
      expect(range.max).toBeLessThan(hi + 1e-8);
      // Every ring eigenvalue not reported as bound lies inside the continuum.
      const spectrum = twoMagnonSpectrum(bonds, K, 200);
      const outside = new Set(spectrum.outside.map((s) => s.energy));
      for (const e of spectrum.energies) {
        if (outside.has(e)) continue;
        expect(e).toBeGreaterThan(spectrum.continuum.min - 1e-9);
        expect(e).toBeLessThan(spectrum.continuum.max + 1e-9);
      }
    }
  });
});

describe("two magnons: ring reduction against brute force", () => {
  // Reference: the two-down-spin sector of the ring built directly in the real-space basis of site
  // pairs {x < y} (no momentum, no folding), diagonalized with mathjs eigs. The union over all ring
  // momenta of twoMagnonSpectrum must reproduce it; this exercises r <-> L - r, r = L/2 (even L,
  // even and odd momenta), odd L and hops across the other magnon.
  const bonds: ChainBond[] = [
    { offset: 1, jPerp: 1, jZ: 0.7 },
    { offset: 2, jPerp: 0.4, jZ: -0.3 },
    { offset: -3, jPerp: 0.25, jZ: 0.5 },
  ];

  it.each([7, 10, 11, 12])("L = %s", (L) => {
    const reference = realSpaceTwoMagnonSpectrum(bonds, L);
    const reduced: number[] = [];
    for (let n = 0; n < L; n++) reduced.push(...twoMagnonSpectrum(bonds, (2 * Math.PI * n) / L, L).energies);
    reduced.sort((a, b) => a - b);
    expect(reduced).toHaveLength(reference.length);
    for (let i = 0; i < reference.length; i++) expect(reduced[i] ?? NaN).toBeCloseTo(reference[i] ?? NaN, 10);
  });

  it("rejects rings shorter than twice the bond range", () => {
    expect(() => twoMagnonSpectrum(bonds, 0, 6)).toThrow(RangeError);
  });
});

describe("banded symmetric eigen-solver", () => {
  // Reference: mathjs eigs (general-purpose library) on random symmetric band matrices.
  it.each([1, 2, 3, 5])("half-bandwidth %s, n = 40", (w) => {
    const n = 40;
    const random = lcg(17 + w);
    const dense = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    for (let i = 0; i < n; i++) {
      for (let j = i; j <= Math.min(n - 1, i + w); j++) {
        const value = 2 * random() - 1;
        (dense[i] as number[])[j] = value;
        (dense[j] as number[])[i] = value;
      }
    }
    const reference = (eigs(dense).values as number[]).slice().sort((a, b) => a - b);
    const ours = bandedSymmetricEigenvalues(Float64Array.from(dense.flat()), n, w);
    for (let i = 0; i < n; i++) expect(ours[i] ?? NaN).toBeCloseTo(reference[i] ?? NaN, 11);
  });
});

describe("saturation with two-magnon bound states", () => {
  it("Heisenberg chain: one-magnon instability at h = 2 J, k = pi (bound state is repulsive)", () => {
    const result = saturationFieldWithBoundStates(xxz(1));
    expect(result.mechanism).toBe("one-magnon");
    expect(result.hSat).toBeCloseTo(2, 12);
    expect(result.k).toBeCloseTo(Math.PI, 10);
  });

  it("XXZ, Delta = -0.5: still one-magnon, h = 1 + Delta (Bethe bound state never below 2 E1min)", () => {
    // Derivable from Bethe 1931: E2_bound = |D| - c^2/|D| >= 0 > 2 (|D| - 1) = 2 min E1 for |D| < 1.
    const result = saturationFieldWithBoundStates(xxz(-0.5));
    expect(result.mechanism).toBe("one-magnon");
    expect(result.hSat).toBeCloseTo(0.5, 12);
  });

  it("XXZ, Delta = -2: the K = 0 pair binds first, h = -(|D| - 1/|D|)/2 (from Bethe 1931)", () => {
    // E2_bound(K) = |D| - c^2/|D| is smallest at c = 1 (K = 0): |D| - 1/|D| = 3/2, while
    // 2 min E1 = 2 (|D| - 1) = 2. So h2 = -3/4 lies above h1 = -1.
    const result = saturationFieldWithBoundStates(xxz(-2));
    expect(result.mechanism).toBe("two-magnon bound state");
    expect(result.hSat).toBeCloseTo(-0.75, 10);
    expect(result.oneMagnonField).toBeCloseTo(-1, 12);
    expect(result.k).toBeCloseTo(0, 6);
  });

  it("ferro J1 = -1, AFM J2 = 0.4: pair bound state at K = pi goes soft before one magnon", () => {
    // Derivation (ours): at K = pi the nearest-neighbour hopping J1 cos(pi/2) vanishes and J2 hops
    // by two with amplitude J2 cos(pi) = -J2, so odd separations form a half-line with on-site
    // energy e0 = -2 (J1 + J2) and, at r = 1, the extra J1 (Ising) plus -J2 (hop across the other
    // magnon, r = -1 -> 1). A half-line with boundary shift u and hopping t has a bound state
    // e0 + u + t^2/u when |u| > |t|: here u = J1 - J2 = -1.4, E = 1.2 - 1.4 - 0.16/1.4 = -11/35.
    const j1 = -1;
    const j2 = 0.4;
    const u = j1 - j2;
    const boundAtPi = -2 * (j1 + j2) + u + (j2 * j2) / u;
    expect(boundAtPi).toBeCloseTo(-11 / 35, 14);
    const ringState = boundStates(j1j2(j1, j2), Math.PI, 400).find((s) => s.side === "below");
    expect(ringState?.energy ?? NaN).toBeCloseTo(boundAtPi, 10);
    const result = saturationFieldWithBoundStates(j1j2(j1, j2));
    expect(result.mechanism).toBe("two-magnon bound state");
    // The scan may only find a lower pair energy elsewhere in K, never a higher one.
    expect(result.hSat).toBeGreaterThanOrEqual(-boundAtPi / 2 - 1e-10);
    expect(result.hSat).toBeCloseTo(-boundAtPi / 2, 8);
    expect(result.oneMagnonField).toBeCloseTo(j1 + 2 * j2 + (j1 * j1) / (8 * j2), 12);
  });
});

describe("near-saturation upper branch", () => {
  it("Heisenberg chain: w_upper = h + J at q = 0 (physics-notes 7) and h + J + J sin^2(q/2) at q", () => {
    // Derivable from Bethe's bound state at K = pi + q: c = -sin(q/2), E2 = -(1 - sin^2(q/2)),
    // E1(k0 = pi) = -2, so w = E2 - E1 + h = h + 1 + sin^2(q/2).
    const h = 1.9;
    const qs = [0, (2 * Math.PI) / 400, 0.1, 0.5, 1.2];
    const branch = nearSaturationBranch(xxz(1), h, qs, 400);
    expect(branch.k0).toBeCloseTo(Math.PI, 12);
    expect(branch.su2).toBe(true);
    expect(branch.belowSaturation).toBe(true);
    for (const point of branch.points) {
      expect(point.exists).toBe(true);
      expect(point.energy ?? NaN).toBeCloseTo(h + 1 + Math.sin(point.q / 2) ** 2, 9);
    }
    expect(branch.points[0]?.energy ?? NaN).toBeCloseTo(h + 1, 12);
  });

  it("Heisenberg chain: the pair overlap vanishes at q = 0 and matches Bethe's wavefunction at q != 0", () => {
    // Larmor theorem (physics-notes 4): S-_{q=0} keeps the state in its SU(2) multiplet, so the
    // bound state gets nothing at q = 0. At q != 0, with psi(r) = sqrt(1 - x^2) x^{r-1},
    // x = -sin(q/2), and the relative amplitude 2 cos(a r), a = (q - pi)/2 (magnons.ts), the
    // overlap is 4 (1 - x^2) (Re[e^{ia} / (1 - x e^{ia})])^2 (derivable geometric series).
    const qs = [0, (2 * Math.PI * 3) / 400, (2 * Math.PI * 40) / 400];
    const branch = nearSaturationBranch(xxz(1), 1.95, qs, 400);
    expect(branch.points[0]?.pairOverlapFactor ?? NaN).toBeLessThan(1e-20);
    for (const point of branch.points.slice(1)) {
      const x = -Math.sin(point.q / 2);
      const a = (point.q - Math.PI) / 2;
      const re = Math.cos(a) - x; // Re[e^{ia}(1 - x e^{-ia})] = cos a - x
      const denominator = 1 - 2 * x * Math.cos(a) + x * x; // |1 - x e^{ia}|^2
      const expected = 4 * (1 - x * x) * (re / denominator) ** 2;
      expect(point.pairOverlapFactor ?? NaN).toBeCloseTo(expected, 10);
      expect(point.pairOverlapFactor ?? 0).toBeGreaterThan(0);
    }
  });

  it("XX chain: no bound state, no upper branch", () => {
    const branch = nearSaturationBranch(xxz(0), 0.95, [0, 0.2, 1], 400);
    for (const point of branch.points) {
      expect(point.exists).toBe(false);
      expect(point.energy).toBeNull();
    }
  });
});

/** Two-down-spin sector in the real-space pair basis, eigenvalues relative to the polarized state. */
function realSpaceTwoMagnonSpectrum(bonds: readonly ChainBond[], L: number): number[] {
  const pairs: [number, number][] = [];
  for (let x = 0; x < L; x++) for (let y = x + 1; y < L; y++) pairs.push([x, y]);
  const index = new Map(pairs.map(([x, y], i) => [`${x},${y}`, i]));
  const dimension = pairs.length;
  const H = Array.from({ length: dimension }, () => new Array<number>(dimension).fill(0));
  const polarized = (L * bonds.reduce((s, b) => s + b.jZ, 0)) / 4;
  pairs.forEach(([x, y], column) => {
    const down = new Set([x, y]);
    const sz = (i: number) => (down.has(i) ? -0.5 : 0.5);
    let diagonal = -polarized;
    for (let i = 0; i < L; i++) {
      for (const b of bonds) {
        const j = (((i + b.offset) % L) + L) % L;
        diagonal += b.jZ * sz(i) * sz(j);
        if (sz(i) !== sz(j)) {
          // (jPerp/2)(S+S- + S-S+) swaps the two spins of the bond.
          const moved = new Set(down);
          const from = down.has(i) ? i : j;
          const to = from === i ? j : i;
          moved.delete(from);
          moved.add(to);
          const [a, c] = [...moved].sort((p, q) => p - q);
          const row = index.get(`${a},${c}`);
          if (row !== undefined) (H[row] as number[])[column] = ((H[row] as number[])[column] ?? 0) + b.jPerp / 2;
        }
      }
    }
    (H[column] as number[])[column] = ((H[column] as number[])[column] ?? 0) + diagonal;
  });
  return (eigs(H).values as number[]).slice().sort((a, b) => a - b);
}

/** Small deterministic generator for test matrices (common practice, no source). */
function lcg(start: number): () => number {
  let state = start >>> 0;
  return () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 4294967296;
  };
}
