// The analysis summary behind the preview panel and "Copy report": model, convention, lattice,
// parameters with resolved values, exchange terms with their bonds, the field with its Zeeman
// energies, the cluster, the physics summary and the diagnostics. Plain data plus a Markdown
// rendering; the client draws the HTML. Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Severity } from "../base/diagnostics";
import { describeBond } from "../model/build";
import { clusterSiteCount } from "./codeLens";
import { displayUnitOf, energyText, firstModel, formatNumber, lineNumberAt, type ServiceSettings } from "./common";
import { physicsItems, type PhysicsItem } from "./physicsView";
import { markdownList } from "./predictionsView";
import { parameterValueText, zeemanLines, zeemanText } from "./quantities";

export interface AnalysisSummary {
  readonly modelName: string | null;
  readonly convention: string;
  readonly lattice: string | null;
  readonly sites: readonly { readonly name: string; readonly spin: string; readonly g: string }[];
  readonly parameters: readonly { readonly name: string; readonly value: string }[];
  readonly exchanges: readonly { readonly kind: string; readonly coupling: string; readonly scale: string; readonly bonds: string }[];
  readonly field: { readonly text: string; readonly zeeman: readonly string[] } | null;
  readonly cluster: string | null;
  readonly physics: readonly PhysicsItem[];
  readonly diagnostics: readonly { readonly severity: Severity; readonly code: string; readonly line: number; readonly message: string }[];
  readonly displayUnit: string;
}

function spinText(s: number): string {
  return Number.isInteger(s) ? String(s) : `${Math.round(2 * s)}/2`;
}

export function analysisSummary(a: DocumentAnalysis, settings: ServiceSettings): AnalysisSummary {
  const m = a.model;
  const unit = displayUnitOf(settings);
  const L = m?.lattice ?? null;
  const siteCount = clusterSiteCount(a);
  return {
    modelName: firstModel(a)?.name.name ?? null,
    convention: m?.convention?.value ?? "antiferro-positive (assumed: none given)",
    lattice: L ? `${L.preset ?? "custom"}, ${L.dimension}D, ${L.sites.length} site(s) per cell` : null,
    sites: (L?.sites ?? []).map((s) => {
      const g = s.g;
      const iso = [0, 1, 2].every((i) => [0, 1, 2].every((j) => (i === j ? g[i]?.[j] === g[0]?.[0] : g[i]?.[j] === 0)));
      return { name: s.name, spin: spinText(s.spin), g: iso ? formatNumber(g[0]?.[0] ?? 0) : "tensor" };
    }),
    parameters: [...(m?.parameters.values() ?? [])].sort((x, y) => x.statementSpan.start - y.statementSpan.start).map((p) => ({ name: p.name, value: parameterValueText(a, p) ?? "(no value)" })),
    exchanges: (m?.exchanges ?? []).map((e) => {
      const bonds = L ? e.bonds.map((b) => describeBond(L, b.from, b.to, b.offset)) : [];
      return {
        kind: e.kind,
        coupling: e.couplingName ?? "",
        scale: energyText(e.scaleMeV, unit),
        bonds: bonds.length > 4 ? `${bonds.slice(0, 4).join(", ")}, ... (${bonds.length} per cell)` : bonds.join(", "),
      };
    }),
    field: m?.field
      ? {
          text: `${formatNumber(m.field.magnitudeT)} T along (${m.field.direction.map((x) => formatNumber(x, 4)).join(", ")})`,
          zeeman: zeemanLines(m).map((z) => `${z.siteNames.join(", ")}: g = ${formatNumber(z.gAlongField)}, g μB B = ${zeemanText(z.energyMeV)}`),
        }
      : null,
    cluster: m?.cluster ? `${m.cluster.cells.join(" × ")} cells, ${m.cluster.boundary}${siteCount !== null ? `, ${siteCount} sites` : ""}` : null,
    physics: physicsItems(a),
    diagnostics: a.diagnostics.map((d) => ({ severity: d.severity, code: d.code, line: lineNumberAt(a, d.span.start), message: d.message })),
    displayUnit: unit,
  };
}

/** The summary as Markdown, for the clipboard. */
export function summaryMarkdown(s: AnalysisSummary, fileName: string): string {
  const out: string[] = [`# ${s.modelName !== null ? `Model "${s.modelName}"` : "No model"} (${fileName})`, ""];
  out.push(`- convention: ${s.convention}`);
  if (s.lattice) out.push(`- lattice: ${s.lattice}; sites ${s.sites.map((x) => `${x.name} (S = ${x.spin}, g = ${x.g})`).join(", ")}`);
  if (s.cluster) out.push(`- cluster: ${s.cluster}`);
  if (s.field) out.push(`- field: ${s.field.text}`, ...s.field.zeeman.map((z) => `  - ${z}`));
  if (s.parameters.length > 0) {
    out.push("", "## Parameters", "", "| name | value |", "|---|---|");
    for (const p of s.parameters) out.push(`| ${p.name} | ${p.value} |`);
  }
  if (s.exchanges.length > 0) {
    out.push("", "## Exchange terms", "", "| kind | coupling | scale | bonds |", "|---|---|---|---|");
    for (const e of s.exchanges) out.push(`| ${e.kind} | ${e.coupling} | ${e.scale} | ${e.bonds} |`);
  }
  for (const p of s.physics) out.push("", `## ${p.title}`, "", markdownList(p.lines));
  out.push("", "## Diagnostics", "");
  if (s.diagnostics.length === 0) out.push("none");
  for (const d of s.diagnostics) out.push(`- line ${d.line}: ${d.severity} ${d.code}: ${d.message}`);
  out.push("", "_Unit conversions and μB: CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 2021)._");
  return out.join("\n") + "\n";
}
