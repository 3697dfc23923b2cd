// Recognises common model families from the semantic model (lattice geometry, spins and bond
// tensors, never the file's name) and places the couplings on their phase diagrams through the
// physics layer's region table. Analysis layer.
import { bondKeyOf } from "../model/lattice";
import { bondMatrix, type SpinModel } from "../model/model";
import { addMat3, normMat3, outer3, scaleMat3, subMat3, IDENTITY3, dot3, mulMatVec3 } from "../physics/linalg3";
import { placeInRegion, type FamilyInput, type RegionPlacement } from "../physics/regions";
import { decomposeExchange, symmetricEigen3 } from "../physics/symmetry";
import type { Mat3, Vec3 } from "../physics/types";
import { shellOf } from "./couplings";

export interface FamilyResult {
  /** The recognised family in meV, or null with the reason. */
  readonly family: FamilyInput | null;
  readonly description: string;
  readonly placement: RegionPlacement | null;
  /** For chains: nearest- and next-nearest-neighbour matrices (meV), when the lattice is a chain. */
  readonly chain: { readonly j1: Mat3 | null; readonly j2: Mat3 | null; readonly longer: boolean; readonly spin: number } | null;
}

const ZERO: Mat3 = [
  [0, 0, 0],
  [0, 0, 0],
  [0, 0, 0],
];

function isIsotropic(m: Mat3): boolean {
  const d = decomposeExchange(m);
  return d.norms.dm + d.norms.anisotropic <= 1e-9 * Math.max(1e-300, normMat3(m));
}

/** The last model's exchange terms and their sums: family and predictions both ask for them. */
let lastSums: { readonly exchanges: SpinModel["exchanges"]; readonly sums: ReadonlyMap<number, Mat3> } | null = null;

/**
 * Sum of bond matrices per neighbour distance index k (offset k along a chain with one site per
 * cell). Bonds are stored in canonical orientation (model/lattice canonicalBond: for from = to the
 * first non-zero offset component is positive), so k = |offset|, and each bond adds its matrix in
 * that orientation (bondMatrix). The sums are fresh matrices, added in place in term order.
 */
export function chainBondSums(model: SpinModel): ReadonlyMap<number, Mat3> {
  if (lastSums && lastSums.exchanges === model.exchanges) return lastSums.sums;
  const out = new Map<number, Mat3>();
  for (const t of model.exchanges) {
    for (const b of t.bonds) {
      const m = bondMatrix(t, b);
      const k = Math.abs(b.offset[0] ?? 0);
      const acc = out.get(k);
      if (acc === undefined) {
        // 0 + x, as adding to a zero matrix gives (it turns -0 into 0).
        out.set(k, [
          [0 + m[0][0], 0 + m[0][1], 0 + m[0][2]],
          [0 + m[1][0], 0 + m[1][1], 0 + m[1][2]],
          [0 + m[2][0], 0 + m[2][1], 0 + m[2][2]],
        ]);
        continue;
      }
      for (let i = 0; i < 3; i++) {
        const row = acc[i] as [number, number, number];
        const add = m[i] as Vec3;
        row[0] += add[0];
        row[1] += add[1];
        row[2] += add[2];
      }
    }
  }
  lastSums = { exchanges: model.exchanges, sums: out };
  return out;
}

/** A matrix of the form a 1 + b n n^T: returns (Jperp, Jz, n) or null. */
function uniaxial(m: Mat3): { jPerp: number; jZ: number; axis: Vec3 } | null {
  const d = decomposeExchange(m);
  const norm = Math.max(1e-300, normMat3(m));
  if (d.norms.dm > 1e-9 * norm) return null;
  const e = symmetricEigen3(m);
  const [v0, v1, v2] = e.values;
  const tol = 1e-9 * norm;
  let k: number;
  if (Math.abs(v0 - v1) <= tol) k = 2;
  else if (Math.abs(v1 - v2) <= tol) k = 0;
  else if (Math.abs(v0 - v2) <= tol) k = 1;
  else return null;
  const axis = e.vectors[k] as Vec3;
  const jZ = dot3(axis, mulMatVec3(m, axis));
  const jPerp = (v0 + v1 + v2 - jZ) / 2;
  const rebuilt = addMat3(scaleMat3(IDENTITY3, jPerp), scaleMat3(outer3(axis, axis), jZ - jPerp));
  return normMat3(subMat3(rebuilt, m)) <= 1e-8 * norm ? { jPerp, jZ, axis } : null;
}

export function detectFamily(model: SpinModel): FamilyResult {
  const L = model.lattice;
  const none = (description: string, chain: FamilyResult["chain"] = null): FamilyResult => ({ family: null, description, placement: null, chain });
  if (!L) return none("no lattice");
  if (model.exchanges.length === 0) return none("no exchange terms: no phase diagram applies");
  const spins = [...new Set(L.sites.map((s) => s.spin))];
  const spin = spins.length === 1 ? (spins[0] as number) : NaN;
  const place = (family: FamilyInput, description: string, chain: FamilyResult["chain"] = null): FamilyResult => ({
    family,
    description,
    placement: placeInRegion(family),
    chain,
  });

  if (L.dimension === 1 && L.sites.length === 1) {
    const ms = chainBondSums(model);
    const longer = [...ms.keys()].some((k) => k > 2);
    const j1 = ms.get(1) ?? null;
    const j2 = ms.get(2) ?? null;
    const chain = { j1, j2, longer, spin };
    if (longer) return none("a chain with couplings beyond second neighbours: no tabulated family", chain);
    if (!j1) return none("a chain without nearest-neighbour exchange: no tabulated family", chain);
    const singleIonActive = model.singleIon.length > 0 && spin > 0.5;
    if (spin === 0.5 && !singleIonActive) {
      if (isIsotropic(j1) && (!j2 || isIsotropic(j2))) {
        const J1 = decomposeExchange(j1).isotropic;
        const J2 = j2 ? decomposeExchange(j2).isotropic : 0;
        return place({ kind: "j1j2-chain", j1: J1, j2: J2 }, "spin-1/2 J1-J2 Heisenberg chain", chain);
      }
      const u = uniaxial(j1);
      if (u && !j2) return place({ kind: "xxz-chain", j: u.jPerp, delta: u.jZ / u.jPerp }, "spin-1/2 XXZ chain", chain);
      return none("a spin-1/2 chain with Dzyaloshinskii-Moriya or anisotropic exchange beyond XXZ: no tabulated phase diagram", chain);
    }
    if (spin === 1 && !j2 && isIsotropic(j1)) {
      const J = decomposeExchange(j1).isotropic;
      const a = model.singleIon.reduce<Mat3>((acc, t) => addMat3(acc, t.matrixMeV), ZERO);
      if (model.singleIon.length === 0) return place({ kind: "spin1-chain-single-ion", j: J, d: 0 }, "spin-1 Heisenberg chain", chain);
      const u = uniaxial(subMat3(a, scaleMat3(IDENTITY3, 0)));
      if (u) {
        // A (S.n)^2 form: D = Jz - Jperp of the tensor (the isotropic part is a constant, S(S+1)).
        return place({ kind: "spin1-chain-single-ion", j: J, d: u.jZ - u.jPerp }, "spin-1 chain with uniaxial single-ion anisotropy", chain);
      }
      return none("a spin-1 chain with a rhombic single-ion term: no tabulated phase diagram", chain);
    }
    return none(`a spin-${spin} chain of this form: no tabulated phase diagram`, chain);
  }

  const preset = L.preset;
  if (L.dimension === 2 && spin === 0.5 && (preset === "square" || preset === "triangular" || preset === "honeycomb" || preset === "kagome")) {
    const byShell = new Map<number, { sum: number; keys: Set<string>; iso: boolean }>();
    for (const t of model.exchanges) {
      for (const b of t.bonds) {
        const s = shellOf(model, b.distance) ?? 99;
        const e = byShell.get(s) ?? { sum: 0, keys: new Set<string>(), iso: true };
        e.keys.add(bondKeyOf(b));
        e.iso &&= isIsotropic(t.matrixMeV);
        byShell.set(s, e);
      }
    }
    // Every bond of a shell must carry the same isotropic coupling.
    const shellCoupling = (s: number): number | null => {
      const values = model.exchanges.flatMap((t) => t.bonds.filter((b) => shellOf(model, b.distance) === s).map(() => t.parts.isotropic));
      return values.length === 0 ? 0 : values.every((v) => Math.abs(v - (values[0] as number)) <= 1e-9 * Math.abs(values[0] as number)) ? (values[0] as number) : null;
    };
    const shells = [...byShell.keys()];
    if (shells.some((s) => s > 2) || [...byShell.values()].some((e) => !e.iso)) return none(`a ${preset} model with anisotropic or longer-range exchange: no tabulated phase diagram`);
    const J1 = shellCoupling(1);
    const J2 = shellCoupling(2);
    if (J1 === null || J2 === null || J1 === 0) return none(`a ${preset} model with non-uniform couplings: no tabulated phase diagram`);
    if (preset === "kagome") {
      if (J2 !== 0) return none("a kagome model with second-neighbour exchange: no tabulated phase diagram");
      return place({ kind: "kagome-j1", j1: J1 }, "spin-1/2 kagome Heisenberg model");
    }
    return place({ kind: `${preset}-j1j2` as "square-j1j2", j1: J1, j2: J2 }, `spin-1/2 ${preset} J1-J2 Heisenberg model`);
  }
  if (L.dimension === 2 && (preset === "square" || preset === "triangular" || preset === "honeycomb" || preset === "kagome")) {
    return none(`a spin-${Number.isNaN(spin) ? "mixed" : spin} ${preset} model: the tabulated ${preset} phase diagrams are for spin 1/2`);
  }
  return none("this lattice and coupling set match no tabulated family");
}
