// Frustrated bond cycles: the shortest cycles of the model's bond graph on a periodic cluster,
// grouped by the couplings they contain. A cycle is frustrated when it holds an odd number of
// antiferromagnetic bonds (physics layer, cycles.ts). Analysis layer.
import { buildFiniteCluster } from "../model/cluster";
import { bondKeyOf } from "../model/lattice";
import type { ExchangeTerm, SpinModel } from "../model/model";
import { shortestCycles, type CycleEdge } from "../physics/cycles";
import { decomposeExchange } from "../physics/symmetry";
import { termLabel } from "./couplings";

export interface FrustrationGroup {
  /** A readable name, e.g. "triangle J1-J1-J2". */
  readonly cycle: string;
  readonly length: number;
  readonly couplings: readonly string[];
  readonly frustrated: boolean | null;
  /**
   * Cycles of this kind per unit cell of the lattice (counted on a periodic cluster of whole cells
   * larger than the cycles, then divided by its cells): 2 for the triangles of a triangular lattice.
   */
  readonly perCell: number;
  /** False when the search stopped at its work limit: perCell is then a lower bound. */
  readonly complete: boolean;
  /** Exchange terms on the cycle (indices into model.exchanges). */
  readonly terms: readonly number[];
}

const CYCLE_NAMES: Record<number, string> = { 3: "triangle", 4: "square plaquette", 5: "pentagon", 6: "hexagon" };

const cache = new Map<string, FrustrationGroup[]>();

/**
 * The last model's lattice, terms, summed-coupling signs and groups: a build that hands out the
 * same objects, or terms that differ only in values that keep every sign, asks again.
 */
let last: {
  readonly lattice: object;
  readonly terms: readonly ExchangeTerm[];
  readonly signs: readonly BondSign[];
  readonly groups: FrustrationGroup[];
} | null = null;

/** Same labels and bonds (sites and cell offsets), term by term: the geometry part of the key. */
function sameGeometry(a: readonly ExchangeTerm[], b: readonly ExchangeTerm[]): boolean {
  if (a.length !== b.length) return false;
  for (let k = 0; k < a.length; k++) {
    const x = a[k] as ExchangeTerm;
    const y = b[k] as ExchangeTerm;
    if (x === y) continue;
    if (x.bonds.length !== y.bonds.length || termLabel(x) !== termLabel(y)) return false;
    for (let i = 0; i < x.bonds.length; i++) {
      const p = x.bonds[i] as ExchangeTerm["bonds"][number];
      const q = y.bonds[i] as ExchangeTerm["bonds"][number];
      if (p === q) continue;
      if (p.from !== q.from || p.to !== q.to || p.offset.length !== q.offset.length || p.offset.some((o, d) => o !== q.offset[d])) return false;
    }
  }
  return true;
}

type BondSign = readonly [bond: string, sign: number];

function sameSigns(a: readonly BondSign[], b: readonly BondSign[]): boolean {
  return a.length === b.length && a.every(([bond, sign], i) => bond === b[i]?.[0] && sign === b[i]?.[1]);
}

/**
 * The groups depend only on the geometry, the terms' names and bonds, and the sign of the summed
 * isotropic coupling on each bond (two terms on one bond count by their sum): cached on that
 * fingerprint, and on the very lattice and term objects of the last call.
 */
/** "2 per cell", or "at least 2 per cell" when the search was cut short. */
export function perCellText(g: FrustrationGroup): string {
  return `${g.complete ? "" : "at least "}${Number(g.perCell.toFixed(3))} per cell`;
}

export function analyzeFrustration(model: SpinModel): FrustrationGroup[] {
  const L = model.lattice;
  if (!L || model.exchanges.length === 0) return [];
  const terms = model.exchanges;
  if (last && last.lattice === L && last.terms.length === terms.length && last.terms.every((t, k) => t === terms[k])) return last.groups;
  const sums = new Map<string, number>();
  for (const t of terms) {
    const j = t.parts.isotropic;
    for (const b of t.bonds) {
      const key = bondKeyOf(b);
      sums.set(key, (sums.get(key) ?? 0) + j);
    }
  }
  let scale = 0;
  for (const j of sums.values()) scale = Math.max(scale, Math.abs(j));
  const signs: BondSign[] = [];
  for (const [bond, j] of sums) signs.push([bond, Math.abs(j) <= 1e-12 * scale ? 0 : Math.sign(j)]);
  // A new value that keeps every sign (most typing in a coupling): the last groups stand.
  if (last && last.lattice === L && sameGeometry(last.terms, terms) && sameSigns(last.signs, signs)) {
    last = { lattice: L, terms, signs, groups: last.groups };
    return last.groups;
  }
  const key = JSON.stringify([
    L.vectors,
    L.sites.map((s) => s.position),
    terms.map((t) => [termLabel(t), t.bonds.map((b) => [b.from, b.to, b.offset])]),
    signs,
  ]);
  let groups = cache.get(key);
  if (!groups) {
    groups = computeFrustration(model);
    if (cache.size > 32) cache.delete(cache.keys().next().value as string);
    cache.set(key, groups);
  }
  last = { lattice: L, terms, signs, groups };
  return groups;
}

function computeFrustration(model: SpinModel): FrustrationGroup[] {
  const L = model.lattice;
  if (!L) return [];
  // A cluster large enough that lattice cycles are not confused with wrap-around ones.
  const longest = Math.max(...model.exchanges.flatMap((t) => t.bonds.map((b) => Math.max(...b.offset.map(Math.abs), 0))), 1);
  // Shortest cycles are local; bonds spanning many cells would need a huge cluster for little
  // gain, so such models are left out (the report then lists no cycles).
  if (longest > 4) return [];
  const side = Math.max(L.dimension === 1 ? 12 : L.dimension === 2 ? 6 : 4, 4 * longest + 1);
  const built = buildFiniteCluster(model, new Array<number>(L.dimension).fill(side));
  if (!built.ok || built.value.cluster.spins.length > 20000) return [];
  const { cluster, bondTerms, labels } = built.value;
  // Sum the isotropic parts per site pair: a pair is one bond of the graph.
  const pairs = new Map<string, { a: number; b: number; j: number; terms: Set<number> }>();
  cluster.bonds.forEach((bond, k) => {
    const a = Math.min(bond.i, bond.j);
    const b = Math.max(bond.i, bond.j);
    const key = `${a}:${b}`;
    const entry = pairs.get(key) ?? { a, b, j: 0, terms: new Set<number>() };
    entry.j += decomposeExchange(bond.matrix).isotropic;
    entry.terms.add(bondTerms[k] ?? -1);
    pairs.set(key, entry);
  });
  const scale = Math.max(0, ...[...pairs.values()].map((p) => Math.abs(p.j)));
  const edges: CycleEdge[] = [];
  const edgeTerms = new Map<string, number[]>();
  for (const p of pairs.values()) {
    if (Math.abs(p.j) <= 1e-12 * scale) continue;
    const id = `${p.a}:${p.b}`;
    edges.push({ a: p.a, b: p.b, sign: p.j > 0 ? 1 : -1, id });
    edgeTerms.set(id, [...p.terms].sort((x, y) => x - y));
  }
  const result = shortestCycles({ vertexCount: cluster.spins.length, edges }, { maxCycles: 2000, maxWork: 5e6 });
  const groups = new Map<string, { couplings: string[]; length: number; frustrated: boolean | null; count: number; terms: Set<number> }>();
  const cellOf = labels.map((l) => l.cell);
  for (const c of result.cycles) {
    // Cycles that wind around the periodic cluster are artefacts of its size, not lattice loops
    // (e.g. the second-neighbour bonds alone of a chain, closed into a ring by the cluster).
    if (c.vertices.length > 8 || winds(c.vertices, cellOf, side)) continue;
    const terms = c.edgeIds.flatMap((id) => edgeTerms.get(id) ?? []);
    // A bond several terms sum on reads "(J1 + dm #3)", so that "-" only ever separates bonds.
    const names = c.edgeIds.map((id) => bondLabel(model, edgeTerms.get(id) ?? [])).sort();
    const key = `${c.vertices.length}|${names.join(",")}|${c.frustrated}`;
    const g = groups.get(key) ?? { couplings: names, length: c.vertices.length, frustrated: c.frustrated, count: 0, terms: new Set<number>() };
    g.count++;
    terms.forEach((t) => g.terms.add(t));
    groups.set(key, g);
  }
  const cells = side ** L.dimension;
  return [...groups.values()].map((g) => ({
    cycle: `${CYCLE_NAMES[g.length] ?? `${g.length}-cycle`} ${g.couplings.join("-")}`,
    length: g.length,
    couplings: g.couplings,
    frustrated: g.frustrated,
    perCell: g.count / cells,
    complete: !result.truncated,
    terms: [...g.terms],
  }));
}

/**
 * Whether a cycle of the periodic cluster (side cells along each lattice vector) winds around it,
 * from the cells of its sites: each step's change of cell taken as its shortest image (bonds span
 * fewer than side / 2 cells), the steps of a lattice loop add up to zero and those of a winding
 * cycle to a multiple of the side.
 */
function winds(vertices: readonly number[], cellOf: readonly (readonly number[])[], side: number): boolean {
  const dim = cellOf[0]?.length ?? 0;
  for (let d = 0; d < dim; d++) {
    let sum = 0;
    for (let k = 0; k < vertices.length; k++) {
      const x = (cellOf[vertices[(k + 1) % vertices.length] as number]?.[d] ?? 0) - (cellOf[vertices[k] as number]?.[d] ?? 0);
      sum += x - side * Math.round(x / side);
    }
    if (sum !== 0) return true;
  }
  return false;
}

function bondLabel(model: SpinModel, terms: readonly number[]): string {
  const names = terms.map((t) => {
    const term = model.exchanges[t];
    return term ? termLabel(term) : "?";
  });
  return names.length === 1 ? (names[0] as string) : `(${names.join(" + ")})`;
}
