// Small dense helpers for 3-vectors and 3x3 matrices used throughout the physics layer.
// Physics layer: pure functions of numbers.
import type { Mat3, Vec3 } from "./types";

export const ZERO3: Vec3 = [0, 0, 0];
export const IDENTITY3: Mat3 = [
  [1, 0, 0],
  [0, 1, 0],
  [0, 0, 1],
];

export function vec3(x: number, y: number, z: number): Vec3 {
  return [x, y, z];
}

export function add3(a: Vec3, b: Vec3): Vec3 {
  return [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
}

export function sub3(a: Vec3, b: Vec3): Vec3 {
  return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}

export function scale3(a: Vec3, s: number): Vec3 {
  return [a[0] * s, a[1] * s, a[2] * s];
}

export function dot3(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

export function cross3(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

export function norm3(a: Vec3): number {
  return Math.sqrt(dot3(a, a));
}

/** Unit vector along a; returns null for a (numerically) zero vector. */
export function normalize3(a: Vec3): Vec3 | null {
  const n = norm3(a);
  if (!(n > 0) || !Number.isFinite(n)) return null;
  return scale3(a, 1 / n);
}

export function mat3(rows: readonly (readonly number[])[]): Mat3 {
  const r = (i: number): Vec3 => {
    const row = rows[i] ?? [];
    return [row[0] ?? 0, row[1] ?? 0, row[2] ?? 0];
  };
  return [r(0), r(1), r(2)];
}

export function diag3(x: number, y: number, z: number): Mat3 {
  return [
    [x, 0, 0],
    [0, y, 0],
    [0, 0, z],
  ];
}

export function scaleMat3(m: Mat3, s: number): Mat3 {
  return [scale3(m[0], s), scale3(m[1], s), scale3(m[2], s)];
}

export function addMat3(a: Mat3, b: Mat3): Mat3 {
  return [add3(a[0], b[0]), add3(a[1], b[1]), add3(a[2], b[2])];
}

export function subMat3(a: Mat3, b: Mat3): Mat3 {
  return [sub3(a[0], b[0]), sub3(a[1], b[1]), sub3(a[2], b[2])];
}

export function transpose3(m: Mat3): Mat3 {
  return [
    [m[0][0], m[1][0], m[2][0]],
    [m[0][1], m[1][1], m[2][1]],
    [m[0][2], m[1][2], m[2][2]],
  ];
}

export function mulMat3(a: Mat3, b: Mat3): Mat3 {
  const bt = transpose3(b);
  return [
    [dot3(a[0], bt[0]), dot3(a[0], bt[1]), dot3(a[0], bt[2])],
    [dot3(a[1], bt[0]), dot3(a[1], bt[1]), dot3(a[1], bt[2])],
    [dot3(a[2], bt[0]), dot3(a[2], bt[1]), dot3(a[2], bt[2])],
  ];
}

export function mulMatVec3(m: Mat3, v: Vec3): Vec3 {
  return [dot3(m[0], v), dot3(m[1], v), dot3(m[2], v)];
}

export function trace3(m: Mat3): number {
  return m[0][0] + m[1][1] + m[2][2];
}

export function det3(m: Mat3): number {
  return dot3(m[0], cross3(m[1], m[2]));
}

/** Frobenius norm. */
export function normMat3(m: Mat3): number {
  return Math.sqrt(dot3(m[0], m[0]) + dot3(m[1], m[1]) + dot3(m[2], m[2]));
}

/** Outer product a b^T. */
export function outer3(a: Vec3, b: Vec3): Mat3 {
  return [scale3(b, a[0]), scale3(b, a[1]), scale3(b, a[2])];
}

/** Cross-product matrix [n]_x with [n]_x v = n x v. */
export function crossMatrix3(n: Vec3): Mat3 {
  return [
    [0, -n[2], n[1]],
    [n[2], 0, -n[0]],
    [-n[1], n[0], 0],
  ];
}

/** Eigenvalues of a real symmetric 3x3 matrix, ascending (closed-form trigonometric method). */
export function symmetricEigenvalues3(m: Mat3): Vec3 {
  const p1 = m[0][1] ** 2 + m[0][2] ** 2 + m[1][2] ** 2;
  const q = trace3(m) / 3;
  if (p1 === 0) {
    const d = [m[0][0], m[1][1], m[2][2]].sort((a, b) => a - b);
    return [d[0] ?? 0, d[1] ?? 0, d[2] ?? 0];
  }
  const p2 = (m[0][0] - q) ** 2 + (m[1][1] - q) ** 2 + (m[2][2] - q) ** 2 + 2 * p1;
  const p = Math.sqrt(p2 / 6);
  const b = scaleMat3(subMat3(m, scaleMat3(IDENTITY3, q)), 1 / p);
  const r = Math.max(-1, Math.min(1, det3(b) / 2));
  const phi = Math.acos(r) / 3;
  const e1 = q + 2 * p * Math.cos(phi);
  const e3 = q + 2 * p * Math.cos(phi + (2 * Math.PI) / 3);
  const e2 = 3 * q - e1 - e3;
  return [e3, e2, e1];
}
