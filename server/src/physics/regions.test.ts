// Tests of region placement for the tabulated model families (physics layer). Boundary values are
// those of physics-notes sections 5 and 8; classical 2D boundaries are re-derived here by a
// Luttinger-Tisza scan so that a wrong table entry fails.
import { describe, it, expect } from "vitest";
import { nearestBoundary, placeInRegion, relativeDistance } from "./regions";

const chain = (j2: number, j1 = 1) => placeInRegion({ kind: "j1j2-chain", j1, j2 });
const xxz = (delta: number, j = 1) => placeInRegion({ kind: "xxz-chain", j, delta });

describe("spin-1/2 J1-J2 chain, J1 > 0", () => {
  // J2c = 0.2411 J1: Okamoto & Nomura, Phys. Lett. A 169, 433 (1992) (physics-notes 5).
  it("J2/J1 = 0.2411 sits on the critical point", () => {
    const p = chain(0.2411);
    expect(p.onBoundary).toBe(true);
    expect(p.name).toMatch(/critical point/);
    expect(p.boundary?.value).toBe(0.2411);
    expect(p.boundary?.source).toBe("Okamoto & Nomura, Phys. Lett. A 169, 433 (1992)");
    expect(p.gapless).toBe(true);
  });

  it("just below J2c: gapless TLL with the two-branch analysis valid; just above: dimerized", () => {
    const below = chain(0.2409);
    expect(below.name).toBe("gapless Tomonaga-Luttinger liquid");
    expect(below.gapless).toBe(true);
    expect(below.validFor).toContain("two-branch splitting");
    expect(below.distance).toBeCloseTo(0.2409 / 0.2411 - 1, 12); // definition: value/b - 1
    const above = chain(0.2413);
    expect(above.name).toMatch(/^dimerized \(gapped\), commensurate/);
    expect(above.gapless).toBe(false);
    expect(above.validFor).not.toContain("two-branch splitting");
  });

  // Majumdar-Ghosh point J2 = J1/2: Majumdar & Ghosh, J. Math. Phys. 10, 1388 (1969).
  it("J2/J1 = 0.5 is the Majumdar-Ghosh point; beyond it correlations are incommensurate", () => {
    const mg = chain(0.5);
    expect(mg.onBoundary).toBe(true);
    expect(mg.name).toMatch(/Majumdar-Ghosh/);
    expect(mg.validFor).toContain("Majumdar-Ghosh dimer state");
    expect(mg.gapless).toBe(false);
    expect(chain(0.499).name).toMatch(/commensurate/);
    expect(chain(0.499).name).not.toMatch(/incommensurate/);
    const beyond = chain(0.6);
    expect(beyond.name).toMatch(/incommensurate/);
    expect(beyond.source).toMatch(/common statement/);
    expect(beyond.distance).toBeCloseTo(0.2, 12); // 0.6/0.5 - 1
  });

  it("J2 = 0 adds the Bethe ansatz (Heisenberg chain, integrable)", () => {
    expect(chain(0).validFor).toContain("Bethe ansatz");
    expect(chain(0.1).validFor).not.toContain("Bethe ansatz");
  });

  it("scales with J1: J1 = 2, J2 = 1 is the Majumdar-Ghosh point", () => {
    expect(chain(1, 2).name).toMatch(/Majumdar-Ghosh/);
  });
});

describe("spin-1/2 J1-J2 chain, ferro J1", () => {
  // Ferromagnet for J2 < |J1|/4: Hamada et al., J. Phys. Soc. Jpn. 57, 1891 (1988) (from memory).
  it("J2/|J1| = 0.25 is the transition; source keeps the from-memory mark", () => {
    const p = chain(0.25, -1);
    expect(p.parameter).toBe("J2/|J1|");
    expect(p.onBoundary).toBe(true);
    expect(p.boundary?.source).toMatch(/Hamada et al\., J\. Phys\. Soc\. Jpn\. 57, 1891 \(1988\) \(from memory\)/);
    expect(chain(0.249, -1).name).toBe("ferromagnetic ground state");
    expect(chain(0.251, -1).name).toMatch(/singlet/);
    expect(chain(0.251, -1).gapless).toBeNull();
    expect(chain(-0.3, -1).source).toMatch(/derivable/);
  });

  it("1/4 is where the one-magnon dispersion above the ferromagnet turns soft (derivable)", () => {
    // eps(k) = |J1| (1 - cos k) + J2 (cos 2k - 1) for J1 = -1 (one flipped spin, physics-notes 5).
    const minimum = (j2: number): number => {
      let m = Number.POSITIVE_INFINITY;
      for (let i = 1; i <= 2000; i++) {
        const k = (Math.PI * i) / 2000;
        m = Math.min(m, 1 - Math.cos(k) + j2 * (Math.cos(2 * k) - 1));
      }
      return m;
    };
    const b = nearestBoundary({ kind: "j1j2-chain", j1: -1, j2: 0.2 })!.boundary.value;
    expect(minimum(b - 0.001)).toBeGreaterThan(0);
    expect(minimum(b + 0.001)).toBeLessThan(0);
  });
});

describe("XXZ chain (Bethe ansatz; Takahashi 1999)", () => {
  it("Delta = 1 and -1 are the boundaries; the gapless range is -1 < Delta <= 1", () => {
    expect(xxz(1).onBoundary).toBe(true);
    expect(xxz(1).gapless).toBe(true);
    expect(xxz(1).name).toMatch(/Heisenberg/);
    expect(xxz(-1).onBoundary).toBe(true);
    expect(xxz(-1).name).toMatch(/ferromagnetic Heisenberg/);
    expect(xxz(0.999).gapless).toBe(true);
    expect(xxz(1.001).gapless).toBe(false);
    expect(xxz(1.001).name).toMatch(/Neel/);
    expect(xxz(-0.999).gapless).toBe(true);
    expect(xxz(-1.001).name).toMatch(/ferromagnetic/);
    expect(xxz(-1.001).gapless).toBe(false);
    expect(xxz(-0.5).distance).toBeCloseTo(0.5, 12); // (-0.5 - (-1)) / |-1|
    expect(xxz(0).validFor).toContain("Bethe ansatz");
  });

  it("J < 0 maps to Delta -> -Delta (sublattice rotation, derivable)", () => {
    const p = xxz(-1.5, -1); // ferro XY-coupling with Delta = -1.5 equals J > 0 with Delta = 1.5
    expect(p.value).toBe(1.5);
    expect(p.name).toMatch(/Neel/);
  });
});

describe("spin-1 chain with D (S^z)^2", () => {
  // (D/J)c = 0.9684713(1): arXiv:1705.01558 abstract (located with the literature search).
  it("places D = 0 in the Haldane phase, the critical value on the boundary, larger D in large-D", () => {
    const h = placeInRegion({ kind: "spin1-chain-single-ion", j: 1, d: 0 });
    expect(h.name).toBe("Haldane (gapped)");
    expect(h.source).toMatch(/White & Huse/);
    expect(placeInRegion({ kind: "spin1-chain-single-ion", j: 1, d: 0.9684713 }).onBoundary).toBe(true);
    expect(placeInRegion({ kind: "spin1-chain-single-ion", j: 1, d: 1.2 }).name).toMatch(/large-D/);
    expect(placeInRegion({ kind: "spin1-chain-single-ion", j: 1, d: -0.5 }).gapless).toBeNull();
  });
});

describe("two-dimensional families: classical boundaries, debated quantum ranges", () => {
  const grid = (l: number, f: (t1: number, t2: number) => number): number => {
    let m = Number.POSITIVE_INFINITY;
    for (let a = 0; a < l; a++) for (let b = 0; b < l; b++) m = Math.min(m, f((2 * Math.PI * a) / l, (2 * Math.PI * b) / l));
    return m;
  };

  it("square: classical Neel/stripe at 1/2 agrees with a Luttinger-Tisza scan (derivable)", () => {
    const b = placeInRegion({ kind: "square-j1j2", j1: 1, j2: 0.3 }).boundary!.value;
    // J(q) = 2J1 (cos qx + cos qy) + 2J2 (cos(qx+qy) + cos(qx-qy)), J1 = 1.
    const jq = (x: number) => (qx: number, qy: number) => 2 * (Math.cos(qx) + Math.cos(qy)) + 2 * x * (Math.cos(qx + qy) + Math.cos(qx - qy));
    for (const x of [b - 0.01, b + 0.01]) {
      const neel = jq(x)(Math.PI, Math.PI);
      const stripe = jq(x)(Math.PI, 0);
      expect(grid(8, jq(x))).toBeCloseTo(Math.min(neel, stripe), 12);
      expect(neel < stripe).toBe(x < b);
    }
  });

  it("triangular: classical 120-degree/stripe at 1/8 agrees with a Luttinger-Tisza scan (derivable)", () => {
    const b = placeInRegion({ kind: "triangular-j1j2", j1: 1, j2: 0 }).boundary!.value;
    // Reduced coordinates t_k = q . a_k; a3 = a2 - a1, NNN b = a1 + a2, 2a2 - a1, a2 - 2a1.
    const jq = (x: number) => (t1: number, t2: number) =>
      2 * (Math.cos(t1) + Math.cos(t2) + Math.cos(t2 - t1)) + 2 * x * (Math.cos(t1 + t2) + Math.cos(2 * t2 - t1) + Math.cos(t2 - 2 * t1));
    for (const x of [b - 0.005, b + 0.005]) {
      const k = jq(x)((2 * Math.PI) / 3, (4 * Math.PI) / 3);
      const m = jq(x)(Math.PI, 0);
      expect(grid(12, jq(x))).toBeCloseTo(Math.min(k, m), 12);
      expect(k < m).toBe(x < b);
    }
  });

  it("honeycomb: classical Neel is the minimum only below 1/6 (Luttinger-Tisza, derivable)", () => {
    const b = placeInRegion({ kind: "honeycomb-j1j2", j1: 1, j2: 0 }).boundary!.value;
    // Lowest band J2 f - J1 sqrt(3 + f), f = 2 (cos t1 + cos t2 + cos(t2 - t1)); q = 0 is Neel.
    const band = (x: number) => (t1: number, t2: number) => {
      const f = 2 * (Math.cos(t1) + Math.cos(t2) + Math.cos(t2 - t1));
      return x * f - Math.sqrt(Math.max(0, 3 + f));
    };
    expect(grid(24, band(b - 0.005))).toBeCloseTo(band(b - 0.005)(0, 0), 12);
    expect(grid(24, band(b + 0.005))).toBeLessThan(band(b + 0.005)(0, 0) - 1e-6);
  });

  it("square quantum picture (physics-notes 8, from memory, debated)", () => {
    const neel = placeInRegion({ kind: "square-j1j2", j1: 1, j2: 0.3 });
    expect(neel.name).toBe("Neel (classical)");
    expect(neel.quantum?.name).toBe("Neel order (quantum)");
    expect(neel.quantum?.source).toMatch(/from memory, debated/);
    expect(neel.gapless).toBe(true);
    expect(neel.validFor).toContain("spin-wave theory");
    const edge = placeInRegion({ kind: "square-j1j2", j1: 1, j2: 0.42 });
    expect(edge.quantum?.uncertain).toBe(true);
    expect(edge.gapless).toBeNull();
    const window = placeInRegion({ kind: "square-j1j2", j1: 1, j2: 0.5 });
    expect(window.onBoundary).toBe(true);
    expect(window.quantum?.name).toBe("non-magnetic window");
    expect(placeInRegion({ kind: "square-j1j2", j1: 1, j2: 0.7 }).quantum?.name).toBe("stripe order (quantum)");
  });

  it("triangular at 1/8 and inside the spin-liquid window; honeycomb on both sides of 1/6", () => {
    const t = placeInRegion({ kind: "triangular-j1j2", j1: 1, j2: 0.125 });
    expect(t.onBoundary).toBe(true);
    expect(t.quantum?.name).toBe("spin-liquid window");
    expect(placeInRegion({ kind: "triangular-j1j2", j1: 1, j2: 0.05 }).quantum?.name).toBe("120-degree order (quantum)");
    expect(placeInRegion({ kind: "honeycomb-j1j2", j1: 1, j2: 0.1 }).name).toBe("Neel (classical)");
    expect(placeInRegion({ kind: "honeycomb-j1j2", j1: 1, j2: 0.18 }).name).toBe("spiral (classical)");
    expect(placeInRegion({ kind: "honeycomb-j1j2", j1: 1, j2: 0.18 }).quantum?.name).toBe("Neel order (quantum)");
    expect(placeInRegion({ kind: "honeycomb-j1j2", j1: 1, j2: 0.3 }).quantum?.name).toBe("non-magnetic window");
  });

  it("kagome J1: no boundary, no magnetic order, gapless unknown", () => {
    const k = placeInRegion({ kind: "kagome-j1", j1: 1 });
    expect(k.boundary).toBeNull();
    expect(k.gapless).toBeNull();
    expect(k.source).toMatch(/debated/);
  });
});

describe("nearestBoundary and distance", () => {
  it("picks the closer boundary and reports the side", () => {
    expect(nearestBoundary({ kind: "j1j2-chain", j1: 1, j2: 0.4 })?.boundary.value).toBe(0.5);
    expect(nearestBoundary({ kind: "j1j2-chain", j1: 1, j2: 0.3 })?.side).toBe("above");
    expect(nearestBoundary({ kind: "xxz-chain", j: 1, delta: 0.2 })?.boundary.value).toBe(1);
    expect(nearestBoundary({ kind: "kagome-j1", j1: 1 })).toBeNull();
    expect(relativeDistance(0.3, 0)).toBeCloseTo(0.3, 15);
  });

  it("outside the table: J1 = 0 chain, ferro 2D J1", () => {
    expect(chain(1, 0).name).toBe("outside the region table");
    expect(placeInRegion({ kind: "square-j1j2", j1: -1, j2: 0.3 }).boundary).toBeNull();
  });
});
