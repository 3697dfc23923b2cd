// Conversions from the service's offset-based results to LSP types: ranges, diagnostics (with
// codes, related information, tags and documentation links), completion items, symbols, code
// actions. LSP layer.
import {
  CodeAction as LspCodeAction,
  CodeActionKind,
  CompletionItemKind,
  Diagnostic as LspDiagnostic,
  DiagnosticSeverity,
  DiagnosticTag,
  DocumentSymbol,
  InsertTextFormat,
  SymbolKind,
  type CompletionItem as LspCompletionItem,
  type Range,
  type TextEdit as LspTextEdit,
} from "vscode-languageserver";
import type { DocumentAnalysis } from "../analysis/analyze";
import { sameDiagnosticText, type Diagnostic } from "../base/diagnostics";
import type { Span } from "../base/text";
import type { CodeAction, CompletionItem, CompletionKind, OutlineKind, OutlineSymbol, TextEdit } from "../service/index";

export function toRange(a: DocumentAnalysis, span: Span): Range {
  return a.lines.range(span.start, span.end);
}

const SEVERITY: Record<Diagnostic["severity"], DiagnosticSeverity> = {
  error: DiagnosticSeverity.Error,
  warning: DiagnosticSeverity.Warning,
  information: DiagnosticSeverity.Information,
  hint: DiagnosticSeverity.Hint,
};

/** One service diagnostic as LSP; `docsUri` (the diagnostics page) gets `#code` appended. */
export function toLspDiagnostic(a: DocumentAnalysis, uri: string, d: Diagnostic, docsUri: string | null): LspDiagnostic {
  const out: LspDiagnostic = {
    range: toRange(a, d.span),
    severity: SEVERITY[d.severity],
    code: d.code,
    source: "spinwright",
    message: d.message,
  };
  if (docsUri) out.codeDescription = { href: `${docsUri}#${d.code}` };
  if (d.related?.length) out.relatedInformation = d.related.map((r) => ({ location: { uri, range: toRange(a, r.span) }, message: r.message }));
  if (d.tags?.includes("unnecessary")) out.tags = [DiagnosticTag.Unnecessary];
  if (d.data) out.data = d.data;
  return out;
}

/** The diagnostics of an analysis as LSP, with the service diagnostics they were made from. */
export interface LspReport {
  readonly core: readonly Diagnostic[];
  readonly items: readonly LspDiagnostic[];
}

function sameRange(a: DocumentAnalysis, span: Span, r: Range): boolean {
  const s = a.lines.positionAt(span.start);
  if (s.line !== r.start.line || s.character !== r.start.character) return false;
  const e = a.lines.positionAt(span.end);
  return e.line === r.end.line && e.character === r.end.character;
}

/**
 * Whether `a`'s diagnostics read in LSP exactly as `before` (for the same uri and documentation
 * link): most keystrokes leave them so. A service diagnostic that says what the one converted
 * before said (the very object, kept by the analysis from the version before, or one with the
 * same code, severity, message, related messages, tags and data) converts to the same LSP
 * diagnostic but for its ranges, so only those are checked; any other is converted and compared
 * in full.
 */
export function sameAsLsp(a: DocumentAnalysis, uri: string, docsUri: string | null, before: LspReport): boolean {
  const core = a.diagnostics;
  if (core.length !== before.core.length) return false;
  for (let i = 0; i < core.length; i++) {
    const d = core[i] as Diagnostic;
    const item = before.items[i] as LspDiagnostic;
    if (!sameDiagnosticText(d, before.core[i] as Diagnostic)) {
      if (JSON.stringify(toLspDiagnostic(a, uri, d, docsUri)) !== JSON.stringify(item)) return false;
      continue;
    }
    if (!sameRange(a, d.span, item.range)) return false;
    const related = d.related ?? [];
    if (related.length !== (item.relatedInformation?.length ?? 0)) return false;
    for (let k = 0; k < related.length; k++) {
      const r = item.relatedInformation?.[k];
      if (!r || !sameRange(a, (related[k] as { span: Span }).span, r.location.range)) return false;
    }
  }
  return true;
}

export function toLspEdits(a: DocumentAnalysis, edits: readonly TextEdit[]): LspTextEdit[] {
  return edits.map((e) => ({ range: toRange(a, e.span), newText: e.newText }));
}

const COMPLETION_KIND: Record<CompletionKind, CompletionItemKind> = {
  keyword: CompletionItemKind.Keyword,
  parameter: CompletionItemKind.Constant,
  site: CompletionItemKind.Field,
  preset: CompletionItemKind.EnumMember,
  exchangeKind: CompletionItemKind.Function,
  unit: CompletionItemKind.Unit,
  constant: CompletionItemKind.Constant,
  value: CompletionItemKind.Value,
  snippet: CompletionItemKind.Snippet,
};

/** Snippet syntax reduced to plain text for clients without snippet support. */
export function plainFromSnippet(snippet: string): string {
  return snippet
    .replace(/\$\{\d+\|([^,|]*)[^|]*\|\}/g, "$1")
    .replace(/\$\{\d+:([^}]*)\}/g, "$1")
    .replace(/\$\{?\d+\}?/g, "")
    .replace(/\\([,|}$\\])/g, "$1");
}

export function toLspCompletion(a: DocumentAnalysis, item: CompletionItem, snippets: boolean): LspCompletionItem {
  const insert = item.insertText ?? item.label;
  const useSnippet = item.isSnippet === true && snippets;
  const out: LspCompletionItem = {
    label: item.label,
    kind: COMPLETION_KIND[item.kind],
    textEdit: { range: toRange(a, item.replaceSpan), newText: useSnippet ? insert : item.isSnippet ? plainFromSnippet(insert) : insert },
    insertTextFormat: useSnippet ? InsertTextFormat.Snippet : InsertTextFormat.PlainText,
  };
  if (item.detail) out.detail = item.detail;
  if (item.documentation) out.documentation = { kind: "markdown", value: item.documentation };
  if (item.sortText) out.sortText = item.sortText;
  return out;
}

const SYMBOL_KIND: Record<OutlineKind, SymbolKind> = {
  module: SymbolKind.Module,
  constant: SymbolKind.Constant,
  struct: SymbolKind.Struct,
  field: SymbolKind.Field,
  function: SymbolKind.Function,
  property: SymbolKind.Property,
  event: SymbolKind.Event,
  enumMember: SymbolKind.EnumMember,
  object: SymbolKind.Object,
};

export function toDocumentSymbol(a: DocumentAnalysis, s: OutlineSymbol): DocumentSymbol {
  const range = toRange(a, s.span);
  const selection = toRange(a, s.selectionSpan);
  return DocumentSymbol.create(s.name, s.detail, SYMBOL_KIND[s.kind], range, selection, s.children.map((c) => toDocumentSymbol(a, c)));
}

export function toLspCodeAction(a: DocumentAnalysis, uri: string, action: CodeAction, docsUri: string | null): LspCodeAction {
  return {
    title: action.title,
    kind: CodeActionKind.QuickFix,
    diagnostics: [toLspDiagnostic(a, uri, action.diagnostic, docsUri)],
    isPreferred: action.isPreferred,
    edit: { changes: { [uri]: toLspEdits(a, action.edits) } },
  };
}
