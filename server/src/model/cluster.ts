// Expands the model on its finite cluster (periodic or open): site positions, every bond with
// its 3x3 matrix, single-ion tensors and the effective Zeeman field h_i = muB g_i^T B (meV).
// This is the neutral description the exact solver and `spinwright export` use. Model layer.
import { add3, mulMatVec3, scale3, transpose3 } from "../physics/linalg3";
import type { ClusterBond, Mat3, SpinCluster, Vec3 } from "../physics/types";
import { bondMatrix, type SpinModel } from "./model";
import { MU_B_MEV_PER_T } from "./units";

export interface FiniteCluster {
  readonly cluster: SpinCluster;
  readonly cells: readonly number[];
  readonly boundary: "periodic" | "open";
  /** Basis-site name of every cluster site, and its cell coordinates. */
  readonly labels: readonly { readonly site: string; readonly cell: readonly number[] }[];
  /** Which exchange term each cluster bond came from. */
  readonly bondTerms: readonly number[];
  readonly gTensors: readonly Mat3[];
  /** Notes about bonds that wrapped onto themselves or left an open cluster. */
  readonly notes: readonly string[];
}

export const MAX_CLUSTER_SITES = 100_000;

export type ClusterResult = { ok: true; value: FiniteCluster } | { ok: false; reason: string };

export function buildFiniteCluster(model: SpinModel, cellsOverride?: readonly number[]): ClusterResult {
  const lattice = model.lattice;
  if (!lattice) return { ok: false, reason: "The model has no valid lattice." };
  const dim = lattice.dimension;
  const cells = cellsOverride ?? model.cluster?.cells ?? new Array<number>(dim).fill(dim === 1 ? 12 : 4);
  if (cells.length !== dim) return { ok: false, reason: `A ${dim}D lattice needs ${dim} cluster sizes.` };
  if (cells.some((c) => !Number.isInteger(c) || c < 1)) return { ok: false, reason: "Cluster sizes must be positive whole numbers." };
  const boundary = model.cluster?.boundary ?? "periodic";
  const basis = lattice.sites.length;
  const cellCount = cells.reduce((a, b) => a * b, 1);
  const siteCount = cellCount * basis;
  if (siteCount > MAX_CLUSTER_SITES) return { ok: false, reason: `The cluster would have ${siteCount} sites (limit ${MAX_CLUSTER_SITES}).` };

  const cellIndex = (c: readonly number[]): number => c.reduce((acc, x, k) => acc * (cells[k] ?? 1) + x, 0);
  const cellOf = (idx: number): number[] => {
    const out = new Array<number>(dim).fill(0);
    for (let k = dim - 1; k >= 0; k--) {
      const n = cells[k] ?? 1;
      out[k] = idx % n;
      idx = Math.floor(idx / n);
    }
    return out;
  };
  const positions: Vec3[] = [];
  const spins: number[] = [];
  const fields: Vec3[] = [];
  const gTensors: Mat3[] = [];
  const labels: { site: string; cell: number[] }[] = [];
  const fieldT: Vec3 = model.field?.vectorT ?? [0, 0, 0];
  for (let c = 0; c < cellCount; c++) {
    const cell = cellOf(c);
    let origin: Vec3 = [0, 0, 0];
    cell.forEach((n, k) => {
      origin = add3(origin, scale3(lattice.vectors[k] ?? [0, 0, 0], n));
    });
    for (const s of lattice.sites) {
      positions.push(add3(origin, s.position));
      spins.push(s.spin);
      gTensors.push(s.g);
      // Zeeman term -muB B . g . S = -(muB g^T B) . S.
      fields.push(scale3(mulMatVec3(transpose3(s.g), fieldT), MU_B_MEV_PER_T));
      labels.push({ site: s.name, cell });
    }
  }
  const bonds: ClusterBond[] = [];
  const bondTerms: number[] = [];
  const notes: string[] = [];
  let selfWrapped = 0;
  for (const term of model.exchanges) {
    for (const b of term.bonds) {
      for (let c = 0; c < cellCount; c++) {
        const cell = cellOf(c);
        const target = cell.map((x, k) => x + (b.offset[k] ?? 0));
        let inside = true;
        const wrapped = target.map((x, k) => {
          const n = cells[k] ?? 1;
          if (x < 0 || x >= n) {
            if (boundary === "open") inside = false;
            return ((x % n) + n) % n;
          }
          return x;
        });
        if (!inside) continue;
        const i = c * basis + b.from;
        const j = cellIndex(wrapped) * basis + b.to;
        if (i === j) {
          selfWrapped++;
          continue;
        }
        bonds.push({ i, j, matrix: bondMatrix(term, b) });
        bondTerms.push(term.index);
      }
    }
  }
  if (selfWrapped > 0)
    notes.push(`${selfWrapped} bond(s) wrap onto their own site on this cluster and were left out; use a larger cluster.`);
  const singleIon = model.singleIon.flatMap((t) =>
    Array.from({ length: cellCount }, (_, c) => ({ site: c * basis + t.site, matrix: t.matrixMeV })),
  );
  const periodic = boundary === "periodic";
  const translations = periodic
    ? cells.map((_, k) =>
        Array.from({ length: siteCount }, (_, idx) => {
          const cell = cellOf(Math.floor(idx / basis));
          cell[k] = ((cell[k] ?? 0) + 1) % (cells[k] ?? 1);
          return cellIndex(cell) * basis + (idx % basis);
        }),
      )
    : undefined;
  const cluster: SpinCluster = {
    spins,
    positions,
    bonds,
    singleIon,
    fields,
    ...(translations
      ? { translations, translationVectors: lattice.vectors.slice(0, dim), translationPeriods: [...cells] }
      : {}),
  };
  return { ok: true, value: { cluster, cells, boundary, labels, bondTerms, gTensors, notes } };
}
