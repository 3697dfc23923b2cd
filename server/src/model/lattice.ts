// Lattice presets (Cartesian geometry, lattice constant 1) and neighbour shells found by
// distance. Model layer.
import { add3, norm3, scale3, sub3, ZERO3 } from "../physics/linalg3";
import type { Vec3 } from "../physics/types";

export interface PresetLattice {
  readonly name: string;
  /** Primitive vectors of the periodic directions (their count is the dimension). */
  readonly vectors: readonly Vec3[];
  readonly sites: readonly { readonly name: string; readonly position: Vec3 }[];
  /** Number of nearest neighbours of every site (shell 1), used to flag odd bond sets. */
  readonly coordination: number;
  readonly description: string;
}

const S3 = Math.sqrt(3);

export const PRESETS: Readonly<Record<string, PresetLattice>> = {
  chain: {
    name: "chain",
    vectors: [[1, 0, 0]],
    sites: [{ name: "A", position: [0, 0, 0] }],
    coordination: 2,
    description: "one site per cell along a1 = (1, 0, 0)",
  },
  ladder: {
    name: "ladder",
    vectors: [[1, 0, 0]],
    sites: [
      { name: "A", position: [0, 0, 0] },
      { name: "B", position: [0, 1, 0] },
    ],
    coordination: 3,
    description: "two legs A, B along a1 = (1, 0, 0), rungs of length 1",
  },
  square: {
    name: "square",
    vectors: [
      [1, 0, 0],
      [0, 1, 0],
    ],
    sites: [{ name: "A", position: [0, 0, 0] }],
    coordination: 4,
    description: "a1 = (1, 0, 0), a2 = (0, 1, 0)",
  },
  triangular: {
    name: "triangular",
    vectors: [
      [1, 0, 0],
      [0.5, S3 / 2, 0],
    ],
    sites: [{ name: "A", position: [0, 0, 0] }],
    coordination: 6,
    description: "a1 = (1, 0, 0), a2 = (1/2, √3/2, 0)",
  },
  honeycomb: {
    name: "honeycomb",
    vectors: [
      [1, 0, 0],
      [0.5, S3 / 2, 0],
    ],
    sites: [
      { name: "A", position: [0, 0, 0] },
      { name: "B", position: [0.5, S3 / 6, 0] },
    ],
    coordination: 3,
    description: "triangular Bravais lattice with sites A at 0 and B at (a1 + a2)/3",
  },
  kagome: {
    name: "kagome",
    vectors: [
      [1, 0, 0],
      [0.5, S3 / 2, 0],
    ],
    sites: [
      { name: "A", position: [0, 0, 0] },
      { name: "B", position: [0.5, 0, 0] },
      { name: "C", position: [0.25, S3 / 4, 0] },
    ],
    coordination: 4,
    description: "triangular Bravais lattice with sites A at 0, B at a1/2, C at a2/2",
  },
  cubic: {
    name: "cubic",
    vectors: [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ],
    sites: [{ name: "A", position: [0, 0, 0] }],
    coordination: 6,
    description: "simple cubic, a1, a2, a3 unit vectors",
  },
};

export interface ShellBond {
  readonly from: number;
  readonly to: number;
  readonly offset: readonly number[];
  readonly distance: number;
}

/** Cartesian displacement of site `to` in cell `offset` from site `from` in cell 0. */
export function bondVector(
  vectors: readonly Vec3[],
  positions: readonly Vec3[],
  from: number,
  to: number,
  offset: readonly number[],
): Vec3 {
  let r: Vec3 = sub3(positions[to] ?? ZERO3, positions[from] ?? ZERO3);
  offset.forEach((n, k) => {
    r = add3(r, scale3(vectors[k] ?? ZERO3, n));
  });
  return r;
}

/**
 * Canonical orientation of a bond: the same bond seen from its other end is (to, from, -offset);
 * we keep the orientation with from < to, or for from == to the one whose first non-zero offset
 * component is positive.
 */
export function canonicalBond(from: number, to: number, offset: readonly number[]): { from: number; to: number; offset: number[] } {
  const flip = (): { from: number; to: number; offset: number[] } => ({ from: to, to: from, offset: offset.map((n) => -n || 0) });
  if (from > to) return flip();
  if (from === to) {
    const first = offset.find((n) => n !== 0) ?? 0;
    if (first < 0) return flip();
  }
  return { from, to, offset: [...offset] };
}

export function bondKey(from: number, to: number, offset: readonly number[]): string {
  const c = canonicalBond(from, to, offset);
  return `${c.from}>${c.to}@${c.offset.join(",")}`;
}

/** Keys already made for bond objects (a model's bonds are immutable and live across builds). */
const bondKeys = new WeakMap<object, string>();

/** bondKey of a bond object, made once per object. */
export function bondKeyOf(b: { readonly from: number; readonly to: number; readonly offset: readonly number[] }): string {
  let key = bondKeys.get(b);
  if (key === undefined) bondKeys.set(b, (key = bondKey(b.from, b.to, b.offset)));
  return key;
}

const DISTANCE_TOLERANCE = 1e-6;

/**
 * The distinct neighbour distances of a lattice up to `maxShell` shells, and the bonds of each
 * shell (each bond once, canonical orientation). Offsets are searched in a box that grows until
 * the requested shells are complete.
 */
export function neighbourShells(
  vectors: readonly Vec3[],
  positions: readonly Vec3[],
  maxShell: number,
): { distances: number[]; bonds: ShellBond[][] } {
  const dim = vectors.length;
  const range = Math.min(dim >= 3 ? 5 : 8, maxShell + 3);
  const found: ShellBond[] = [];
  const offsets: number[][] = [];
  const build = (prefix: number[]): void => {
    if (prefix.length === dim) {
      offsets.push(prefix);
      return;
    }
    for (let n = -range; n <= range; n++) build([...prefix, n]);
  };
  build([]);
  for (let s = 0; s < positions.length; s++) {
    for (let t = 0; t < positions.length; t++) {
      for (const off of offsets) {
        if (s === t && off.every((n) => n === 0)) continue;
        const c = canonicalBond(s, t, off);
        if (c.from !== s || c.to !== t || c.offset.some((n, k) => n !== off[k])) continue;
        found.push({ from: s, to: t, offset: off, distance: norm3(bondVector(vectors, positions, s, t, off)) });
      }
    }
  }
  found.sort((a, b) => a.distance - b.distance);
  const distances: number[] = [];
  for (const b of found) {
    const last = distances[distances.length - 1];
    if (last === undefined || b.distance - last > DISTANCE_TOLERANCE * Math.max(1, last)) distances.push(b.distance);
  }
  // Only shells well inside the search box are complete: keep those below the box's inradius.
  const minVector = Math.min(...vectors.map((v) => norm3(v)));
  const reliable = distances.filter((d) => d < (range - 1) * minVector * 0.8 + 1e-9).slice(0, maxShell);
  const bonds = reliable.map((d) => found.filter((b) => Math.abs(b.distance - d) <= DISTANCE_TOLERANCE * Math.max(1, d)));
  return { distances: reliable, bonds };
}
