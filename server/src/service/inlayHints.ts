// Inlay hints: the resolved value of each `let` whose text does not show it already
// (`= 1.2237 meV` after `let J1 = 14.2 K`, in the display unit), and the Zeeman energy
// g muB B after the field magnitude. Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Span } from "../base/text";
import { unitKey } from "../model/units";
import { displayUnitOf, energyText, firstModel, formatNumber, type ServiceSettings } from "./common";
import { quantityKind, zeemanLines } from "./quantities";

export interface InlayHint {
  /** Offset the hint is shown at (after the value). */
  readonly offset: number;
  readonly label: string;
  readonly tooltip: string;
}

export function inlayHints(a: DocumentAnalysis, range: Span, settings: ServiceSettings): InlayHint[] {
  const out: InlayHint[] = [];
  const model = a.model;
  const m = firstModel(a);
  if (!model || !m) return out;
  const unit = displayUnitOf(settings);
  for (const s of m.statements) {
    if (s.kind !== "let" || s.span.end < range.start || s.span.start > range.end) continue;
    const p = model.parameters.get(s.name.name);
    const v = p?.value;
    if (!v || !(v.shape.length === 0 || (v.shape.length === 1 && v.shape[0] === 1))) continue;
    const x = v.data[0] ?? 0;
    const e = s.value;
    const kind = quantityKind(v);
    // A plain number already in the shown unit needs no hint.
    if (e.kind === "number") {
      const written = e.unit ? unitKey(e.unit.name, e.unit.power) : null;
      if (kind === "dimensionless" || (kind === "energy" && written === unit) || (kind === "field" && written === "T")) continue;
    }
    let label: string;
    if (kind === "energy") label = `= ${energyText(x, unit)}`;
    else if (kind === "field") label = `= ${formatNumber(x)} T`;
    else if (kind === "dimensionless") label = `= ${formatNumber(x)}`;
    else continue;
    out.push({ offset: e.span.end, label, tooltip: `Resolved value of ${s.name.name} (CODATA 2018 conversions)` });
  }
  const field = model.field;
  if (field && field.magnitudeSpan.end >= range.start && field.magnitudeSpan.start <= range.end) {
    const lines = zeemanLines(model);
    const text =
      lines.length === 1
        ? energyText(lines[0]!.energyMeV, unit)
        : lines.map((z) => `${z.siteNames.join(",")} ${energyText(z.energyMeV, unit)}`).join(", ");
    if (lines.length > 0)
      out.push({
        offset: field.magnitudeSpan.end,
        label: `g μB B = ${text}`,
        tooltip: `Zeeman energy |gᵀn| μB B per site (μB from CODATA 2018)`,
      });
  }
  return out.sort((x, y) => x.offset - y.offset);
}
