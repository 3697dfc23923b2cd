// Shortest bond cycles (girth cycles) of a finite spin-coupling graph and their frustration: a
// cycle of Heisenberg bonds is frustrated when it holds an odd number of antiferromagnetic bonds.
// Physics layer: pure graph functions of numbers; edges carry opaque `id` tags of the caller.

/** One bond: +1 antiferromagnetic, -1 ferromagnetic, 0 unknown or not Heisenberg-like. */
export interface CycleEdge {
  readonly a: number;
  readonly b: number;
  readonly sign: 1 | -1 | 0;
  readonly id: string;
}

export interface CycleGraphInput {
  readonly vertexCount: number;
  /** Edges of a finite graph (periodic images already resolved by the caller). */
  readonly edges: readonly CycleEdge[];
}

export interface CycleOptions {
  /** Stop after this many distinct minimal cycles (default 1000). */
  readonly maxCycles?: number;
  /** Step budget for each of the two phases (girth, enumeration); default 1e7. Never hangs. */
  readonly maxWork?: number;
}

export interface BondCycle {
  /** Vertices in cycle order, starting at the smallest index. */
  readonly vertices: readonly number[];
  /** Edge ids in the same order (edge k joins vertices[k] and vertices[k+1 mod length]). */
  readonly edgeIds: readonly string[];
  readonly antiferroCount: number;
  /**
   * Odd number of antiferromagnetic edges, i.e. the product of (-sign) over the cycle is
   * negative: no collinear arrangement satisfies every bond (derivable: going round the cycle,
   * each AF bond flips the spin and each F bond keeps it, so an odd count returns it reversed).
   * Null when an edge has sign 0.
   */
  readonly frustrated: boolean | null;
}

export interface CycleAnalysis {
  /** Length of the shortest cycle of length >= 3; null for a forest. */
  readonly girth: number | null;
  /** Distinct cycles of length `girth` (up to maxCycles). */
  readonly cycles: readonly BondCycle[];
  readonly frustratedCount: number;
  /** True when maxCycles or maxWork cut the search short. */
  readonly truncated: boolean;
  /**
   * False when maxWork stopped the girth search early: `girth` is then the shortest cycle length
   * seen, an upper bound (large-girth graphs such as very long rings cost O(V^2) to certify).
   */
  readonly girthExact: boolean;
  /** Vertex pairs joined by more than one edge (2-cycles, excluded from the girth). */
  readonly parallelEdges: readonly { readonly a: number; readonly b: number; readonly ids: readonly string[] }[];
  /** Self-loops (a == b): not a bond between two spins, ignored. */
  readonly ignoredEdgeIds: readonly string[];
}

interface Adjacent {
  readonly to: number;
  readonly edge: number;
}

/**
 * Girth by breadth-first search from every vertex s over the vertices >= s: a non-tree edge
 * (u, w) closes a closed walk of length d(u) + d(w) + 1 that contains a cycle at most that long,
 * and when s is the smallest vertex of a shortest cycle C (which then lies in the searched
 * subgraph) the vertices of C at distance floor(g/2) from s close a walk of exactly g, so the
 * minimum over roots is the girth (standard BFS girth argument). The search from a root stops
 * once 2 d(u) + 1 reaches the best length so far, so on lattices each search only sees a small
 * ball. The minimal cycles are then enumerated by depth-limited search from each root s over
 * vertices > s (s is the smallest vertex of the cycles it reports), pruned by the BFS distance
 * to s, and deduplicated by their edge sets (each cycle is met once in each direction).
 */
export function shortestCycles(input: CycleGraphInput, options: CycleOptions = {}): CycleAnalysis {
  const n = input.vertexCount;
  const maxCycles = options.maxCycles ?? 1000;
  const maxWork = options.maxWork ?? 1e7;
  const adjacency: Adjacent[][] = Array.from({ length: n }, () => []);
  const ignoredEdgeIds: string[] = [];
  const pairEdges = new Map<string, number[]>();
  input.edges.forEach((e, index) => {
    if (!Number.isInteger(e.a) || !Number.isInteger(e.b) || e.a < 0 || e.b < 0 || e.a >= n || e.b >= n) {
      throw new RangeError(`edge ${e.id}: vertex out of range 0..${n - 1}`);
    }
    if (e.a === e.b) {
      ignoredEdgeIds.push(e.id);
      return;
    }
    adjacency[e.a]!.push({ to: e.b, edge: index });
    adjacency[e.b]!.push({ to: e.a, edge: index });
    const key = `${Math.min(e.a, e.b)}:${Math.max(e.a, e.b)}`;
    const list = pairEdges.get(key);
    if (list) list.push(index);
    else pairEdges.set(key, [index]);
  });
  const parallelEdges = [...pairEdges.entries()]
    .filter(([, list]) => list.length > 1)
    .map(([key, list]) => {
      const [a, b] = key.split(":").map(Number);
      return { a: a ?? 0, b: b ?? 0, ids: list.map((i) => input.edges[i]?.id ?? "") };
    });

  let work = 0;
  let truncated = false;
  const dist = new Int32Array(n).fill(-1);
  const parent = new Int32Array(n).fill(-1);
  const queue = new Int32Array(Math.max(n, 1));
  const touched: number[] = [];
  const resetBfs = (): void => {
    for (const v of touched) {
      dist[v] = -1;
      parent[v] = -1;
    }
    touched.length = 0;
  };

  // Girth.
  let girth = Number.POSITIVE_INFINITY;
  for (let s = 0; s < n && !truncated; s++) {
    let head = 0;
    let tail = 0;
    queue[tail++] = s;
    dist[s] = 0;
    touched.push(s);
    while (head < tail) {
      const u = queue[head++]!;
      const du = dist[u]!;
      if (2 * du + 1 >= girth) break;
      for (const { to: w } of adjacency[u]!) {
        if (++work > maxWork) {
          truncated = true;
          break;
        }
        if (w < s) continue;
        if (dist[w] === -1) {
          dist[w] = du + 1;
          parent[w] = u;
          touched.push(w);
          queue[tail++] = w;
        } else if (w !== parent[u] && parent[w] !== u) {
          // An edge between a vertex and its tree parent or child can only be the tree edge or
          // a parallel copy of it (a 2-cycle, excluded by definition).
          girth = Math.min(girth, du + dist[w]! + 1);
        }
      }
      if (truncated) break;
    }
    resetBfs();
  }
  const girthExact = !truncated;
  if (!Number.isFinite(girth)) {
    return { girth: null, cycles: [], frustratedCount: 0, truncated, girthExact, parallelEdges, ignoredEdgeIds };
  }
  const g = girth;
  work = 0;
  truncated = false;

  // Enumeration of the cycles of length g.
  const cycles: BondCycle[] = [];
  const seen = new Set<string>();
  const onPath = new Uint8Array(n);
  const pathVertices: number[] = [];
  const pathEdges: number[] = [];

  const record = (): void => {
    const key = [...pathEdges].sort((x, y) => x - y).join(",");
    if (seen.has(key)) return;
    if (cycles.length >= maxCycles) {
      // A further distinct cycle exists beyond the cap.
      truncated = true;
      return;
    }
    seen.add(key);
    let antiferroCount = 0;
    let unknown = false;
    for (const e of pathEdges) {
      const sign = input.edges[e]?.sign ?? 0;
      if (sign === 1) antiferroCount++;
      else if (sign === 0) unknown = true;
    }
    cycles.push({
      vertices: [...pathVertices],
      edgeIds: pathEdges.map((e) => input.edges[e]?.id ?? ""),
      antiferroCount,
      frustrated: unknown ? null : antiferroCount % 2 === 1,
    });
  };

  // Depth-first search without recursion (the depth equals the girth, which can be large):
  // `cursor[k]` is the next adjacency index to try at path vertex k.
  const cursor: number[] = [];
  const search = (s: number): void => {
    onPath[s] = 1;
    pathVertices.push(s);
    cursor.push(0);
    while (cursor.length > 0 && !truncated) {
      const depth = cursor.length - 1; // edges on the path so far
      const v = pathVertices[depth]!;
      const list = adjacency[v]!;
      const k = cursor[depth]!;
      if (k >= list.length) {
        cursor.pop();
        pathVertices.pop();
        onPath[v] = 0;
        if (pathEdges.length > 0 && cursor.length > 0) pathEdges.pop();
        continue;
      }
      cursor[depth] = k + 1;
      if (++work > maxWork) {
        truncated = true;
        break;
      }
      const { to: w, edge } = list[k]!;
      if (w === s) {
        // g >= 3, so closing at depth + 1 === g never reuses the first edge.
        if (depth + 1 === g) {
          pathEdges.push(edge);
          record();
          pathEdges.pop();
        }
        continue;
      }
      if (w < s || onPath[w] || depth + 1 >= g) continue;
      const dw = dist[w]!;
      if (dw === -1 || dw > g - (depth + 1)) continue;
      onPath[w] = 1;
      pathVertices.push(w);
      pathEdges.push(edge);
      cursor.push(0);
    }
    // Unwind whatever a truncation left on the stacks.
    for (const v of pathVertices) onPath[v] = 0;
    pathVertices.length = 0;
    pathEdges.length = 0;
    cursor.length = 0;
  };

  for (let s = 0; s < n && !truncated; s++) {
    // Distances from s within the vertices >= s, up to depth g - 1, for pruning.
    let head = 0;
    let tail = 0;
    queue[tail++] = s;
    dist[s] = 0;
    touched.push(s);
    while (head < tail) {
      const u = queue[head++]!;
      if (dist[u]! >= g - 1) continue;
      for (const { to: w } of adjacency[u]!) {
        if (++work > maxWork) {
          truncated = true;
          break;
        }
        if (w < s || dist[w] !== -1) continue;
        dist[w] = dist[u]! + 1;
        touched.push(w);
        queue[tail++] = w;
      }
      if (truncated) break;
    }
    if (!truncated) search(s);
    resetBfs();
  }

  return {
    girth: g,
    cycles,
    frustratedCount: cycles.filter((c) => c.frustrated === true).length,
    truncated: truncated || !girthExact,
    girthExact,
    parallelEdges,
    ignoredEdgeIds,
  };
}
