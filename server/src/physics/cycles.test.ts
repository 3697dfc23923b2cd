// Tests of the shortest-cycle search and the odd-AF-count frustration rule (physics layer).
// Expected cycle counts are derivable by counting plaquettes of the periodic clusters built here.
import { describe, it, expect } from "vitest";
import { shortestCycles, type CycleEdge } from "./cycles";

type Sign = 1 | -1 | 0;

/** Ring of n sites with bonds to neighbours at distance 1 (sign s1) and 2 (sign s2, optional). */
function j1j2Ring(n: number, s1: Sign, s2: Sign | null): CycleEdge[] {
  const edges: CycleEdge[] = [];
  for (let i = 0; i < n; i++) {
    edges.push({ a: i, b: (i + 1) % n, sign: s1, id: `J1_${i}` });
    if (s2 !== null) edges.push({ a: i, b: (i + 2) % n, sign: s2, id: `J2_${i}` });
  }
  return edges;
}

/** Periodic L x L cluster of a Bravais lattice with the given neighbour offsets (each bond once). */
function periodic(l: number, offsets: readonly (readonly [number, number, Sign, string])[]): CycleEdge[] {
  const site = (x: number, y: number): number => ((x + l) % l) + l * ((y + l) % l);
  const edges: CycleEdge[] = [];
  for (let y = 0; y < l; y++) {
    for (let x = 0; x < l; x++) {
      for (const [dx, dy, sign, name] of offsets) {
        edges.push({ a: site(x, y), b: site(x + dx, y + dy), sign, id: `${name}_${x}_${y}` });
      }
    }
  }
  return edges;
}

/** Periodic kagome cluster of L x L unit cells (3 sites each), AF nearest-neighbour bonds. */
function kagome(l: number): CycleEdge[] {
  const site = (x: number, y: number, s: number): number => 3 * (((x + l) % l) + l * ((y + l) % l)) + s;
  const edges: CycleEdge[] = [];
  for (let y = 0; y < l; y++) {
    for (let x = 0; x < l; x++) {
      // Up triangle inside the cell: sublattices 0 (origin), 1 (+a1/2), 2 (+a2/2).
      edges.push({ a: site(x, y, 0), b: site(x, y, 1), sign: 1, id: `u01_${x}_${y}` });
      edges.push({ a: site(x, y, 0), b: site(x, y, 2), sign: 1, id: `u02_${x}_${y}` });
      edges.push({ a: site(x, y, 1), b: site(x, y, 2), sign: 1, id: `u12_${x}_${y}` });
      // Down triangle: 0 of this cell with 1 of cell -a1 and 2 of cell -a2; and 1(-a1) with 2(-a2).
      edges.push({ a: site(x, y, 0), b: site(x - 1, y, 1), sign: 1, id: `d01_${x}_${y}` });
      edges.push({ a: site(x, y, 0), b: site(x, y - 1, 2), sign: 1, id: `d02_${x}_${y}` });
      edges.push({ a: site(x - 1, y, 1), b: site(x, y - 1, 2), sign: 1, id: `d12_${x}_${y}` });
    }
  }
  return edges;
}

describe("shortestCycles: J1-J2 chain on a 12-site ring", () => {
  it("both AF: 12 triangles (i, i+1, i+2), all frustrated (three AF bonds)", () => {
    const r = shortestCycles({ vertexCount: 12, edges: j1j2Ring(12, 1, 1) });
    expect(r.girth).toBe(3);
    expect(r.cycles).toHaveLength(12);
    expect(r.frustratedCount).toBe(12);
    expect(r.truncated).toBe(false);
    expect(r.girthExact).toBe(true);
    const first = r.cycles.find((c) => c.vertices[0] === 0 && c.vertices.includes(1) && c.vertices.includes(2));
    expect([...(first?.edgeIds ?? [])].sort()).toEqual(["J1_0", "J1_1", "J2_0"]);
  });

  it("ferro J1 + AF J2: frustrated (one AF bond per triangle)", () => {
    const r = shortestCycles({ vertexCount: 12, edges: j1j2Ring(12, -1, 1) });
    expect(r.cycles).toHaveLength(12);
    expect(r.cycles.every((c) => c.antiferroCount === 1 && c.frustrated === true)).toBe(true);
  });

  it("AF J1 + ferro J2: not frustrated (two AF bonds, even)", () => {
    const r = shortestCycles({ vertexCount: 12, edges: j1j2Ring(12, 1, -1) });
    expect(r.cycles).toHaveLength(12);
    expect(r.frustratedCount).toBe(0);
    expect(r.cycles.every((c) => c.antiferroCount === 2)).toBe(true);
  });

  it("maxCycles: exactly that many cycles is complete, one fewer is truncated", () => {
    expect(shortestCycles({ vertexCount: 12, edges: j1j2Ring(12, 1, 1) }, { maxCycles: 12 }).truncated).toBe(false);
    const cut = shortestCycles({ vertexCount: 12, edges: j1j2Ring(12, 1, 1) }, { maxCycles: 11 });
    expect(cut.truncated).toBe(true);
    expect(cut.cycles).toHaveLength(11);
  });

  it("sign 0 makes frustration undetermined", () => {
    const r = shortestCycles({ vertexCount: 12, edges: j1j2Ring(12, 1, 0) });
    expect(r.cycles.every((c) => c.frustrated === null)).toBe(true);
  });
});

describe("shortestCycles: plain rings", () => {
  it("even AF ring: one cycle of length n, unfrustrated; odd ring: frustrated", () => {
    const even = shortestCycles({ vertexCount: 12, edges: j1j2Ring(12, 1, null) });
    expect(even.girth).toBe(12);
    expect(even.cycles).toHaveLength(1);
    expect(even.cycles[0]?.frustrated).toBe(false);
    const odd = shortestCycles({ vertexCount: 11, edges: j1j2Ring(11, 1, null) });
    expect(odd.girth).toBe(11);
    expect(odd.cycles[0]?.frustrated).toBe(true);
  });

  it("an open chain has no cycle; self-loops are ignored; parallel bonds are reported", () => {
    const open = shortestCycles({
      vertexCount: 4,
      edges: [
        { a: 0, b: 1, sign: 1, id: "a" },
        { a: 1, b: 2, sign: 1, id: "b" },
        { a: 1, b: 2, sign: 1, id: "b2" },
        { a: 2, b: 2, sign: 1, id: "loop" },
      ],
    });
    expect(open.girth).toBeNull();
    expect(open.ignoredEdgeIds).toEqual(["loop"]);
    expect(open.parallelEdges).toEqual([{ a: 1, b: 2, ids: ["b", "b2"] }]);
  });

  it("rejects a vertex index out of range", () => {
    expect(() => shortestCycles({ vertexCount: 2, edges: [{ a: 0, b: 2, sign: 1, id: "x" }] })).toThrow(RangeError);
  });
});

describe("shortestCycles: two-dimensional clusters", () => {
  it("triangular 4x4 torus: 2 triangles per site = 32, all frustrated", () => {
    // 4x4 avoids the 3-site wrap-around loops a 3x3 torus would add.
    const edges = periodic(4, [
      [1, 0, 1, "a1"],
      [0, 1, 1, "a2"],
      [-1, 1, 1, "a3"],
    ]);
    const r = shortestCycles({ vertexCount: 16, edges });
    expect(r.girth).toBe(3);
    expect(r.cycles).toHaveLength(32);
    expect(r.frustratedCount).toBe(32);
  });

  it("kagome 3x3 cells: 2 triangles per cell = 18, all frustrated", () => {
    const r = shortestCycles({ vertexCount: 27, edges: kagome(3) });
    expect(r.girth).toBe(3);
    expect(r.cycles).toHaveLength(18);
    expect(r.frustratedCount).toBe(18);
  });

  it("square 6x6 torus, AF J1: 36 plaquettes, 4 AF bonds each, unfrustrated", () => {
    const edges = periodic(6, [
      [1, 0, 1, "x"],
      [0, 1, 1, "y"],
    ]);
    const r = shortestCycles({ vertexCount: 36, edges });
    expect(r.girth).toBe(4);
    expect(r.cycles).toHaveLength(36);
    expect(r.frustratedCount).toBe(0);
  });

  it("square 6x6 with AF J2 diagonals: 4 triangles per plaquette = 144, all frustrated", () => {
    const edges = periodic(6, [
      [1, 0, 1, "x"],
      [0, 1, 1, "y"],
      [1, 1, 1, "d"],
      [1, -1, 1, "e"],
    ]);
    const r = shortestCycles({ vertexCount: 36, edges });
    expect(r.girth).toBe(3);
    expect(r.cycles).toHaveLength(144);
    expect(r.frustratedCount).toBe(144);
  });

  it("a 200x200 square torus stops at the cycle cap without hanging", () => {
    const edges = periodic(200, [
      [1, 0, 1, "x"],
      [0, 1, 1, "y"],
    ]);
    const started = Date.now();
    const r = shortestCycles({ vertexCount: 40000, edges });
    expect(r.girth).toBe(4);
    expect(r.cycles).toHaveLength(1000);
    expect(r.truncated).toBe(true);
    // Generous bound, only to catch a runaway search; not a speed target.
    expect(Date.now() - started).toBeLessThan(10_000);
  });

  it("a long ring exceeds the girth budget: girth reported as an upper bound, cycle still found", () => {
    const r = shortestCycles({ vertexCount: 3000, edges: j1j2Ring(3000, 1, null) }, { maxWork: 1e6 });
    expect(r.girthExact).toBe(false);
    expect(r.truncated).toBe(true);
    expect(r.girth).toBe(3000);
    expect(r.cycles).toHaveLength(1);
  });

  it("maxWork cuts the search and reports truncation", () => {
    const edges = periodic(20, [
      [1, 0, 1, "x"],
      [0, 1, 1, "y"],
    ]);
    const r = shortestCycles({ vertexCount: 400, edges }, { maxWork: 500 });
    expect(r.truncated).toBe(true);
  });
});
