// Selection ranges (expand selection): token, enclosing expressions, bond or clause, statement,
// model block, whole file, innermost first. Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Span } from "../base/text";
import { statementExprs, walkExpr, type Statement } from "../syntax/ast";
import { spanContains, tokenAt, tokenSpan } from "./common";

function clauseSpans(s: Statement): Span[] {
  switch (s.kind) {
    case "exchange":
      return [s.argsSpan, ...s.bonds.map((b) => b.span), ...(s.bonds.length ? [{ start: s.bonds[0]!.span.start, end: s.bonds[s.bonds.length - 1]!.span.end }] : [])];
    case "anisotropy":
      return s.clauses.map((c) => c.span);
    case "field":
      return s.sweep ? [s.sweep.span] : [];
    case "latticeCustom":
      return [...s.vectors.map((v) => v.span), ...s.sites.map((x) => x.span)];
    default:
      return [];
  }
}

/** Nested spans around `offset`, innermost first, each strictly larger than the one before. */
export function selectionSpans(a: DocumentAnalysis, offset: number): Span[] {
  const candidates: Span[] = [];
  const token = tokenAt(a, offset);
  if (token) candidates.push(tokenSpan(token));
  for (const m of a.parsed.ast.models) {
    if (!spanContains(m.span, offset)) continue;
    for (const s of m.statements) {
      if (!spanContains(s.span, offset)) continue;
      for (const e of statementExprs(s)) walkExpr(e, (x) => spanContains(x.span, offset) && candidates.push(x.span));
      for (const c of clauseSpans(s)) if (spanContains(c, offset)) candidates.push(c);
      candidates.push(s.span);
    }
    candidates.push(m.span);
  }
  candidates.push({ start: 0, end: a.text.length });
  candidates.sort((x, y) => x.end - x.start - (y.end - y.start));
  const out: Span[] = [];
  for (const c of candidates) {
    const last = out[out.length - 1];
    if (!last) out.push(c);
    else if (c.start <= last.start && c.end >= last.end && (c.start < last.start || c.end > last.end)) out.push(c);
  }
  return out;
}
