// Engine mechanics: eigensolvers against mathjs (general-purpose reference), restarts, the row
// cache versus the matrix-free kernels, translation relabelling, long chains, cancellation and
// the size limit.
import { eigs } from "mathjs";
import { describe, expect, it } from "vitest";
import type { Mat3, SpinCluster, Vec3 } from "../types";
import { CancelledError, EdSizeError } from "./errors";
import { continuedFraction, lanczosEigen, type VectorOperator } from "./lanczos";
import { solveExact } from "./solve";
import { symmetricEigen, tridiagonalEigen } from "./symEigen";
import { heisenbergRing, mulberry, ring, withDM, xxz } from "./clusters.testutil";

const Z: Vec3 = [0, 0, 1];

function randomSymmetricDense(n: number, seed: number): Float64Array {
  const r = mulberry(seed);
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++)
    for (let j = i; j < n; j++) {
      const v = 2 * r() - 1;
      a[i * n + j] = v;
      a[j * n + i] = v;
    }
  return a;
}

function denseOperator(a: Float64Array, n: number): VectorOperator {
  return {
    length: n,
    complex: false,
    dim: n,
    apply: (x, y) => {
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let j = 0; j < n; j++) s += a[i * n + j]! * x[j]!;
        y[i] = s;
      }
    },
    mask: () => {},
  };
}

describe("dense eigensolvers", () => {
  it("tred2/tql2 and the tridiagonal QL agree with mathjs eigs", () => {
    const n = 30;
    const a = randomSymmetricDense(n, 3);
    const mine = symmetricEigen(a, n);
    const rows: number[][] = [];
    for (let i = 0; i < n; i++) rows.push(Array.from(a.subarray(i * n, (i + 1) * n)));
    const ref = (eigs(rows) as unknown as { values: number[] }).values.map(Number).sort((x, y) => x - y);
    for (let i = 0; i < n; i++) expect(Math.abs(mine.values[i]! - ref[i]!)).toBeLessThan(1e-11);
    // eigenvector check A v = lambda v
    for (let j = 0; j < n; j += 7) {
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let k = 0; k < n; k++) s += a[i * n + k]! * mine.vectors[k * n + j]!;
        expect(Math.abs(s - mine.values[j]! * mine.vectors[i * n + j]!)).toBeLessThan(1e-11);
      }
    }
    const diag = [1, 2, 3, 4, 5];
    const off = [0.5, -0.3, 0.2, 0.7];
    const t = tridiagonalEigen(diag, off, 5, [0]);
    const dense = new Float64Array(25);
    for (let i = 0; i < 5; i++) dense[i * 5 + i] = diag[i]!;
    for (let i = 0; i < 4; i++) dense[i * 5 + i + 1] = dense[(i + 1) * 5 + i] = off[i]!;
    const full = symmetricEigen(dense, 5);
    for (let i = 0; i < 5; i++) {
      expect(Math.abs(t.values[i]! - full.values[i]!)).toBeLessThan(1e-13);
      expect(Math.abs(Math.abs(t.rows[0]![i]!) - Math.abs(full.vectors[i]!))).toBeLessThan(1e-12);
    }
  });

  it("thick-restart Lanczos with a small Krylov space finds the lowest levels and vectors", () => {
    const n = 200;
    const a = randomSymmetricDense(n, 9);
    const ref = symmetricEigen(a, n);
    const res = lanczosEigen(denseOperator(a, n), { nev: 4, tol: 1e-10, maxKrylov: 14, maxMatvecs: 20000, vectors: 2 });
    expect(res.converged).toBe(true);
    expect(res.restarts).toBeGreaterThan(0);
    for (let i = 0; i < 4; i++) expect(Math.abs(res.values[i]! - ref.values[i]!)).toBeLessThan(1e-9);
    const v = res.vectors[0]!;
    let overlap = 0;
    for (let i = 0; i < n; i++) overlap += v[i]! * ref.vectors[i * n]!;
    expect(Math.abs(Math.abs(overlap) - 1)).toBeLessThan(1e-9);
  });

  it("continued fraction reproduces the spectral measure of a small matrix", () => {
    const n = 40;
    const a = randomSymmetricDense(n, 4);
    const ref = symmetricEigen(a, n);
    const phi = new Float64Array(n);
    const r = mulberry(1);
    for (let i = 0; i < n; i++) phi[i] = r() - 0.5;
    const cf = continuedFraction(denseOperator(a, n), phi, { maxSteps: 200, poleTol: 1e-6, weightTol: 0, mergeTol: 1e-10 });
    let norm2 = 0;
    for (let i = 0; i < n; i++) norm2 += phi[i]! ** 2;
    for (let k = 0; k < n; k++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += ref.vectors[i * n + k]! * phi[i]!;
      const p = cf.poles.find((x) => Math.abs(x.energy - ref.values[k]!) < 1e-8);
      expect(p, `pole ${k}`).toBeDefined();
      expect(Math.abs(p!.weight - s * s)).toBeLessThan(1e-9 * norm2);
    }
  });
});

describe("sectors, kernels and bases", () => {
  it("cached rows and the matrix-free kernels give identical results", () => {
    const c = ring({ N: 12, J1: withDM(xxz(1, 0.9), [0, 0, 0.2]), J2: xxz(0.3), field: [0, 0, 0.7] });
    const opts = { conservedAxis: Z, sz: [1, 2], correlators: { components: ["-+" as const, "zz" as const] } };
    const a = solveExact(c, opts);
    const b = solveExact(c, { ...opts, cacheRows: false });
    expect(a.stats.kernel).toBe("bits+rows");
    expect(b.stats.kernel).toBe("bits");
    expect(Math.abs(a.groundEnergyMeV - b.groundEnergyMeV)).toBeLessThan(1e-11);
    for (let i = 0; i < a.correlators.length; i++) {
      const pa = a.correlators[i]!.poles;
      const pb = b.correlators[i]!.poles;
      expect(Math.abs(a.correlators[i]!.sumRule.expected - b.correlators[i]!.sumRule.expected)).toBeLessThan(1e-12);
      const topA = [...pa].sort((x, y) => y.weight - x.weight)[0]!;
      const topB = [...pb].sort((x, y) => y.weight - x.weight)[0]!;
      expect(Math.abs(topA.energyMeV - topB.energyMeV)).toBeLessThan(1e-9);
    }
    // the general mixed-radix kernel (spin 1/2 without U(1) frame) agrees too
    const g = solveExact(c, { sz: "all", quantizationAxis: Z, correlators: false });
    expect(g.stats.kernel.startsWith("generic")).toBe(true);
    const allSz = solveExact(c, { conservedAxis: Z, correlators: false });
    expect(Math.abs(g.groundEnergyMeV - allSz.groundEnergyMeV)).toBeLessThan(1e-10);
  });

  it("momentum sectors agree with the unresolved S^z sector (ladder with a non-trivial site order)", () => {
    // 2-leg ladder, rungs (i, i + L), legs along the translation i -> i + 1 (mod L) on each leg.
    const L = 6;
    const N = 2 * L;
    const bonds: { i: number; j: number; matrix: Mat3 }[] = [];
    for (let i = 0; i < L; i++) {
      bonds.push({ i, j: (i + 1) % L, matrix: xxz(1) });
      bonds.push({ i: L + i, j: L + ((i + 1) % L), matrix: xxz(1) });
      bonds.push({ i, j: L + i, matrix: withDM(xxz(0.7), [0, 0, 0.2]) });
    }
    const perm = Array.from({ length: N }, (_, s) => (s < L ? (s + 1) % L : L + ((s - L + 1) % L)));
    const c: SpinCluster = {
      spins: new Array<number>(N).fill(0.5),
      positions: Array.from({ length: N }, (_, s) => [s % L, s < L ? 0 : 1, 0] as Vec3),
      bonds,
      singleIon: [],
      fields: new Array<Vec3>(N).fill([0, 0, 0.4]),
      translations: [perm],
      translationVectors: [[1, 0, 0]],
    };
    const k = solveExact(c, { conservedAxis: Z, sz: [0, 1], correlators: false });
    const plain = solveExact(c, { conservedAxis: Z, sz: [0, 1], useTranslations: false, correlators: false });
    expect(k.translationPeriod).toBe(L);
    expect(k.warnings).toEqual([]);
    for (const sz of [0, 1]) {
      const a = Math.min(...k.sectors.filter((s) => s.sz === sz).map((s) => s.lowestEnergyMeV));
      const b = plain.sectors.find((s) => s.sz === sz)!.lowestEnergyMeV;
      expect(Math.abs(a - b)).toBeLessThan(1e-10);
      // dimensions of the momentum sectors add up to the S^z sector
      const sum = k.sectors.filter((s) => s.sz === sz).reduce((acc, s) => acc + s.dimension, 0);
      expect(sum).toBe(plain.sectors.find((s) => s.sz === sz)!.dimension);
    }
  });

  it("a claimed translation that is not a symmetry is not used (warning)", () => {
    const c = heisenbergRing(8, 1);
    const broken: SpinCluster = { ...c, fields: c.fields.map((f, i) => (i === 0 ? ([0, 0, 0.3] as Vec3) : f)) };
    const r = solveExact(broken, { conservedAxis: Z, sz: [0], correlators: false });
    expect(r.translationPeriod).toBeNull();
    expect(r.warnings.join(" ")).toMatch(/not invariant/);
  });

  it("40-site ring near saturation (binary-search ranking, general kernel): one-magnon band exactly", () => {
    // One flipped spin above the polarized state: E = J N/4 + J (cos k - 1) - h (N/2 - 1), exact.
    const N = 40;
    const J = 1;
    const h = 0.3;
    const r = solveExact(heisenbergRing(N, J, 0, h), { conservedAxis: Z, sz: [N / 2 - 1, N / 2 - 2], correlators: false });
    const one = r.sectors.filter((s) => s.sz === N / 2 - 1);
    expect(one.length).toBe(N / 2 + 1); // mirrored momenta 0..N/2
    for (const s of one) {
      const k = (2 * Math.PI * s.kIndex!) / N;
      const exact = (J * N) / 4 + J * (Math.cos(k) - 1) - h * (N / 2 - 1);
      expect(Math.abs(s.lowestEnergyMeV - exact)).toBeLessThan(1e-10);
    }
    const two = r.sectors.filter((s) => s.sz === N / 2 - 2);
    // k and -k are mirrored (real H): count the others twice
    const total = two.reduce((a, s) => a + (s.kIndex === 0 || s.kIndex === N / 2 ? 1 : 2) * s.dimension, 0);
    expect(total).toBe((N * (N - 1)) / 2);
    expect(r.stats.kernel.startsWith("generic")).toBe(true);
  });

  it("levels per sector with restarts agree with a large Krylov space", () => {
    const c = heisenbergRing(12, 1, 0.3, 0.1);
    const a = solveExact(c, { conservedAxis: Z, sz: [0], momenta: [0, 3], levels: 4, maxKrylov: 10, correlators: false });
    const b = solveExact(c, { conservedAxis: Z, sz: [0], momenta: [0, 3], levels: 4, correlators: false });
    for (let s = 0; s < 2; s++)
      for (let i = 0; i < 4; i++)
        expect(Math.abs(a.sectors[s]!.levelsMeV[i]! - b.sectors[s]!.levelsMeV[i]!)).toBeLessThan(1e-9);
  });
});

describe("cancellation and limits", () => {
  it("a signal aborted mid-run throws CancelledError", () => {
    const signal = { aborted: false };
    let calls = 0;
    const run = (): unknown =>
      solveExact(
        heisenbergRing(16, 1),
        { conservedAxis: Z },
        {
          signal,
          onProgress: () => {
            if (++calls === 2) signal.aborted = true;
          },
        },
      );
    expect(run).toThrow(CancelledError);
    expect(calls).toBeGreaterThanOrEqual(2);
    expect(() => solveExact(heisenbergRing(8, 1), {}, { signal: { aborted: true } })).toThrow(CancelledError);
  });

  it("reports progress from 0 to 1 with stage names", () => {
    const seen: [number, string][] = [];
    solveExact(heisenbergRing(10, 1, 0, 1), { conservedAxis: Z }, { onProgress: (f, s) => seen.push([f, s]) });
    expect(seen.length).toBeGreaterThan(2);
    expect(seen[seen.length - 1]).toEqual([1, "done"]);
    for (let i = 1; i < seen.length; i++) expect(seen[i]![0]).toBeGreaterThanOrEqual(seen[i - 1]![0] - 1e-12);
    expect(new Set(seen.map((s) => s[1]))).toContain("correlators");
  });

  it("the size limit gives a clear error with dimension and memory, before allocating", () => {
    let err: unknown;
    try {
      solveExact(heisenbergRing(16, 1), { conservedAxis: Z, sz: [0], maxStates: 500 });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(EdSizeError);
    const e = err as EdSizeError;
    expect(e.dimension).toBeGreaterThan(500);
    expect(e.message).toMatch(/S\^z = 0/);
    expect(e.message).toMatch(/states/);
    expect(e.message).toMatch(/would need about [\d.]+ (KiB|MiB|GiB)/);
    expect(e.code).toBe("too-large");
    // memory budget
    expect(() => solveExact(heisenbergRing(16, 1), { conservedAxis: Z, sz: [0], maxMemoryBytes: 200_000 })).toThrow(
      EdSizeError,
    );
    // a 64-site cluster without U(1): refused at once
    const t0 = performance.now();
    const big = heisenbergRing(64, 1, 0, 0.1);
    expect(() => solveExact(big, {})).toThrow(/too large/);
    expect(performance.now() - t0).toBeLessThan(2000);
  });
});
