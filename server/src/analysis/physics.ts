// Joins the semantic model with the physics layer: symmetry, conventions and couplings,
// frustration, stability region and the q = 0 resonance, each with its diagnostics.
// Analysis layer.
import { diag, type Diagnostic } from "../base/diagnostics";
import type { SpinModel } from "../model/model";
import { checkCoordination, summarizeCouplings, type CouplingSummary } from "./couplings";
import { detectFamily, type FamilyResult } from "./family";
import { analyzeFrustration, type FrustrationGroup } from "./frustration";
import { analyzeResonance, type ResonanceSummary } from "./resonance";
import { analyzeSymmetry, checkExpect, type SymmetryResult } from "./symmetryCheck";
import { predict, type ExactProvider, type Predictions } from "./predictions";

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
  return { summary: { ...base, predictions }, diagnostics };
}
