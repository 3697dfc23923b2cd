// The outline of a file: the model with its parameters (with resolved values), lattice and sites,
// exchange terms, single-ion and g terms, field, cluster, probe and symmetry claim. Works from the
// syntax tree so the outline survives errors. Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Span } from "../base/text";
import type { Statement } from "../syntax/ast";
import { parameterValueText } from "./quantities";

export type OutlineKind = "module" | "constant" | "struct" | "field" | "function" | "property" | "event" | "enumMember" | "object";

export interface OutlineSymbol {
  readonly name: string;
  readonly detail: string;
  readonly kind: OutlineKind;
  /** The whole construct. */
  readonly span: Span;
  /** The part to select and reveal (the name). */
  readonly selectionSpan: Span;
  readonly children: readonly OutlineSymbol[];
}

function slice(a: DocumentAnalysis, span: Span, max = 60): string {
  const text = a.text.slice(span.start, span.end).replace(/\s+/g, " ").trim();
  return text.length > max ? `${text.slice(0, max - 1)}…` : text;
}

function statementSymbol(a: DocumentAnalysis, s: Statement): OutlineSymbol | null {
  const leaf = (name: string, detail: string, kind: OutlineKind, selectionSpan: Span, children: OutlineSymbol[] = []): OutlineSymbol => ({
    name,
    detail,
    kind,
    span: s.span,
    selectionSpan,
    children,
  });
  switch (s.kind) {
    case "let": {
      const p = a.model?.parameters.get(s.name.name);
      const value = p ? parameterValueText(a, p) : null;
      return leaf(s.name.name, value ?? slice(a, s.value.span), "constant", s.name.span);
    }
    case "latticePreset": {
      const sites = s.siteNames.map((n) => ({ name: n.name, detail: "site", kind: "field" as const, span: n.span, selectionSpan: n.span, children: [] }));
      return leaf(`lattice ${s.preset.name}`, sites.length ? `sites ${sites.map((x) => x.name).join(", ")}` : "", "struct", s.preset.span, sites);
    }
    case "latticeCustom": {
      const children: OutlineSymbol[] = [
        ...s.vectors.map((v) => ({ name: v.name.name, detail: slice(a, v.value.span), kind: "property" as const, span: v.span, selectionSpan: v.name.span, children: [] })),
        ...s.sites.map((x) => ({ name: x.name.name, detail: slice(a, x.position.span), kind: "field" as const, span: x.span, selectionSpan: x.name.span, children: [] })),
      ];
      return leaf("lattice", "custom", "struct", { start: s.span.start, end: s.span.start + "lattice".length }, children);
    }
    case "exchange":
      return leaf(`${s.exchangeKind.name}${slice(a, s.argsSpan)}`, s.bonds.map((b) => slice(a, b.span, 30)).join(", "), "function", s.exchangeKind.span);
    case "anisotropy":
      return leaf(`anisotropy ${s.site.name}`, s.clauses.map((c) => slice(a, c.span, 30)).join(" "), "property", s.site.span);
    case "g":
      return leaf(`g ${s.site.name}`, slice(a, s.value.span), "property", s.site.span);
    case "field":
      return leaf("field", slice(a, { start: s.magnitude.span.start, end: s.span.end }), "event", { start: s.span.start, end: s.span.start + 5 });
    case "cluster":
      return leaf("cluster", slice(a, { start: s.size.span.start, end: s.span.end }), "object", { start: s.span.start, end: s.span.start + 7 });
    case "probe":
      return leaf("probe", slice(a, s.value.span), "object", { start: s.span.start, end: s.span.start + 5 });
    case "expect":
      return leaf(`expect ${s.claim.name}`, s.axis ? slice(a, s.axis.span) : "", "enumMember", s.claim.span);
    case "spin":
      return leaf(s.site ? `spin ${s.site.name}` : "spin", slice(a, s.value.span), "property", { start: s.span.start, end: s.span.start + 4 });
    case "convention":
      return leaf("convention", s.value.name, "enumMember", s.value.span);
    case "junk":
      return null;
  }
}

export function documentSymbols(a: DocumentAnalysis): OutlineSymbol[] {
  return a.parsed.ast.models.map((m, k) => ({
    name: `model "${m.name.name}"`,
    detail: k === 0 ? "" : "extra model (ignored)",
    kind: "module" as const,
    span: m.span,
    selectionSpan: m.name.span,
    children: m.statements.map((s) => statementSymbol(a, s)).filter((x): x is OutlineSymbol => x !== null),
  }));
}
