// Joins the semantic model with the physics layer: symmetry, conventions, frustration, stability
// region, the q = 0 resonance and field-dependent predictions. Analysis layer.
import type { Diagnostic } from "../base/diagnostics";
import type { SpinModel } from "../model/model";

export interface PhysicsSummary {
  readonly placeholder?: never;
}

export function analyzePhysics(_model: SpinModel): { summary: PhysicsSummary; diagnostics: Diagnostic[] } {
  return { summary: {}, diagnostics: [] };
}
