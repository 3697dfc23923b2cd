// The neutral JSON description of the finite cluster (`spinwright export`), documented by
// docs/cluster.schema.json: sites, bonds with 3x3 matrices, single-ion tensors, field, units.
// Model layer (used by the CLI and the language server).
import { buildFiniteCluster } from "./cluster";
import type { SpinModel } from "./model";

export const EXPORT_FORMAT_VERSION = 1;

export function exportCluster(model: SpinModel, cells?: readonly number[]): { ok: true; json: object } | { ok: false; reason: string } {
  const built = buildFiniteCluster(model, cells);
  if (!built.ok) return built;
  const f = built.value;
  const c = f.cluster;
  return {
    ok: true,
    json: {
      format: "spinwright-cluster",
      version: EXPORT_FORMAT_VERSION,
      model: model.name,
      units: { energy: "meV", field: "T", length: "lattice units" },
      hamiltonian:
        "H = sum_bonds S_i . J . S_j + sum_i S_i . A_i . S_i - sum_i h_i . S_i, h_i = muB g_i^T B (each bond once)",
      convention: model.convention?.value ?? "antiferro-positive (assumed)",
      lattice: {
        preset: model.lattice?.preset ?? null,
        vectors: model.lattice?.vectors ?? [],
        basis: (model.lattice?.sites ?? []).map((s) => ({ name: s.name, position: s.position, spin: s.spin })),
      },
      cluster: { cells: f.cells, boundary: f.boundary, siteCount: c.spins.length, bondCount: c.bonds.length },
      sites: c.spins.map((spin, i) => ({
        index: i,
        label: f.labels[i]?.site ?? "",
        cell: f.labels[i]?.cell ?? [],
        position: c.positions[i],
        spin,
        g: f.gTensors[i],
        zeemanFieldMeV: c.fields[i],
      })),
      bonds: c.bonds.map((b, k) => ({ i: b.i, j: b.j, matrixMeV: b.matrix, term: f.bondTerms[k] ?? null })),
      singleIon: c.singleIon.map((s) => ({ site: s.site, matrixMeV: s.matrix })),
      field: model.field ? { vectorT: model.field.vectorT, magnitudeT: model.field.magnitudeT } : null,
      notes: f.notes,
    },
  };
}
