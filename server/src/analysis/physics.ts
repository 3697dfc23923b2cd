// Joins the semantic model with the physics layer: symmetry, conventions and couplings,
// frustration, stability region and the q = 0 resonance, each with its diagnostics.
// Analysis layer.
import { diag, sameDiagnostic, type Diagnostic } from "../base/diagnostics";
import type { SpinModel } from "../model/model";
import { checkCoordination, summarizeCouplings, type CouplingSummary } from "./couplings";
import { detectFamily, type FamilyResult } from "./family";
import { analyzeFrustration, type FrustrationGroup } from "./frustration";
import { analyzeResonance, type ResonanceSummary } from "./resonance";
import { analyzeSymmetry, checkExpect, type SymmetryResult } from "./symmetryCheck";
import { predict, type ChainCouplings, type ExactCalibration, type ExactProvider, type Predictions } from "./predictions";

export interface PhysicsSummary {
  readonly symmetry: SymmetryResult;
  readonly couplings: readonly CouplingSummary[];
  readonly frustration: readonly FrustrationGroup[];
  readonly family: FamilyResult;
  readonly resonance: ResonanceSummary;
  readonly predictions: Predictions;
}

export interface AnalysisOptions {
  /** Exact finite-ring calibrations already computed for a coupling set (never computed here). */
  readonly exact?: ExactProvider;
}

export function analyzePhysics(model: SpinModel, options: AnalysisOptions = {}): { summary: PhysicsSummary; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const symmetry = analyzeSymmetry(model);
  diagnostics.push(...checkExpect(model, symmetry));
  const couplings = summarizeCouplings(model);
  diagnostics.push(...checkCoordination(model));
  const frustration = analyzeFrustration(model);
  for (const g of frustration) {
    if (!g.frustrated) continue;
    const term = model.exchanges[g.terms[0] ?? -1];
    if (!term) continue;
    diagnostics.push(
      diag(
        "spw-frustrated",
        term.span,
        `Frustrated ${g.cycle}: it holds an odd number of antiferromagnetic bonds, so no collinear arrangement satisfies every bond.`,
        {
          related: g.terms
            .slice(1)
            .map((t) => model.exchanges[t])
            .filter((t) => t !== undefined)
            .map((t) => ({ span: t.span, message: "another coupling on the frustrated cycle" })),
        },
      ),
    );
  }
  const family = detectFamily(model);
  const resonance = analyzeResonance(model, symmetry, family);
  diagnostics.push(...resonance.diagnostics);
  const base = { symmetry, couplings, frustration, family, resonance: resonance.summary };
  const predictions = predict(model, base, options.exact);
  return { summary: { symmetry, couplings, frustration, family, resonance: resonance.summary, predictions }, diagnostics };
}

// ---- keeping the physics of the version before -------------------------------------------------

/**
 * The last physics analysis of a document, kept for the next version: most keystrokes (spaces,
 * comments, a statement being typed, a parameter nothing uses yet) leave every number the physics
 * reads unchanged, and then the previous result stands.
 */
export class PhysicsMemo {
  last: {
    readonly model: SpinModel;
    readonly result: { summary: PhysicsSummary; diagnostics: Diagnostic[] };
    /** The exact calibrations the predictions asked for, and what they got. */
    readonly exactLookups: readonly { readonly couplings: ChainCouplings; readonly got: ExactCalibration | null }[];
  } | null = null;
}

/**
 * Model fields the physics never reads: the parameters and symbols (which change with every
 * parameter edit) and the block's span (which moves with every edit inside the block).
 */
const NOT_READ_BY_PHYSICS = new Set(["parameters", "symbols", "span"]);

function isSpan(x: object): x is { start: number; end: number } {
  const s = x as { start?: unknown; end?: unknown };
  return typeof s.start === "number" && typeof s.end === "number" && Object.keys(x).length === 2;
}

/**
 * Whether two models give the same physics: the same numbers, names and kinds everywhere the
 * physics reads, and every span either the same object (a tree the incremental parse moved in
 * place, so the old result points at it too) or at the same place.
 */
function sameForPhysics(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (typeof a !== "object" || typeof b !== "object" || a === null || b === null) return false;
  if (Array.isArray(a)) {
    if (!Array.isArray(b) || a.length !== b.length) return false;
    for (let i = 0; i < a.length; i++) if (!sameForPhysics(a[i], b[i])) return false;
    return true;
  }
  if (isSpan(a)) return isSpan(b) && a.start === b.start && a.end === b.end;
  const ka = Object.keys(a);
  if (ka.length !== Object.keys(b).length) return false;
  for (const k of ka) if (!sameForPhysics((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k])) return false;
  return true;
}

function sameModelForPhysics(a: SpinModel, b: SpinModel): boolean {
  for (const k of Object.keys(a) as (keyof SpinModel)[]) {
    if (NOT_READ_BY_PHYSICS.has(k)) continue;
    if (!sameForPhysics(a[k], b[k])) return false;
  }
  return Object.keys(a).length === Object.keys(b).length;
}

/**
 * analyzePhysics, or the previous result when the model reads the same to the physics and the
 * exact calibrations it used are unchanged (a test holds this to fresh analyses over random edits).
 */
export function analyzePhysicsKept(model: SpinModel, options: AnalysisOptions, memo: PhysicsMemo): { summary: PhysicsSummary; diagnostics: Diagnostic[] } {
  const last = memo.last;
  if (last && sameModelForPhysics(last.model, model) && last.exactLookups.every((l) => (options.exact?.(l.couplings) ?? null) === l.got)) return last.result;
  const exactLookups: { couplings: ChainCouplings; got: ExactCalibration | null }[] = [];
  const exact: ExactProvider | undefined = options.exact
    ? (c) => {
        const got = options.exact?.(c) ?? null;
        exactLookups.push({ couplings: c, got });
        return got;
      }
    : undefined;
  const fresh = analyzePhysics(model, exact ? { ...options, exact } : options);
  // A changed coupling usually leaves the physics diagnostics saying the same things at the same
  // places: hand out the objects of the version before then, so the editor layer sees at once
  // that nothing it reported changed (see lsp/convert sameAsLsp).
  const before = last?.result.diagnostics;
  const result = before ? { summary: fresh.summary, diagnostics: fresh.diagnostics.map((d, i) => (before[i] && sameDiagnostic(d, before[i]) ? before[i] : d)) } : fresh;
  memo.last = { model, result, exactLookups };
  return result;
}
