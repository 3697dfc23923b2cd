// A physics-aware comparison of two models: what changed in the Hamiltonian (bonds and their
// matrices, single-ion terms, g-tensors, spins, field), the symmetry class and its breaking
// terms, the stability region and the resonance's protection. Names and statement order do not
// matter: bonds are matched by site index and cell offset. Analysis layer.
import { bondKey } from "../model/lattice";
import { bondMatrix, type SpinModel } from "../model/model";
import { addMat3, normMat3, subMat3 } from "../physics/linalg3";
import { decomposeExchange } from "../physics/symmetry";
import type { Mat3 } from "../physics/types";
import type { DocumentAnalysis } from "./analyze";
import { describeClass, kindText } from "./symmetryCheck";

export interface BondChange {
  readonly bond: string;
  readonly change: "added" | "removed" | "changed";
  readonly beforeMeV: number | null;
  readonly afterMeV: number | null;
  /** (after - before)/|before| of the isotropic part; null when added or removed. */
  readonly relative: number | null;
  readonly detail: string;
}

export interface PhysicsDiff {
  readonly bonds: readonly BondChange[];
  readonly other: readonly string[];
  readonly symmetry: { readonly before: string; readonly after: string; readonly changed: boolean };
  readonly breakingAdded: readonly string[];
  readonly breakingRemoved: readonly string[];
  readonly region: { readonly before: string; readonly after: string; readonly changed: boolean };
  readonly protection: { readonly before: boolean | null; readonly after: boolean | null; readonly changed: boolean };
  readonly zeemanMeV: { readonly before: number | null; readonly after: number | null };
  /** True when nothing physical changed. */
  readonly same: boolean;
  /** True when the symmetry class, the protection or the region changed (exit code 1). */
  readonly significant: boolean;
}

const ZERO: Mat3 = [
  [0, 0, 0],
  [0, 0, 0],
  [0, 0, 0],
];

function bondMatrices(m: SpinModel): Map<string, { label: string; matrix: Mat3 }> {
  const out = new Map<string, { label: string; matrix: Mat3 }>();
  const name = (i: number): string => m.lattice?.sites[i]?.name ?? `#${i}`;
  for (const t of m.exchanges) {
    for (const b of t.bonds) {
      const key = bondKey(b.from, b.to, b.offset);
      const prev = out.get(key);
      const label = `${name(b.from)} -> ${name(b.to)}${b.offset.some((x) => x !== 0) ? ` + (${b.offset.join(", ")})` : ""}`;
      out.set(key, { label, matrix: addMat3(prev?.matrix ?? ZERO, bondMatrix(t, b)) });
    }
  }
  return out;
}

const rel = (a: number, b: number): number => (a === 0 ? (b === 0 ? 0 : Infinity) : (b - a) / Math.abs(a));
const num = (x: number): string => String(Number(x.toPrecision(6)));

function regionText(a: DocumentAnalysis): string {
  const p = a.physics?.family;
  if (!p) return "no model";
  return p.placement ? `${p.description}: ${p.placement.name}` : `no tabulated family (${p.description})`;
}

export function diffModels(before: DocumentAnalysis, after: DocumentAnalysis): PhysicsDiff {
  const A = before.model;
  const B = after.model;
  const bonds: BondChange[] = [];
  const other: string[] = [];
  if (A && B) {
    const ma = bondMatrices(A);
    const mb = bondMatrices(B);
    const scale = Math.max(1e-300, ...[...ma.values(), ...mb.values()].map((x) => normMat3(x.matrix)));
    for (const [key, a] of ma) {
      const b = mb.get(key);
      const ja = decomposeExchange(a.matrix);
      if (!b) {
        bonds.push({ bond: a.label, change: "removed", beforeMeV: ja.isotropic, afterMeV: null, relative: null, detail: `J = ${num(ja.isotropic)} meV removed` });
        continue;
      }
      if (normMat3(subMat3(a.matrix, b.matrix)) <= 1e-9 * scale) continue;
      const jb = decomposeExchange(b.matrix);
      const parts: string[] = [];
      if (Math.abs(jb.isotropic - ja.isotropic) > 1e-9 * scale) parts.push(`J ${num(ja.isotropic)} -> ${num(jb.isotropic)} meV (${num(100 * rel(ja.isotropic, jb.isotropic))}%)`);
      if (Math.abs(jb.norms.dm - ja.norms.dm) > 1e-9 * scale || normMat3(subMat3(a.matrix, b.matrix)) > 0) {
        if (Math.abs(jb.norms.dm - ja.norms.dm) > 1e-9 * scale) parts.push(`|D| ${num(ja.norms.dm)} -> ${num(jb.norms.dm)} meV`);
        if (Math.abs(jb.norms.anisotropic - ja.norms.anisotropic) > 1e-9 * scale)
          parts.push(`anisotropic part ${num(ja.norms.anisotropic)} -> ${num(jb.norms.anisotropic)} meV`);
      }
      bonds.push({ bond: a.label, change: "changed", beforeMeV: ja.isotropic, afterMeV: jb.isotropic, relative: rel(ja.isotropic, jb.isotropic), detail: parts.join("; ") || "matrix changed" });
    }
    for (const [key, b] of mb) {
      if (ma.has(key)) continue;
      const jb = decomposeExchange(b.matrix);
      bonds.push({ bond: b.label, change: "added", beforeMeV: null, afterMeV: jb.isotropic, relative: null, detail: `J = ${num(jb.isotropic)} meV, |D| = ${num(jb.norms.dm)} meV added` });
    }
    const sa = A.lattice?.sites ?? [];
    const sb = B.lattice?.sites ?? [];
    if (sa.length !== sb.length || (A.lattice?.preset ?? "custom") !== (B.lattice?.preset ?? "custom")) other.push(`lattice ${A.lattice?.preset ?? "custom"} (${sa.length} sites) -> ${B.lattice?.preset ?? "custom"} (${sb.length} sites)`);
    sa.forEach((s, i) => {
      const t = sb[i];
      if (!t) return;
      if (s.spin !== t.spin) other.push(`spin of site ${i + 1} (${s.name}) ${s.spin} -> ${t.spin}`);
      if (normMat3(subMat3(s.g, t.g)) > 1e-12) other.push(`g-tensor of site ${i + 1} (${s.name}) changed`);
    });
    const ion = (m: SpinModel) => m.singleIon.reduce<Map<number, Mat3>>((acc, x) => acc.set(x.site, addMat3(acc.get(x.site) ?? ZERO, x.matrixMeV)), new Map());
    const ia = ion(A);
    const ib = ion(B);
    for (const s of new Set([...ia.keys(), ...ib.keys()])) {
      if (normMat3(subMat3(ia.get(s) ?? ZERO, ib.get(s) ?? ZERO)) > 1e-12) other.push(`single-ion term on site ${s + 1} ${ia.has(s) ? (ib.has(s) ? "changed" : "removed") : "added"}`);
    }
    const fa = A.field?.vectorT ?? [0, 0, 0];
    const fb = B.field?.vectorT ?? [0, 0, 0];
    if (Math.hypot(fa[0] - fb[0], fa[1] - fb[1], fa[2] - fb[2]) > 1e-12) other.push(`field (${fa.map(num).join(", ")}) T -> (${fb.map(num).join(", ")}) T`);
  }
  const pa = before.physics;
  const pb = after.physics;
  const symBefore = pa ? describeClass(pa.symmetry.h0, pa.symmetry.axis) : "no model";
  const symAfter = pb ? describeClass(pb.symmetry.h0, pb.symmetry.axis) : "no model";
  const breakKey = (b: { kind: Parameters<typeof kindText>[0] }) => kindText(b.kind);
  const ka = new Set(pa?.symmetry.breaking.map(breakKey) ?? []);
  const kb = new Set(pb?.symmetry.breaking.map(breakKey) ?? []);
  const regionBefore = regionText(before);
  const regionAfter = regionText(after);
  const protBefore = pa ? pa.resonance.protected : null;
  const protAfter = pb ? pb.resonance.protected : null;
  const za = pa?.resonance.zeemanMeV ?? null;
  const zb = pb?.resonance.zeemanMeV ?? null;
  const symmetryChanged = symBefore !== symAfter;
  const regionChanged = regionBefore !== regionAfter;
  const protectionChanged = protBefore !== protAfter;
  const zeemanChanged = (za === null) !== (zb === null) || (za !== null && zb !== null && Math.abs(za - zb) > 1e-12 * Math.max(za, zb));
  const breakingAdded = [...kb].filter((k) => !ka.has(k));
  const breakingRemoved = [...ka].filter((k) => !kb.has(k));
  return {
    bonds,
    other,
    symmetry: { before: symBefore, after: symAfter, changed: symmetryChanged },
    breakingAdded,
    breakingRemoved,
    region: { before: regionBefore, after: regionAfter, changed: regionChanged },
    protection: { before: protBefore, after: protAfter, changed: protectionChanged },
    zeemanMeV: { before: za, after: zb },
    same: bonds.length === 0 && other.length === 0 && !symmetryChanged && !regionChanged && !protectionChanged && !zeemanChanged && breakingAdded.length === 0 && breakingRemoved.length === 0,
    significant: symmetryChanged || regionChanged || protectionChanged,
  };
}

export function renderDiff(d: PhysicsDiff, oldName: string, newName: string, markdown: boolean): string {
  const out: string[] = [];
  const h = (t: string) => out.push(markdown ? `### ${t}` : `${t}:`);
  const li = (t: string) => out.push(markdown ? `- ${t}` : `  ${t}`);
  out.push(markdown ? `## Spinwright: physical changes from \`${oldName}\` to \`${newName}\`` : `spinwright diff ${oldName} -> ${newName}`);
  if (d.same) {
    out.push(markdown ? "No physical change: the Hamiltonian, its symmetry, region and resonance are the same." : "no physical change");
    return out.join("\n") + "\n";
  }
  if (d.significant) out.push(markdown ? "**This change alters the symmetry class, the region or the resonance protection.**" : "SIGNIFICANT: the symmetry class, the region or the resonance protection changed");
  if (d.bonds.length) {
    h("Bonds");
    for (const b of d.bonds) li(`${b.change} ${b.bond}: ${b.detail}`);
  }
  if (d.other.length) {
    h("Other terms");
    for (const o of d.other) li(o);
  }
  h("Symmetry");
  li(`${d.symmetry.before} -> ${d.symmetry.after}${d.symmetry.changed ? "" : " (unchanged)"}`);
  for (const k of d.breakingAdded) li(`introduced: ${k}`);
  for (const k of d.breakingRemoved) li(`removed: ${k}`);
  h("Stability region");
  li(`${d.region.before} -> ${d.region.after}${d.region.changed ? "" : " (unchanged)"}`);
  h("q = 0 resonance");
  const prot = (x: boolean | null) => (x === null ? "n/a" : x ? "protected" : "not protected");
  li(`${prot(d.protection.before)} -> ${prot(d.protection.after)}${d.protection.changed ? "" : " (unchanged)"}`);
  const z = (x: number | null) => (x === null ? "n/a" : `${num(x)} meV`);
  li(`Zeeman energy ${z(d.zeemanMeV.before)} -> ${z(d.zeemanMeV.after)}`);
  return out.join("\n") + "\n";
}
