// The readable report of a model (`spinwright report`): parameters, lattice, couplings, field,
// then what the physics analysis finds. CLI layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import { formatNumber, lineNumberAt } from "../service/common";
import { describeBond } from "../model/build";
import { MEV_PER_GHZ, MEV_PER_K } from "../model/units";
import { formatText } from "./format";
import { describeClass } from "../analysis/symmetryCheck";
import { MEV_PER_CM } from "../model/units";
import { predictionLines } from "../service/predictionsView";
import { boundaryText, quantumPictureText } from "../service/physicsView";
import { parameterValueText } from "../service/quantities";

/** The shared number format, with one argument: `list.map(fmt)` must not pass the index as the digit count. */
const fmt = (x: number): string => formatNumber(x);

export function renderReport(file: string, a: DocumentAnalysis): string {
  const out: string[] = [];
  const m = a.model;
  out.push(`== ${file}${m ? `: model "${m.name}"` : ""}`);
  if (!m) {
    out.push(formatText([{ file, lines: a.lines, diagnostics: a.diagnostics }]));
    return out.join("\n") + "\n";
  }
  out.push(`convention: ${m.convention?.value ?? "antiferro-positive (assumed: none given)"}`);
  if (m.lattice) {
    const L = m.lattice;
    out.push(
      `lattice: ${L.preset ?? "custom"}, ${L.dimension}D, ${L.sites.length} site(s) per cell: ${L.sites.map((s) => `${s.name} (S = ${spinText(s.spin)}, g = ${gText(s.g)})`).join(", ")}`,
    );
  }
  if (m.parameters.size > 0) {
    out.push("parameters:");
    for (const p of [...m.parameters.values()].sort((x, y) => x.statementSpan.start - y.statementSpan.start)) {
      const v = p.value;
      if (!v) out.push(`  ${p.name} = (invalid)`);
      else if (v.energy === 1 && v.field === 0 && v.shape.length === 0)
        out.push(`  ${p.name} = ${fmt(v.data[0] ?? 0)} meV = ${fmt((v.data[0] ?? 0) / MEV_PER_K)} K = ${fmt((v.data[0] ?? 0) / MEV_PER_GHZ)} GHz`);
      else if (v.energy === 0 && v.field === 0 && v.shape.length === 0) out.push(`  ${p.name} = ${fmt(v.data[0] ?? 0)}`);
      else out.push(`  ${p.name} = ${parameterValueText(a, p) ?? "(invalid)"}`);
    }
  }
  if (m.exchanges.length > 0) {
    out.push("exchange terms:");
    for (const e of m.exchanges) {
      // Each bond as the file wrote it, the orientation the term's value refers to.
      const bonds = m.lattice ? e.bonds.map((b) => (b.reversed ? describeBond(m.lattice!, b.to, b.from, b.offset.map((n) => -n || 0)) : describeBond(m.lattice!, b.from, b.to, b.offset))) : [];
      const shown = bonds.length > 4 ? `${bonds.slice(0, 4).join(", ")}, ... (${bonds.length} bonds per cell)` : bonds.join(", ");
      // A matrix term's scale is its isotropic part, tr/3: say so (a pure DM matrix has 0).
      const value = e.kind === "matrix" ? `with J = tr/3 = ${fmt(e.scaleMeV)} meV` : `= ${fmt(e.scaleMeV)} meV`;
      out.push(`  ${e.kind}${e.couplingName ? ` ${e.couplingName}` : ""} ${value} on ${shown}`);
    }
  }
  if (m.field) out.push(`field: ${fmt(m.field.magnitudeT)} T along (${m.field.direction.map(fmt).join(", ")})`);
  if (m.cluster) out.push(`cluster: ${m.cluster.cells.join(" x ")} cells, ${m.cluster.boundary}`);
  if (a.physics) out.push(...physicsLines(a));
  if (a.diagnostics.length > 0) {
    out.push("diagnostics:");
    out.push(formatText([{ file, lines: a.lines, diagnostics: a.diagnostics }]).replace(/^/gm, "  "));
  } else out.push("diagnostics: none");
  return out.join("\n") + "\n";
}

function spinText(s: number): string {
  return Number.isInteger(s) ? String(s) : `${Math.round(2 * s)}/2`;
}

function gText(g: readonly (readonly number[])[]): string {
  const d = [g[0]?.[0] ?? 0, g[1]?.[1] ?? 0, g[2]?.[2] ?? 0];
  const off = Math.abs(g[0]?.[1] ?? 0) + Math.abs(g[0]?.[2] ?? 0) + Math.abs(g[1]?.[2] ?? 0) + Math.abs(g[1]?.[0] ?? 0) + Math.abs(g[2]?.[0] ?? 0) + Math.abs(g[2]?.[1] ?? 0);
  if (off === 0 && d[0] === d[1] && d[1] === d[2]) return fmt(d[0] ?? 0);
  if (off === 0) return `(${d.map(fmt).join(", ")})`;
  return "tensor";
}

function physicsLines(a: DocumentAnalysis): string[] {
  const p = a.physics;
  if (!p) return [];
  const out: string[] = [];
  out.push(`symmetry (without the field): ${describeClass(p.symmetry.h0, p.symmetry.axis)}; with the field: ${describeClass(p.symmetry.full, p.symmetry.fullAxis)}`);
  // Each consequence sentence names its term and what it breaks (SU(2), or the symmetry H0 keeps).
  for (const b of p.symmetry.breaking) out.push(`  line ${lineNumberAt(a, b.span.start)}: ${b.consequence}`);
  if (p.couplings.length > 0)
    out.push(`couplings: ${p.couplings.map((c) => `${c.name} ${c.character}${c.character === "antisymmetric" ? ` (|D| = ${fmt(c.dmMeV)} meV)` : ` (${fmt(c.valueMeV)} meV)`}`).join(", ")}`);
  const frustrated = p.frustration.filter((f) => f.frustrated);
  out.push(frustrated.length ? `frustrated cycles: ${frustrated.map((f) => f.cycle).join("; ")}` : "frustrated cycles: none");
  const r = p.family.placement;
  if (r) {
    out.push(`family: ${p.family.description}; region: ${r.name} at ${r.parameter} = ${fmt(r.value)}`);
    const boundary = boundaryText(r);
    if (boundary) out.push(`  ${boundary}`);
    if (r.quantum) out.push(`  ${quantumPictureText(r.quantum, false)}`);
  } else out.push(`family: ${p.family.description}`);
  const z = p.resonance;
  if (z.zeemanMeV !== null && z.hasField)
    out.push(
      `Zeeman energy: ${fmt(z.zeemanMeV)} meV = ${fmt(z.zeemanGHz ?? 0)} GHz = ${fmt(z.zeemanK ?? 0)} K = ${fmt(z.zeemanMeV / MEV_PER_CM)} cm^-1 (g along the field ${fmt(z.gAlongField ?? 0)}, CODATA 2018)`,
    );
  if (z.probe) out.push(`probe: ${fmt(z.probe.frequencyGHz)} GHz, resonant at ${z.probe.resonanceFieldT === null ? "no single field (g is not uniform)" : `${fmt(z.probe.resonanceFieldT)} T`}`);
  // The reason is a whole sentence; an unprotected one names the q = 0 resonance itself.
  out.push(z.protected ? `q = 0 resonance: protected. ${z.reason}` : z.reason);
  if (z.dmDoublet) out.push(`  uniform DM parallel to the field: the line becomes a doublet, tan θ = D/J = ${fmt(z.dmDoublet.dMeV / Math.abs(z.dmDoublet.jMeV))}`);
  out.push("predictions in the field:", ...predictionLines(p.predictions).map((l) => `  ${l}`));
  return out;
}

