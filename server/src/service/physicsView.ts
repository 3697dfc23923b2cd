// Turns the physics summary of an analysis into readable items for hovers and the preview:
// symmetry with its breaking terms, couplings, frustration, the model family and its region,
// the q = 0 resonance. The summary is still growing, so every field is read with optional
// chaining and keys this file does not know yet are shown from their text fields. Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import { perCellText } from "../analysis/frustration";
import type { RegionPlacement } from "../physics/regions";
import type { Vec3 } from "../physics/types";
import { predictionLines } from "./predictionsView";
import { energyText, formatNumber, lineNumberAt } from "./common";

/** One titled piece of the physics summary. */
export interface PhysicsItem {
  readonly title: string;
  readonly lines: readonly string[];
}

const KNOWN = new Set(["symmetry", "couplings", "frustration", "family", "resonance", "predictions"]);
const TEXT_FIELDS = ["summary", "text", "message", "description", "reason", "consequence"];

function axisText(n: Vec3 | null | undefined): string {
  return n ? `(${n.map((x) => formatNumber(x, 4)).join(", ")})` : "";
}

function symmetryName(c: string | undefined, axis: Vec3 | null | undefined): string {
  if (c === "su2") return "SU(2)";
  if (c === "u1") return `U(1) about ${axisText(axis)}`;
  return c === "none" ? "none" : (c ?? "unknown");
}

function asRecord(x: unknown): Record<string, unknown> | null {
  return x !== null && typeof x === "object" && !Array.isArray(x) ? (x as Record<string, unknown>) : null;
}

/** Text fields of a value this view does not know (a newer summary key). */
function genericLines(value: unknown): string[] {
  if (typeof value === "string") return value.trim() ? [value.trim()] : [];
  const r = asRecord(value);
  if (!r) return [];
  return TEXT_FIELDS.map((k) => r[k]).filter((v): v is string => typeof v === "string" && v.trim() !== "");
}

export function physicsItems(a: DocumentAnalysis): PhysicsItem[] {
  const p = a.physics;
  if (!p) return [];
  const items: PhysicsItem[] = [];
  const sym = p.symmetry;
  if (sym) {
    const lines = [`without the field: ${symmetryName(sym.h0, sym.axis)}`, `with the field: ${symmetryName(sym.full, sym.fullAxis)}`];
    // Each sentence names its term ("A DM vector breaks SU(2): ..."): the line says where it is.
    for (const b of sym.breaking ?? []) if (b?.consequence) lines.push(`line ${lineNumberAt(a, b.span.start)}: ${b.consequence}`);
    items.push({ title: "Symmetry", lines });
  }
  const couplings = p.couplings ?? [];
  if (couplings.length > 0)
    items.push({
      title: "Couplings",
      lines: couplings.map(
        (c) =>
          `${c.name} (${c.kind}): ${c.character}, J = ${energyText(c.valueMeV, "meV")}${c.dmMeV ? `, |D| = ${energyText(c.dmMeV, "meV")}` : ""}, ${c.bondsPerCell} bond(s) per cell`,
      ),
    });
  const frustrated = (p.frustration ?? []).filter((g) => g?.frustrated);
  if (frustrated.length > 0) items.push({ title: "Frustration", lines: frustrated.map((g) => `${g.cycle} (${perCellText(g)})`) });
  const family = p.family;
  if (family?.description) {
    const lines = [family.description];
    const place = family.placement;
    if (place) lines.push(`${place.parameter} = ${formatNumber(place.value)}: ${place.name}${place.source ? ` (${place.source})` : ""}`);
    const boundary = place ? boundaryText(place) : null;
    if (boundary) lines.push(boundary);
    if (place?.quantum) lines.push(quantumPictureText(place.quantum, true));
    items.push({ title: "Family", lines });
  }
  const res = p.resonance;
  if (res) {
    const lines: string[] = [];
    if (res.reason) lines.push(res.reason);
    if (res.probe?.resonanceFieldT != null) lines.push(`probe ${formatNumber(res.probe.frequencyGHz)} GHz is resonant at ${formatNumber(res.probe.resonanceFieldT)} T`);
    if (res.dmDoublet) lines.push(`DM doublet: tan θ = D/J = ${formatNumber(res.dmDoublet.dMeV / Math.abs(res.dmDoublet.jMeV))}`);
    if (lines.length > 0) items.push({ title: "Resonance", lines });
  }
  if (p.predictions) items.push({ title: "Predictions in the field", lines: predictionLines(p.predictions, { sweep: false }) });
  for (const [key, value] of Object.entries(p as unknown as Record<string, unknown>)) {
    if (KNOWN.has(key)) continue;
    const lines = genericLines(value);
    if (lines.length > 0) items.push({ title: key.charAt(0).toUpperCase() + key.slice(1), lines });
  }
  return items;
}

/** The nearest phase boundary of a placement and how far the couplings are from it, or null. */
/**
 * "quantum picture: 120-degree order; <source>" (not "... order (quantum)": the label says it
 * already), with "near a debated edge" where the placement says so and `withEdge` asks for it.
 */
export function quantumPictureText(q: NonNullable<RegionPlacement["quantum"]>, withEdge: boolean): string {
  return `quantum picture: ${q.name.replace(/ \(quantum\)$/, "")}${withEdge && q.uncertain ? ", near a debated edge" : ""}; ${q.source}`;
}

export function boundaryText(place: RegionPlacement): string | null {
  const b = place.boundary;
  if (!b) return null;
  const where = place.onBoundary
    ? "on it within the quoted precision: the phase is not decided by these couplings"
    : place.distance !== null
      ? b.value !== 0
        ? `${formatNumber(Math.abs(place.distance) * 100, 2)} % ${place.distance < 0 ? "below" : "above"} it`
        : `${formatNumber(place.distance, 3)} from it`
      : "";
  return `nearest boundary: ${b.name} at ${place.parameter} = ${formatNumber(b.value)} (${b.source})${where ? `; ${where}` : ""}`;
}
