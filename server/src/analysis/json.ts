// The machine-readable analysis of one file (`spinwright analyze --format json`), documented in
// docs/analysis.schema.json. Ranges are zero-based, as in LSP. Analysis layer.
import type { DocumentAnalysis } from "./analyze";
import type { Predictions } from "./predictions";

const round = (x: number | null | undefined, digits = 12): number | null =>
  x === null || x === undefined || !Number.isFinite(x) ? null : Number(x.toPrecision(digits));

export function analysisJson(file: string, a: DocumentAnalysis): Record<string, unknown> {
  const p = a.physics;
  const range = (span: { start: number; end: number }) => a.lines.range(span.start, span.end);
  return {
    file,
    model: a.model?.name ?? null,
    errors: a.diagnostics.filter((d) => d.severity === "error").length,
    warnings: a.diagnostics.filter((d) => d.severity === "warning").length,
    symmetry: p
      ? {
          h0: p.symmetry.h0,
          axis: p.symmetry.axis?.map((x) => round(x)) ?? null,
          full: p.symmetry.full,
          fullAxis: p.symmetry.fullAxis?.map((x) => round(x)) ?? null,
          breaking: p.symmetry.breaking.map((b) => ({
            kind: b.kind,
            range: range(b.span),
            residual: b.residual,
            residualAxis: b.axis?.map((x) => round(x)) ?? null,
            magnitudeMeV: round(b.magnitudeMeV),
            consequence: b.consequence,
          })),
        }
      : null,
    couplings:
      p?.couplings.map((c) => ({
        name: c.name,
        kind: c.kind,
        valueMeV: round(c.valueMeV),
        character: c.character,
        dmMeV: round(c.dmMeV),
        anisotropicMeV: round(c.anisotropicMeV),
        shells: c.shells,
      })) ?? [],
    frustration: p?.frustration.map((f) => ({ cycle: f.cycle, frustrated: f.frustrated, perCell: f.perCell, complete: f.complete })) ?? [],
    region: p?.family.placement
      ? {
          family: p.family.placement.family,
          description: p.family.description,
          name: p.family.placement.name,
          parameter: p.family.placement.parameter,
          value: round(p.family.placement.value),
          boundary: p.family.placement.boundary
            ? { name: p.family.placement.boundary.name, value: p.family.placement.boundary.value, source: p.family.placement.boundary.source }
            : null,
          distance: round(p.family.placement.distance),
          source: p.family.placement.source,
          gapless: p.family.placement.gapless,
          validFor: p.family.placement.validFor,
          quantum: p.family.placement.quantum ?? null,
        }
      : null,
    regionReason: p && !p.family.placement ? p.family.description : null,
    predictions: p ? predictionsJson(p.predictions) : null,
    resonance: p
      ? {
          protected: p.resonance.protected,
          reason: p.resonance.reason,
          zeemanMeV: round(p.resonance.zeemanMeV),
          zeemanGHz: round(p.resonance.zeemanGHz),
          zeemanK: round(p.resonance.zeemanK),
          zeemanCm: round(p.resonance.zeemanCm),
          gAlongField: round(p.resonance.gAlongField),
          probe: p.resonance.probe
            ? { frequencyGHz: round(p.resonance.probe.frequencyGHz), resonanceFieldT: round(p.resonance.probe.resonanceFieldT) }
            : null,
          dmDoublet: p.resonance.dmDoublet
            ? { dMeV: round(p.resonance.dmDoublet.dMeV), jMeV: round(p.resonance.dmDoublet.jMeV), theta: round(p.resonance.dmDoublet.theta) }
            : null,
        }
      : null,
  };
}

function predictionsJson(p: Predictions): Record<string, unknown> {
  return {
    applicable: p.applicable,
    reason: p.reason,
    regime: p.regime,
    zeemanMeV: round(p.zeemanMeV),
    magnetization: { m: round(p.magnetization.value), method: p.magnetization.method, valid: p.magnetization.valid, reason: p.magnetization.reason },
    saturationMeV: round(p.saturationMeV.value),
    saturationFieldT: round(p.saturationFieldT),
    saturationMethod: p.saturationMeV.method,
    velocityMeV: round(p.velocityMeV.value),
    velocityMethod: p.velocityMeV.method,
    branches: {
      valid: p.branches.valid,
      reason: p.branches.reason,
      lowerAtZeroMeV: round(p.branches.lowerAtZeroMeV),
      upperAtZeroMeV: round(p.branches.upperAtZeroMeV),
      splittingMeV: round(p.branches.splittingMeV),
      splittingOverZeeman: round(p.branches.splittingOverZeeman),
      coupling: round(p.branches.coupling),
      method: p.branches.method,
      alternatives: p.branches.alternatives.map((a) => ({ ...a, splittingMeV: round(a.splittingMeV) })),
    },
    nearSaturation: {
      valid: p.nearSaturation.valid,
      reason: p.nearSaturation.reason,
      upperAtZeroMeV: round(p.nearSaturation.upperAtZeroMeV),
      weight: p.nearSaturation.weight,
      method: p.nearSaturation.method,
      points: p.nearSaturation.points.map((x) => ({ qOverPi: round(x.qOverPi), upperMeV: round(x.upperMeV) })),
    },
    dmDoublet: p.dmDoublet,
    curve: p.curve.map((c) => ({ qOverPi: round(c.qOverPi, 8), lowerMeV: round(c.lowerMeV, 10), upperMeV: round(c.upperMeV, 10), lowerWeight: round(c.lowerWeight, 8), upperWeight: round(c.upperWeight, 8) })),
    sweep: p.sweep.map((x) => ({ ...x, zeemanMeV: round(x.zeemanMeV), m: round(x.m), splittingMeV: round(x.splittingMeV) })),
  };
}
