// Labels every exchange term antiferromagnetic, ferromagnetic or zero under the file's convention
// (by the sign of its isotropic part in H = + sum S_i.J.S_j), and checks bond coordination
// against the preset lattice. Analysis layer.
import { diag, type Diagnostic } from "../base/diagnostics";
import { bondKeyOf, neighbourShells, PRESETS } from "../model/lattice";
import type { ExchangeTerm, SpinModel } from "../model/model";

export type CouplingCharacter = "antiferro" | "ferro" | "zero" | "antisymmetric";

export interface CouplingSummary {
  readonly index: number;
  readonly name: string;
  readonly kind: string;
  /** Isotropic part J = tr(J)/3 in H = + sum S_i.J.S_j, meV. */
  readonly valueMeV: number;
  /** The coupling's scale as written in the file (before the convention), meV. */
  readonly writtenMeV: number;
  readonly character: CouplingCharacter;
  /** |D| of the antisymmetric part, meV (0 below 1e-12 of the largest coupling: rounding). */
  readonly dmMeV: number;
  /** Norm of the symmetric traceless part, meV (0 below 1e-12 of the largest coupling: rounding). */
  readonly anisotropicMeV: number;
  readonly bondsPerCell: number;
  readonly shells: readonly number[];
}

export function termLabel(term: ExchangeTerm): string {
  return term.couplingName ?? `${term.kind} #${term.index + 1}`;
}

/**
 * The last summaries by term, with the lattice they were made on: a term object the build handed
 * over from the version before reads the same, so its summary is the same while the lattice, its
 * character and which of its parts count as rounding (the things a new scale can change) are.
 */
let lastSummaries: { readonly lattice: object | null; readonly byTerm: Map<ExchangeTerm, CouplingSummary> } = { lattice: null, byTerm: new Map() };

export function summarizeCouplings(model: SpinModel): CouplingSummary[] {
  let scale = 1e-300;
  for (const t of model.exchanges) scale = Math.max(scale, Math.abs(t.parts.isotropic) + t.parts.norms.dm);
  const tol = 1e-12 * scale;
  const lattice = model.lattice ?? null;
  const before = lastSummaries.lattice === lattice ? lastSummaries.byTerm : null;
  const byTerm = new Map<ExchangeTerm, CouplingSummary>();
  lastSummaries = { lattice, byTerm };
  return model.exchanges.map((t) => {
    const d = t.parts;
    const character: CouplingCharacter =
      Math.abs(d.isotropic) > tol ? (d.isotropic > 0 ? "antiferro" : "ferro") : d.norms.dm > tol ? "antisymmetric" : "zero";
    const kept = before?.get(t);
    // What a new scale can change: the character, and which parts count as rounding.
    if (kept && kept.character === character && d.norms.dm > tol === (kept.dmMeV !== 0) && d.norms.anisotropic > tol === (kept.anisotropicMeV !== 0)) {
      byTerm.set(t, kept);
      return kept;
    }
    // The shells of the term's bonds, each once, in the order first met.
    const shells: number[] = [];
    for (const b of t.bonds) {
      const s = shellOf(model, b.distance);
      if (s !== null && !shells.includes(s)) shells.push(s);
    }
    const summary: CouplingSummary = {
      index: t.index,
      name: termLabel(t),
      kind: t.kind,
      valueMeV: d.isotropic,
      writtenMeV: t.scaleMeV,
      character,
      // Parts below the tolerance are rounding (3.2 meV times 1 leaves a traceless part of about
      // 1e-15 meV): reported as zero, as the character treats them.
      dmMeV: d.norms.dm > tol ? d.norms.dm : 0,
      anisotropicMeV: d.norms.anisotropic > tol ? d.norms.anisotropic : 0,
      bondsPerCell: t.bonds.length,
      shells,
    };
    byTerm.set(t, summary);
    return summary;
  });
}

/** Neighbour shell (1 = nearest) that a bond length belongs to on the model's lattice. */
const shellDistances = new WeakMap<object, number[]>();

export function shellOf(model: SpinModel, distance: number): number | null {
  const L = model.lattice;
  if (!L) return null;
  let shells = shellDistances.get(L);
  if (!shells) {
    shells = neighbourShells(L.vectors, L.sites.map((s) => s.position), 4).distances;
    shellDistances.set(L, shells);
  }
  for (let k = 0; k < shells.length; k++) {
    const d = shells[k] as number;
    if (Math.abs(d - distance) < 1e-6 * Math.max(1, d)) return k + 1;
  }
  return null;
}

/**
 * On a preset lattice, the nearest-neighbour bonds carrying isotropic exchange should number
 * coordination/2 per site; fewer usually means a missing bond direction.
 */
export function checkCoordination(model: SpinModel): Diagnostic[] {
  const L = model.lattice;
  const preset = L?.preset ? PRESETS[L.preset] : undefined;
  if (!L || !preset) return [];
  const nearest = new Set<string>();
  let firstTerm: ExchangeTerm | null = null;
  for (const t of model.exchanges) {
    if (Math.abs(t.parts.isotropic) === 0) continue;
    for (const b of t.bonds) {
      if (shellOf(model, b.distance) !== 1) continue;
      nearest.add(bondKeyOf(b));
      firstTerm ??= t;
    }
  }
  const expected = (preset.coordination * L.sites.length) / 2;
  if (!firstTerm || nearest.size === expected) return [];
  const perSite = (2 * nearest.size) / L.sites.length;
  return [
    diag(
      "spw-coordination",
      firstTerm.span,
      `On the ${preset.name} lattice every site has ${preset.coordination} nearest neighbours, but these bonds give ${Number(perSite.toFixed(3))} per site. Use 'on shell 1' for all nearest-neighbour bonds, or add the missing directions.`,
    ),
  ];
}
