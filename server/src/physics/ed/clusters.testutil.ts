// Test-only cluster builders (rings and random clusters) for the exact-diagonalization tests.
import type { Mat3, SpinCluster, Vec3 } from "../types";
import { rng } from "./lanczos";

/** The engine's deterministic generator, under the name the tests use. */
export const mulberry = rng;

export function xxz(J: number, delta = 1): Mat3 {
  return [
    [J, 0, 0],
    [0, J, 0],
    [0, 0, J * delta],
  ];
}

/** Exchange matrix J 1 + D . (S_i x S_j) term: J_ab = J delta_ab + eps_abc D_c. */
export function withDM(J: Mat3, D: Vec3): Mat3 {
  return [
    [J[0][0], J[0][1] + D[2], J[0][2] - D[1]],
    [J[1][0] - D[2], J[1][1], J[1][2] + D[0]],
    [J[2][0] + D[1], J[2][1] - D[0], J[2][2]],
  ];
}

export interface RingSpec {
  N: number;
  S?: number;
  J1?: Mat3;
  J2?: Mat3 | null;
  field?: Vec3;
  singleIon?: Mat3 | null;
}

/** Periodic ring with translation i -> i + 1, positions (i, 0, 0). */
export function ring(spec: RingSpec): SpinCluster {
  const { N } = spec;
  const S = spec.S ?? 0.5;
  const J1 = spec.J1 ?? xxz(1);
  const bonds: { i: number; j: number; matrix: Mat3 }[] = [];
  for (let i = 0; i < N; i++) bonds.push({ i, j: (i + 1) % N, matrix: J1 });
  if (spec.J2) for (let i = 0; i < N; i++) bonds.push({ i, j: (i + 2) % N, matrix: spec.J2 });
  const field = spec.field ?? [0, 0, 0];
  return {
    spins: new Array<number>(N).fill(S),
    positions: Array.from({ length: N }, (_, i) => [i, 0, 0] as Vec3),
    bonds,
    singleIon: spec.singleIon ? Array.from({ length: N }, (_, site) => ({ site, matrix: spec.singleIon! })) : [],
    fields: new Array<Vec3>(N).fill(field),
    translations: [Array.from({ length: N }, (_, i) => (i + 1) % N)],
    translationVectors: [[1, 0, 0]],
    translationPeriods: [N],
  };
}

export function heisenbergRing(N: number, J1: number, J2 = 0, h = 0, S = 0.5): SpinCluster {
  return ring({ N, S, J1: xxz(J1), J2: J2 !== 0 ? xxz(J2) : null, field: [0, 0, h] });
}

export function randomMatrix(r: () => number, scale = 1): Mat3 {
  const g = (): number => (2 * r() - 1) * scale;
  return [
    [g(), g(), g()],
    [g(), g(), g()],
    [g(), g(), g()],
  ];
}

export function randomSymmetric(r: () => number, scale = 1): Mat3 {
  const m = randomMatrix(r, scale);
  return [
    [m[0][0], m[0][1], m[0][2]],
    [m[0][1], m[1][1], m[1][2]],
    [m[0][2], m[1][2], m[2][2]],
  ];
}

export function randomVec(r: () => number, scale = 1): Vec3 {
  return [(2 * r() - 1) * scale, (2 * r() - 1) * scale, (2 * r() - 1) * scale];
}

/** Random cluster without any symmetry (bond density p, single-ion on spins >= 1). */
export function randomCluster(spins: number[], seed: number, p = 0.6): SpinCluster {
  const n = spins.length;
  const out: { i: number; j: number; matrix: Mat3 }[] = [];
  const r2 = mulberry(seed + 17);
  for (let i = 0; i < n; i++)
    for (let j = i + 1; j < n; j++) {
      if (!(r2() < p || j === i + 1)) continue;
      const m = randomMatrix(r2);
      if (r2() < 0.5) out.push({ i, j, matrix: m });
      else out.push({ i: j, j: i, matrix: m });
    }
  return {
    spins,
    positions: spins.map((_, i) => [i, 0, 0] as Vec3),
    bonds: out,
    singleIon: spins.flatMap((S, site) => (S >= 1 ? [{ site, matrix: randomSymmetric(r2) }] : [])),
    fields: spins.map(() => randomVec(r2, 0.7)),
  };
}

/** Random U(1)-symmetric cluster about axis n: J = a 1 + b n n^T + c [n]x, A = a 1 + b n n^T, h || n. */
export function randomU1Cluster(spins: number[], n: Vec3, seed: number, p = 0.7): SpinCluster {
  const r = mulberry(seed);
  const N = spins.length;
  const nn = Math.hypot(n[0], n[1], n[2]);
  const u: Vec3 = [n[0] / nn, n[1] / nn, n[2] / nn];
  const u1 = (a: number, b: number, c: number): Mat3 => {
    const m: number[][] = [];
    for (let i = 0; i < 3; i++) {
      m.push([]);
      for (let j = 0; j < 3; j++) m[i]!.push((i === j ? a : 0) + b * u[i]! * u[j]!);
    }
    // c [u]_x
    m[0]![1]! += -c * u[2];
    m[0]![2]! += c * u[1];
    m[1]![0]! += c * u[2];
    m[1]![2]! += -c * u[0];
    m[2]![0]! += -c * u[1];
    m[2]![1]! += c * u[0];
    return m as unknown as Mat3;
  };
  const bonds: { i: number; j: number; matrix: Mat3 }[] = [];
  for (let i = 0; i < N; i++)
    for (let j = i + 1; j < N; j++) {
      if (!(r() < p || j === i + 1)) continue;
      bonds.push({ i, j, matrix: u1(2 * r() - 1, 2 * r() - 1, 2 * r() - 1) });
    }
  return {
    spins,
    positions: spins.map((_, i) => [i, 0, 0] as Vec3),
    bonds,
    singleIon: spins.flatMap((S, site) => (S >= 1 ? [{ site, matrix: u1(2 * r() - 1, 2 * r() - 1, 0) }] : [])),
    fields: spins.map(() => {
      const h = 1.2 * (2 * r() - 1);
      return [h * u[0], h * u[1], h * u[2]] as Vec3;
    }),
  };
}
