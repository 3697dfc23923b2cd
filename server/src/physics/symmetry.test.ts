// Tests of the spin-rotation symmetry algebra (physics layer): decompositions, the U(1) axis
// search, breaking findings and the Larmor protection rule of physics-notes sections 2-4.
import { describe, it, expect } from "vitest";
import { eigs } from "mathjs";
import type { Mat3, Vec3 } from "./types";
import { IDENTITY3, addMat3, cross3, crossMatrix3, diag3, dot3, mulMat3, mulMatVec3, normalize3, normMat3, outer3, scale3, scaleMat3, subMat3, transpose3 } from "./linalg3";
import {
  classifySymmetry,
  decomposeExchange,
  decomposeGTensor,
  decomposeSingleIon,
  effectiveField,
  forgetSymmetryFacts,
  resonanceProtection,
  rotationResidual,
  symmetricEigen3,
  uniaxialMatrix3,
  type SymmetryInput,
} from "./symmetry";

/** Rodrigues rotation matrix about unit n by angle phi (standard formula). */
function rotation(n: Vec3, phi: number): Mat3 {
  const k: Mat3 = [
    [0, -n[2], n[1]],
    [n[2], 0, -n[0]],
    [-n[1], n[0], 0],
  ];
  return addMat3(addMat3(IDENTITY3, scaleMat3(k, Math.sin(phi))), scaleMat3(mulMat3(k, k), 1 - Math.cos(phi)));
}

/** Deterministic pseudo-random numbers (LCG) so that the tests are reproducible. */
function rng(start: number): () => number {
  let s = start >>> 0;
  return () => {
    s = (1664525 * s + 1013904223) >>> 0;
    return s / 2 ** 32 - 0.5;
  };
}

const Z: Vec3 = [0, 0, 1];
const heisenberg = (j: number): Mat3 => scaleMat3(IDENTITY3, j);
/** XXZ about unit n: J (1 - n n^T) + J Delta n n^T. */
const xxzAbout = (n: Vec3, j: number, delta: number): Mat3 =>
  addMat3(scaleMat3(subMat3(IDENTITY3, outer3(n, n)), j), scaleMat3(outer3(n, n), j * delta));
/** Exchange matrix whose antisymmetric part is D . (S_i x S_j): elements D_a eps_abc. */
const dmMatrix = (d: Vec3): Mat3 => [
  [0, d[2], -d[1]],
  [-d[2], 0, d[0]],
  [d[1], -d[0], 0],
];

function ring(n: number, matrix: (i: number) => Mat3): SymmetryInput["bonds"] {
  return Array.from({ length: n }, (_, i) => ({ id: `b${i}`, matrix: matrix(i), sites: [i, (i + 1) % n] as const }));
}
function uniformFields(n: number, h: Vec3): SymmetryInput["fields"] {
  return Array.from({ length: n }, (_, i) => ({ id: `h${i}`, vector: h, site: i }));
}
const aligned = (a: Vec3 | null, b: Vec3): number => (a ? Math.abs(dot3(a, b)) : 0);

describe("symmetricEigen3", () => {
  it("matches mathjs eigs on random symmetric matrices (reference library)", () => {
    const r = rng(7);
    for (let trial = 0; trial < 20; trial++) {
      const a = [0, 1, 2].map(() => [r(), r(), r()]);
      const m: Mat3 = [0, 1, 2].map((i) => [0, 1, 2].map((j) => a[i]![j]! + a[j]![i]!)) as unknown as Mat3;
      const ours = symmetricEigen3(m);
      // mathjs orders eigenvalues by magnitude; sort them ascending to compare.
      const ref = (eigs(m.map((row) => [...row])).values as number[]).slice().sort((x, y) => x - y);
      ref.forEach((v, k) => expect(ours.values[k]).toBeCloseTo(v, 12));
      ours.vectors.forEach((v, k) => {
        const mv = mulMatVec3(m, v);
        expect(Math.hypot(...mv.map((c, i) => c - ours.values[k]! * v[i]!))).toBeLessThan(1e-13);
      });
    }
  });

  it("orders the eigenpairs as a stable sort of the diagonal does, ties included", () => {
    // Diagonal input: Jacobi does no rotation, so values and vectors are the diagonal and the unit
    // vectors, and their order must be that of Array.prototype.sort (stable) on the indices.
    const triples: Vec3[] = [[1, 2, 3], [3, 2, 1], [2, 3, 1], [2, 1, 3], [1, 3, 2], [3, 1, 2], [1, 1, 2], [2, 1, 1], [1, 2, 1], [1, 1, 1], [0, -0, 0], [-1, -1, 5]];
    for (const t of triples) {
      const eig = symmetricEigen3([
        [t[0], 0, 0],
        [0, t[1], 0],
        [0, 0, t[2]],
      ]);
      const order = [0, 1, 2].sort((i, j) => t[i]! - t[j]!);
      expect(eig.values).toEqual(order.map((i) => t[i]));
      expect(eig.vectors.map((v) => v.indexOf(1))).toEqual(order);
    }
  });

  it("resolves a double eigenvalue and its simple partner to ~1e-15 (uniaxial case)", () => {
    const n = normalize3([1, 2, 3])!;
    const eig = symmetricEigen3(xxzAbout(n, 1, 1.3));
    expect(eig.values[0]).toBeCloseTo(1, 14);
    expect(eig.values[1]).toBeCloseTo(1, 14);
    expect(eig.values[2]).toBeCloseTo(1.3, 14);
    expect(Math.abs(dot3(eig.vectors[2], n))).toBeCloseTo(1, 14);
  });
});

describe("decompositions (physics-notes section 2 conventions)", () => {
  it("splits an exchange matrix into J, D and T with the stated DM convention", () => {
    const d: Vec3 = [0.1, -0.2, 0.3];
    const n = normalize3([1, 1, 0])!;
    const tTraceless = scaleMat3(subMat3(outer3(n, n), scaleMat3(IDENTITY3, 1 / 3)), 0.4);
    const m = addMat3(addMat3(heisenberg(1.5), dmMatrix(d)), tTraceless);
    const dec = decomposeExchange(m);
    expect(dec.isotropic).toBeCloseTo(1.5, 14);
    dec.dm.forEach((c, k) => expect(c).toBeCloseTo(d[k]!, 14));
    expect(normMat3(subMat3(dec.anisotropic, tTraceless))).toBeLessThan(1e-14);
    // Orthogonal decomposition in the Frobenius product (derivable).
    expect(normMat3(m) ** 2).toBeCloseTo(3 * 1.5 ** 2 + 2 * dec.norms.dm ** 2 + dec.norms.anisotropic ** 2, 12);
  });

  it("antisymmetric part equals D . (S_i x S_j) for arbitrary classical vectors (derivable identity)", () => {
    const r = rng(3);
    const m: Mat3 = [
      [r(), r(), r()],
      [r(), r(), r()],
      [r(), r(), r()],
    ];
    const dec = decomposeExchange(m);
    const anti = scaleMat3(subMat3(m, transpose3(m)), 0.5);
    for (let k = 0; k < 5; k++) {
      const si: Vec3 = [r(), r(), r()];
      const sj: Vec3 = [r(), r(), r()];
      expect(dot3(si, mulMatVec3(anti, sj))).toBeCloseTo(dot3(dec.dm, cross3(si, sj)), 14);
    }
  });

  it("reads D and E of D (S^z)^2 + E ((S^x)^2 - (S^y)^2) back from a rotated tensor (derivable)", () => {
    const rot = rotation(normalize3([1, -1, 2])!, 0.7);
    const a = mulMat3(mulMat3(rot, diag3(0.05, -0.05, 0.8)), transpose3(rot)); // E = 0.05, D = 0.8
    const dec = decomposeSingleIon(a);
    expect(dec.principal.dAxial).toBeCloseTo(0.8, 13);
    expect(dec.principal.eRhombic).toBeCloseTo(0.05, 13);
    expect(aligned(dec.principal.axis, mulMatVec3(rot, Z))).toBeCloseTo(1, 13);
    expect(dec.isotropic).toBeCloseTo(0.8 / 3, 14);
    expect(dec.hasAntisymmetricPart).toBe(false);
  });

  it("flags a g-tensor with an antisymmetric part and gives principal values", () => {
    const g = decomposeGTensor(diag3(2.0, 2.1, 2.3));
    expect(g.hasAntisymmetricPart).toBe(false);
    expect(g.isotropic).toBeCloseTo(6.4 / 3, 14);
    expect([...g.principalValues]).toEqual([expect.closeTo(2.0, 14), expect.closeTo(2.1, 14), expect.closeTo(2.3, 14)]);
    const skew = decomposeGTensor(addMat3(diag3(2, 2, 2), dmMatrix([0, 0, 0.01])));
    expect(skew.hasAntisymmetricPart).toBe(true);
    expect(skew.antisymmetric[2]).toBeCloseTo(0.01, 14);
  });
});

describe("classifySymmetry: H0 classes", () => {
  it("isotropic Heisenberg ring is SU(2) with no findings", () => {
    const c = classifySymmetry({ bonds: ring(8, () => heisenberg(1)), singleIon: [], fields: [] });
    expect(c.h0).toBe("su2");
    expect(c.full).toBe("su2");
    expect(c.breaking).toHaveLength(0);
  });

  it("XXZ about z: U(1) about z, one exchange-anisotropy finding per bond", () => {
    const c = classifySymmetry({ bonds: ring(6, () => diag3(1, 1, 0.8)), singleIon: [], fields: [] });
    expect(c.h0).toBe("u1");
    expect(aligned(c.h0Axis, Z)).toBeCloseTo(1, 14);
    expect(c.breaking).toHaveLength(6);
    expect(c.breaking.every((f) => f.kind === "exchange-anisotropy" && f.residual === "u1")).toBe(true);
  });

  it("tilted axis shared by XXZ, parallel DM and single-ion terms is found (U(1) about it)", () => {
    const n = normalize3([-1, 0.5, 2])!;
    const c = classifySymmetry({
      bonds: ring(4, () => addMat3(xxzAbout(n, 1, 0.9), dmMatrix(scale3(n, 0.15)))),
      singleIon: [0, 1, 2, 3].map((i) => ({ id: `d${i}`, matrix: scaleMat3(outer3(n, n), 0.2), spin: 1.5, site: i })),
      fields: uniformFields(4, scale3(n, 0.3)),
    });
    expect(c.h0).toBe("u1");
    expect(aligned(c.h0Axis, n)).toBeCloseTo(1, 13);
    expect(c.full).toBe("u1");
    expect(c.breaking.every((f) => f.compatibleWithAxis === true)).toBe(true);
  });

  it("finds a tilted XXZ axis that is not a coordinate axis; rotations about it leave J unchanged", () => {
    const n = normalize3([1, 2, 3])!;
    const j = xxzAbout(n, 1, 1.4);
    const c = classifySymmetry({ bonds: ring(5, () => j), singleIon: [], fields: [] });
    expect(c.h0).toBe("u1");
    expect(aligned(c.h0Axis, n)).toBeCloseTo(1, 13);
    // Independent check (derivable): R^T J R = J for a finite rotation about the found axis.
    const r = rotation(c.h0Axis!, 1.1);
    expect(normMat3(subMat3(mulMat3(mulMat3(transpose3(r), j), r), j))).toBeLessThan(1e-13);
    expect(c.breaking[0]?.kind).toBe("exchange-anisotropy");
  });

  it("DM parallel to the XXZ axis keeps U(1); DM perpendicular to it gives none", () => {
    const parallel = classifySymmetry({
      bonds: ring(6, () => addMat3(diag3(1, 1, 0.9), dmMatrix([0, 0, 0.2]))),
      singleIon: [],
      fields: [],
    });
    expect(parallel.h0).toBe("u1");
    expect(aligned(parallel.h0Axis, Z)).toBeCloseTo(1, 14);
    expect(parallel.breaking.filter((f) => f.kind === "dm")).toHaveLength(6);
    expect(parallel.breaking.every((f) => f.compatibleWithAxis === true)).toBe(true);

    const crossed = classifySymmetry({
      bonds: ring(6, () => addMat3(diag3(1, 1, 0.9), dmMatrix([0.2, 0, 0]))),
      singleIon: [],
      fields: [],
    });
    expect(crossed.h0).toBe("none");
    expect(crossed.h0Axis).toBeNull();
    const dm = crossed.breaking.find((f) => f.kind === "dm");
    expect(dm?.residual).toBe("u1");
    expect(aligned(dm?.axis ?? null, [1, 0, 0])).toBeCloseTo(1, 14);
  });

  it("a tilted DM vector alone on Heisenberg bonds gives U(1) about D", () => {
    const d = normalize3([0.3, -0.4, 1])!;
    const c = classifySymmetry({ bonds: ring(4, () => addMat3(heisenberg(1), dmMatrix(scale3(d, 0.1)))), singleIon: [], fields: [] });
    expect(c.h0).toBe("u1");
    expect(aligned(c.h0Axis, d)).toBeCloseTo(1, 13);
  });

  it("XYZ with three values has no continuous symmetry", () => {
    const c = classifySymmetry({ bonds: ring(4, () => diag3(1, 0.8, 0.6)), singleIon: [], fields: [] });
    expect(c.h0).toBe("none");
    expect(c.breaking[0]?.kind).toBe("exchange-anisotropy");
    expect(c.breaking[0]?.residual).toBe("none");
  });

  it("a symmetric off-diagonal (Gamma) term is reported as off-diagonal-symmetric, class none", () => {
    const gamma: Mat3 = [
      [1, 0.1, 0],
      [0.1, 1, 0],
      [0, 0, 1],
    ];
    const c = classifySymmetry({ bonds: [{ id: "g", matrix: gamma }], singleIon: [], fields: [] });
    expect(c.h0).toBe("none");
    expect(c.breaking.map((f) => f.kind)).toEqual(["off-diagonal-symmetric"]);
  });

  it("bonds XXZ about two different axes: each U(1) alone, no common axis", () => {
    const c = classifySymmetry({
      bonds: [
        { id: "a", matrix: diag3(1, 1, 0.8) },
        { id: "b", matrix: diag3(0.8, 1, 1) },
      ],
      singleIon: [],
      fields: [],
    });
    expect(c.h0).toBe("none");
    expect(c.breaking.map((f) => f.residual)).toEqual(["u1", "u1"]);
  });

  it("sums bonds on the same pair: opposite anisotropies cancel to SU(2) (pair-sum derivation)", () => {
    const c = classifySymmetry({
      bonds: [
        { id: "a", matrix: diag3(1, 1, 1.2), sites: [0, 1] },
        { id: "b", matrix: diag3(0, 0, -0.2), sites: [1, 0] },
      ],
      singleIon: [],
      fields: [],
    });
    expect(c.h0).toBe("su2");
    // Transposition when the pair is given reversed: DM on (1,0) equals -DM on (0,1).
    const dm = classifySymmetry({
      bonds: [
        { id: "a", matrix: addMat3(heisenberg(1), dmMatrix([0, 0, 0.1])), sites: [0, 1] },
        { id: "b", matrix: dmMatrix([0, 0, 0.1]), sites: [1, 0] },
      ],
      singleIon: [],
      fields: [],
    });
    expect(dm.h0).toBe("su2");
  });

  it("single-ion D (S^z)^2 on spin 1 breaks SU(2) and leaves U(1) about z", () => {
    const c = classifySymmetry({
      bonds: ring(4, () => heisenberg(1)),
      singleIon: [0, 1, 2, 3].map((i) => ({ id: `d${i}`, matrix: diag3(0, 0, 0.3), spin: 1, site: i })),
      fields: [],
    });
    expect(c.h0).toBe("u1");
    expect(aligned(c.h0Axis, Z)).toBeCloseTo(1, 14);
    expect(c.breaking.every((f) => f.kind === "single-ion" && f.residual === "u1")).toBe(true);
  });

  it("rhombic E term gives none", () => {
    const c = classifySymmetry({
      bonds: ring(4, () => heisenberg(1)),
      singleIon: [{ id: "e", matrix: diag3(0.05, -0.05, 0.3), spin: 1 }],
      fields: [],
    });
    expect(c.h0).toBe("none");
    expect(c.breaking.map((f) => f.kind)).toEqual(["single-ion-rhombic"]);
  });

  // derivable: for S = 1/2, S^a S^b + S^b S^a = delta_ab / 2, so S.A.S = tr(A)/4 for symmetric A.
  it("ignores single-ion terms on spin 1/2 (constants) and says so in a note", () => {
    const c = classifySymmetry({
      bonds: ring(4, () => heisenberg(1)),
      singleIon: [{ id: "d", matrix: diag3(0.05, -0.05, 0.3), spin: 0.5 }],
      fields: [],
    });
    expect(c.h0).toBe("su2");
    expect(c.notes.map((n) => n.id)).toEqual(["d"]);
  });

  it("tolerance is relative to the largest coupling (default 1e-9)", () => {
    const tiny = classifySymmetry({ bonds: ring(4, () => diag3(100, 100, 100 + 1e-8)), singleIon: [], fields: [] });
    expect(tiny.h0).toBe("su2");
    const small = classifySymmetry({ bonds: ring(4, () => diag3(100, 100, 100 + 1e-5)), singleIon: [], fields: [] });
    expect(small.h0).toBe("u1");
  });
});

describe("classifySymmetry: Zeeman term", () => {
  // derivable: [S.n, h.S] = i (n x h).S vanishes iff h is parallel to n.
  it("SU(2) H0 + uniform field: U(1) about the field; zero field keeps SU(2)", () => {
    const h = normalize3([1, 1, 0])!;
    const c = classifySymmetry({ bonds: ring(6, () => heisenberg(1)), singleIon: [], fields: uniformFields(6, h) });
    expect(c.h0).toBe("su2");
    expect(c.full).toBe("u1");
    expect(aligned(c.fullAxis, h)).toBeCloseTo(1, 14);
    expect(c.fieldsUniform).toBe(true);
    const zero = classifySymmetry({ bonds: ring(6, () => heisenberg(1)), singleIon: [], fields: uniformFields(6, [0, 0, 0]) });
    expect(zero.full).toBe("su2");
  });

  it("XXZ about z + field along z: U(1); tilted field: none with transverse-field findings", () => {
    const along = classifySymmetry({ bonds: ring(6, () => diag3(1, 1, 0.7)), singleIon: [], fields: uniformFields(6, [0, 0, 0.3]) });
    expect(along.full).toBe("u1");
    expect(along.fieldsParallelToAxis).toBe(true);
    const tilted = classifySymmetry({ bonds: ring(6, () => diag3(1, 1, 0.7)), singleIon: [], fields: uniformFields(6, [0.1, 0, 0.3]) });
    expect(tilted.full).toBe("none");
    expect(tilted.fieldsParallelToAxis).toBe(false);
    expect(tilted.breaking.filter((f) => f.kind === "transverse-field")).toHaveLength(6);
  });

  // Staggered g-tensors produce staggered effective fields (physics-notes 3); the Larmor theorem
  // needs one field for all sites (physics-notes 4).
  it("staggered g-tensors give staggered effective fields: non-uniform-field, not protected", () => {
    const b: Vec3 = [0, 0, 0.5]; // muB B in energy units
    const tiltA = rotation([1, 0, 0], 0.2);
    const tiltB = rotation([1, 0, 0], -0.2);
    const g0 = diag3(2.0, 2.0, 2.3);
    const gA = mulMat3(mulMat3(tiltA, g0), transpose3(tiltA));
    const gB = mulMat3(mulMat3(tiltB, g0), transpose3(tiltB));
    const fields = Array.from({ length: 6 }, (_, i) => ({ id: `h${i}`, vector: effectiveField(i % 2 ? gB : gA, b) }));
    const c = classifySymmetry({ bonds: ring(6, () => heisenberg(1)), singleIon: [], fields });
    expect(c.h0).toBe("su2");
    expect(c.fieldsUniform).toBe(false);
    expect(c.full).toBe("none");
    expect(c.breaking.filter((f) => f.kind === "non-uniform-field")).toHaveLength(6);
    const p = resonanceProtection(c);
    expect(p.protected).toBe(false);
    expect(p.breakingIds).toContain("h0");
  });

  // Larmor theorem (physics-notes 4): only h = muB g^T B enters, so a uniform anisotropic g keeps it.
  it("uniform anisotropic g with SU(2) H0: protected, axis along g^T B rather than B", () => {
    const b: Vec3 = [0.3, 0, 0.4];
    const g = diag3(2.0, 2.0, 2.4);
    const h = effectiveField(g, b);
    const c = classifySymmetry({ bonds: ring(6, () => heisenberg(1)), singleIon: [], fields: uniformFields(6, h) });
    expect(c.full).toBe("u1");
    expect(aligned(c.fullAxis, normalize3(h)!)).toBeCloseTo(1, 14);
    expect(aligned(c.fullAxis, normalize3(b)!)).toBeLessThan(0.999);
    expect(resonanceProtection(c).protected).toBe(true);
  });

  it("DM makes the resonance unprotected and lists the bond ids", () => {
    const c = classifySymmetry({
      bonds: ring(4, () => addMat3(heisenberg(1), dmMatrix([0, 0, 0.1]))),
      singleIon: [],
      fields: uniformFields(4, [0, 0, 0.2]),
    });
    expect(c.full).toBe("u1");
    const p = resonanceProtection(c);
    expect(p.protected).toBe(false);
    expect(p.breakingIds).toEqual(["b0", "b1", "b2", "b3"]);
    expect(c.breaking[0]?.detail).toMatch(/parallel to the field/);
  });
});

describe("rotationResidual (derivable commutator criterion)", () => {
  it("vanishes exactly on a*1 + b*n n^T + c*[n]_x and not otherwise", () => {
    const n = normalize3([2, -1, 0.5])!;
    expect(rotationResidual(uniaxialMatrix3(n, 0.7, -0.3, 0.2), n)).toBeLessThan(1e-15);
    expect(rotationResidual(uniaxialMatrix3(n, 0.7, -0.3, 0.2), Z)).toBeGreaterThan(0.1);
  });
});

describe("rotationResidual", () => {
  it("is bit-identical to the norm of the commutator [M, [n]x] built from matrices", () => {
    // The written-out form must do the same floating-point operations as the matrix form.
    let x = 12345;
    const r = (): number => {
      x = (Math.imul(x, 1664525) + 1013904223) >>> 0;
      return x / 2 ** 32 - 0.5;
    };
    const axes: Vec3[] = [[0, 0, 1], [1, 0, 0], [0, 1, 0], [0, -0, 1], [-1, 0, 0]];
    for (let k = 0; k < 20000; k++) {
      const m: Mat3 = [
        [r(), r(), r()],
        [r(), r(), r()],
        [r(), r(), r()],
      ];
      const n: Vec3 = k < axes.length * 100 ? axes[k % axes.length]! : ([r(), r(), r()] as Vec3);
      const reference = normMat3(subMat3(mulMat3(m, crossMatrix3(n)), mulMat3(crossMatrix3(n), m)));
      expect(Object.is(rotationResidual(m, n), reference)).toBe(true);
    }
  });
});

describe("classifySymmetry keeps the facts of unchanged bond groups", () => {
  // The classifier hands a group's decomposition, axes and sentences on to the next call when the
  // group's entries and the tolerance are bit-identical. Edit chains in which most groups stay,
  // one changes (or one of its entries), the largest coupling moves the tolerance (and with it whether a tiny DM group
  // breaks SU(2)), groups come and go and the field turns: every kept result must equal a fresh
  // classification of the same input.
  it("gives what a fresh classification gives along random edit chains", () => {
    const r = rng(20261203);
    const pick = <T>(xs: readonly T[]): T => xs[Math.floor((r() + 0.5) * xs.length) % xs.length]!;
    const n = normalize3([0.3, -0.2, 1])!;
    const kinds: (() => Mat3)[] = [
      () => heisenberg(1 + r()),
      () => uniaxialMatrix3(Z, 1 + r(), 0.3 * r(), 0),
      () => uniaxialMatrix3(Z, 1, 0, 0.2 * r()),
      () => uniaxialMatrix3(n, 0.8, 0.1 * r(), 0.1),
      () => diag3(1 + r(), 1 + 0.5 * r(), 1),
      () => [
        [r(), r(), r()],
        [r(), r(), r()],
        [r(), r(), r()],
      ],
      // A DM vector of norm 2e-9: above the tolerance 1e-9 * scale for scale about 1, below it
      // once the largest coupling is ten times larger.
      () => uniaxialMatrix3(Z, 0, 0, 2e-9),
    ];
    for (let chain = 0; chain < 40; chain++) {
      const groups: Mat3[] = Array.from({ length: 2 + (chain % 5) }, () => pick(kinds)());
      let field: Vec3 = [0, 0, 1];
      // The ids name the terms in the findings: a renamed group must not keep the old names.
      let prefix = "b";
      const inputs: SymmetryInput[] = [];
      for (let step = 0; step < 25; step++) {
        const what = pick(["same", "one", "entry", "entry", "largest", "add", "drop", "field", "tiny", "rename"] as const);
        if (what === "rename") prefix = prefix === "b" ? "c" : "b";
        if (what === "entry") {
          // One entry of one group changes (a DM component typed, say); the other eight stay.
          const k = Math.floor((r() + 0.5) * groups.length) % groups.length;
          const m = groups[k]!.map((row) => [...row]) as unknown as number[][];
          const at = Math.floor((r() + 0.5) * 9) % 9;
          m[Math.floor(at / 3)]![at % 3]! += 0.1 * r();
          groups[k] = m as unknown as Mat3;
        } else if (what === "one") groups[Math.floor((r() + 0.5) * groups.length) % groups.length] = pick(kinds)();
        else if (what === "largest") groups[0] = heisenberg(pick([1, 10, 0.5]));
        else if (what === "add") groups.push(pick(kinds)());
        else if (what === "drop" && groups.length > 1) groups.pop();
        else if (what === "field") field = pick<Vec3>([[0, 0, 1], [1, 0, 0], normalize3([1, 1, 0])!, [0, 0, 0]]);
        else if (what === "tiny") groups[groups.length - 1] = uniaxialMatrix3(Z, 0, 0, 2e-9);
        inputs.push({
          bonds: groups.map((m, k) => ({ id: `${prefix}${k}`, matrix: m, sites: [k, k + 1] as [number, number] })),
          singleIon: [],
          fields: [0, 1].map((s) => ({ id: `f${s}`, vector: field, site: s })),
          // The sentences name the unit: kept facts must not carry another unit's sentences.
          energyUnit: pick(["meV", "meV", "K"]),
        });
      }
      const kept = inputs.map((input) => structuredClone(classifySymmetry(input)));
      inputs.forEach((input, k) => {
        forgetSymmetryFacts();
        expect(kept[k], `chain ${chain}, step ${k}`).toStrictEqual(structuredClone(classifySymmetry(input)));
      });
    }
  });

  it("keeps a group's residual per axis: a kept group is tested again about a new axis", () => {
    // Two DM groups along n1 = (3, 0, 4)/5, so H0 conserves S.n1. Then the stronger one turns to
    // n2 = (3, 0, -4)/5 (the same x and y, the opposite z): the kept weaker group commutes with n1
    // but not with n2, so H0 keeps no axis (derivable: a DM term commutes only with S along D).
    // Both axes are exact in binary up to rounding of 3/5 and 4/5, the same for both.
    const input = (strongZ: number): SymmetryInput => ({
      bonds: [
        { id: "strong", matrix: crossMatrix3([0.6, 0, strongZ * 0.8]), sites: [0, 1] },
        { id: "weak", matrix: scaleMat3(crossMatrix3([0.6, 0, 0.8]), 0.5), sites: [2, 3] },
      ],
      singleIon: [],
      fields: [],
      // A fixed scale, so that the tolerance (and with it the weak group's facts) stays the same.
      scale: 3,
    });
    forgetSymmetryFacts();
    expect(classifySymmetry(input(1)).h0).toBe("u1");
    const kept = classifySymmetry(input(-1));
    forgetSymmetryFacts();
    const fresh = classifySymmetry(input(-1));
    expect(fresh.h0).toBe("none");
    expect(kept).toStrictEqual(fresh);
  });
});
