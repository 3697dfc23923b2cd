// Semantic tokens: what each name is, which the TextMate grammar cannot know: parameters
// (definitions and uses), sites, lattice vectors, exchange kinds, presets, built-in constants,
// units, convention and symmetry words, the model name. Service layer; the LSP layer encodes.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Span } from "../base/text";
import { EXCHANGE_KINDS } from "../model/model";
import { PRESETS } from "../model/lattice";
import { constantNamed } from "../model/units";
import { statementExprs, walkExpr } from "../syntax/ast";
import { firstModel } from "./common";

/** Token types and modifiers in legend order (standard LSP names, so every theme colours them). */
export const SEMANTIC_TOKEN_TYPES = ["namespace", "variable", "property", "function", "enumMember", "type", "keyword"] as const;
export const SEMANTIC_TOKEN_MODIFIERS = ["declaration", "readonly", "defaultLibrary"] as const;

export type SemanticTokenType = (typeof SEMANTIC_TOKEN_TYPES)[number];
export type SemanticTokenModifier = (typeof SEMANTIC_TOKEN_MODIFIERS)[number];

export interface SemanticToken {
  readonly span: Span;
  readonly type: SemanticTokenType;
  readonly modifiers: readonly SemanticTokenModifier[];
}

export function semanticTokens(a: DocumentAnalysis): SemanticToken[] {
  const out: SemanticToken[] = [];
  const add = (span: Span, type: SemanticTokenType, modifiers: SemanticTokenModifier[] = []): void => {
    if (span.end > span.start) out.push({ span, type, modifiers });
  };
  const m = firstModel(a);
  if (m) add(m.name.span, "namespace", ["declaration"]);
  for (const s of a.model?.symbols ?? []) {
    const type: SemanticTokenType = s.kind === "parameter" ? "variable" : "property";
    add(s.span, type, s.isDefinition ? ["declaration", "readonly"] : ["readonly"]);
  }
  for (const s of m?.statements ?? []) {
    switch (s.kind) {
      case "exchange":
        if ((EXCHANGE_KINDS as readonly string[]).includes(s.exchangeKind.name)) add(s.exchangeKind.span, "function", ["defaultLibrary"]);
        break;
      case "latticePreset":
        if (PRESETS[s.preset.name]) add(s.preset.span, "enumMember", ["defaultLibrary"]);
        break;
      case "convention":
        add(s.value.span, "enumMember", ["defaultLibrary"]);
        break;
      case "expect":
        add(s.claim.span, "enumMember", ["defaultLibrary"]);
        break;
      case "anisotropy":
        for (const c of s.clauses) add(c.name.span, "property");
        break;
      default:
        break;
    }
    for (const e of statementExprs(s))
      walkExpr(e, (x) => {
        if (x.kind === "name" && constantNamed(x.name)) add(x.span, "variable", ["readonly", "defaultLibrary"]);
        if (x.kind === "number" && x.unit) add(x.unit.span, "type", ["defaultLibrary"]);
      });
  }
  // One token per span (the symbol table can list a span twice), in source order.
  out.sort((x, y) => x.span.start - y.span.start || y.span.end - x.span.end);
  const unique: SemanticToken[] = [];
  for (const t of out) {
    const last = unique[unique.length - 1];
    if (last && t.span.start < last.span.end) continue;
    unique.push(t);
  }
  return unique;
}
