// Shared helpers of the editor features: the service's own result types (offset spans, no LSP
// types), settings, locating tokens, statements and symbols at an offset, and number formatting
// with units. Service layer: plain functions over DocumentAnalysis.
import type { IToken } from "chevrotain";
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Span } from "../base/text";
import type { SymbolOccurrence } from "../model/model";
import { UNITS, unitInfo } from "../model/units";
import { PRESETS } from "../model/lattice";
import { statementExprs, walkExpr, type ModelBlock, type NameRef, type Statement } from "../syntax/ast";

/** A replacement of the text in `span` (offsets into the analysed text). */
export interface TextEdit {
  readonly span: Span;
  readonly newText: string;
}

/** Editor settings under the `spinwright.` namespace that change service results. */
export interface ServiceSettings {
  /** Energy unit for resolved values in hints and the preview (meV, K, GHz, THz, cm^-1, ...). */
  readonly displayUnits: string;
  /** Largest cluster (in sites) the exact check offers to run on. */
  readonly exactCheckMaxSites: number;
}

export const DEFAULT_SETTINGS: ServiceSettings = { displayUnits: "meV", exactCheckMaxSites: 20 };

/** Energy units offered for display; each must be a key of UNITS with dimension energy. */
export const DISPLAY_UNITS = ["meV", "K", "GHz", "THz", "cm^-1", "ueV"] as const;

export function displayUnitOf(settings: ServiceSettings): string {
  const u = unitInfo(settings.displayUnits);
  return u && u.dimension === "energy" ? settings.displayUnits : "meV";
}

export function tokenSpan(t: IToken): Span {
  return { start: t.startOffset, end: (t.endOffset ?? t.startOffset) + 1 };
}

/** The line an offset is on, counted from 1 as people count lines ("line 12"). */
export function lineNumberAt(a: DocumentAnalysis, offset: number): number {
  return a.lines.positionAt(offset).line + 1;
}

export function spanContains(span: Span, offset: number): boolean {
  return offset >= span.start && offset <= span.end;
}

export function spanLength(span: Span): number {
  return span.end - span.start;
}

/** The first model block of the file (a file holds one; extra blocks are reported). */
export function firstModel(a: DocumentAnalysis): ModelBlock | undefined {
  return a.parsed.ast.models[0];
}

/** The token that contains `offset` or ends right at it (the word the cursor touches). */
export function tokenAt(a: DocumentAnalysis, offset: number): IToken | undefined {
  return a.parsed.tokenAt(offset);
}

/** Index of the last token that ends at or before `offset`, or -1. */
export function lastTokenIndexBefore(tokens: readonly IToken[], offset: number): number {
  let lo = 0;
  let hi = tokens.length - 1;
  let best = -1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const t = tokens[mid] as IToken;
    if ((t.endOffset ?? t.startOffset) + 1 <= offset) {
      best = mid;
      lo = mid + 1;
    } else hi = mid - 1;
  }
  return best;
}

/** The statement of the first model block whose span contains `offset`. */
export function statementAt(a: DocumentAnalysis, offset: number): Statement | undefined {
  const m = firstModel(a);
  if (!m) return undefined;
  // Statements are in source order and do not overlap (two may touch): the first one that contains
  // the offset, found from the last one that starts at or before it.
  const list = m.statements;
  let lo = 0;
  let hi = list.length - 1;
  let last = -1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    if ((list[mid] as Statement).span.start <= offset) {
      last = mid;
      lo = mid + 1;
    } else hi = mid - 1;
  }
  // Walking back, ends only decrease: stop at the first statement that ends before the offset.
  let found: Statement | undefined;
  for (let i = last; i >= 0; i--) {
    const s = list[i] as Statement;
    if (s.kind === "junk") continue;
    if (s.span.end < offset) break;
    found = s;
  }
  return found;
}

/** The symbol occurrence (parameter, site, lattice vector) at `offset`, if any. */
export function symbolAt(a: DocumentAnalysis, offset: number): SymbolOccurrence | undefined {
  const symbols = a.model?.symbols ?? [];
  const found = symbols.find((s) => offset >= s.span.start && offset <= s.span.end);
  if (found) return found;
  // A name in a statement the model skipped still refers to its definition.
  const statement = statementAt(a, offset);
  if (!statement) return undefined;
  const defined = (kind: SymbolOccurrence["kind"], name: string): boolean => symbols.some((s) => s.kind === kind && s.name === name && s.isDefinition);
  let hit: SymbolOccurrence | undefined;
  for (const e of statementExprs(statement))
    walkExpr(e, (x) => {
      if (x.kind === "name" && spanContains(x.span, offset) && defined("parameter", x.name))
        hit = { name: x.name, kind: "parameter", span: x.span, isDefinition: false };
    });
  if (hit) return hit;
  if (statement.kind === "exchange")
    for (const b of statement.bonds)
      if (b.kind === "explicit")
        for (const r of [b.from, b.to]) if (spanContains(r.span, offset) && defined("site", r.name)) return { name: r.name, kind: "site", span: r.span, isDefinition: false };
  return undefined;
}

/**
 * Name occurrences read from the syntax tree: parameter names in expressions and site names in
 * bonds and site selectors. The model records only what it evaluated, and it skips a statement
 * after some errors (an unknown exchange kind), so rename and references add these.
 */
function syntaxOccurrences(a: DocumentAnalysis, kind: SymbolOccurrence["kind"], name: string): SymbolOccurrence[] {
  const out: SymbolOccurrence[] = [];
  const m = firstModel(a);
  if (!m) return out;
  const defined = a.model?.symbols.some((s) => s.kind === kind && s.name === name && s.isDefinition) ?? false;
  if (!defined) return out;
  for (const s of m.statements) {
    if (kind === "parameter") {
      for (const e of statementExprs(s))
        walkExpr(e, (x) => {
          if (x.kind === "name" && x.name === name) out.push({ name, kind, span: x.span, isDefinition: false });
        });
    } else if (kind === "site") {
      const refs: NameRef[] = [];
      if (s.kind === "exchange") for (const b of s.bonds) if (b.kind === "explicit") refs.push(b.from, b.to);
      if ((s.kind === "anisotropy" || s.kind === "g") && s.site) refs.push(s.site);
      if (s.kind === "spin" && s.site) refs.push(s.site);
      for (const r of refs) if (r.name === name) out.push({ name, kind, span: r.span, isDefinition: false });
    }
  }
  return out;
}

/** All occurrences of one symbol, each span once, definitions first, then in source order. */
export function occurrencesOf(a: DocumentAnalysis, symbol: Pick<SymbolOccurrence, "name" | "kind">): SymbolOccurrence[] {
  const seen = new Set<number>();
  const out: SymbolOccurrence[] = [];
  for (const s of [...(a.model?.symbols ?? []), ...syntaxOccurrences(a, symbol.kind, symbol.name)]) {
    if (s.name !== symbol.name || s.kind !== symbol.kind || seen.has(s.span.start)) continue;
    seen.add(s.span.start);
    out.push(s);
  }
  return out.sort((x, y) => Number(y.isDefinition) - Number(x.isDefinition) || x.span.start - y.span.start);
}

/** Site names the file defines, from the model when there is one, else from the syntax tree. */
export function siteNames(a: DocumentAnalysis): string[] {
  const sites = a.model?.lattice?.sites;
  if (sites && sites.length > 0) return sites.map((s) => s.name);
  const m = firstModel(a);
  for (const s of m?.statements ?? []) {
    if (s.kind === "latticePreset") {
      if (s.siteNames.length > 0) return s.siteNames.map((n) => n.name);
      return PRESETS[s.preset.name]?.sites.map((x) => x.name) ?? [];
    }
    if (s.kind === "latticeCustom") return s.sites.map((x) => x.name.name);
  }
  return [];
}

/** Formats a number with `digits` significant digits, without trailing zeros. */
export function formatNumber(x: number, digits = 5): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return "0";
  const abs = Math.abs(x);
  if (abs >= 1e-4 && abs < 1e7) return String(Number(x.toPrecision(digits)));
  const [mantissa, exponent] = x.toExponential(digits - 1).split("e");
  return `${String(Number(mantissa))}e${Number(exponent)}`;
}

/** An energy in meV expressed in another energy unit (a key of UNITS). */
export function energyIn(valueMeV: number, unit: string): number {
  const u = unitInfo(unit);
  return u && u.dimension === "energy" ? valueMeV / u.toCanonical : valueMeV;
}

/** Text of an energy in one unit: `1.2237 meV`. */
export function energyText(valueMeV: number, unit: string, digits = 5): string {
  return `${formatNumber(energyIn(valueMeV, unit), digits)} ${unit}`;
}

/** Lines (zero-based) of a span. */
export function spanLines(a: DocumentAnalysis, span: Span): { startLine: number; endLine: number } {
  return { startLine: a.lines.positionAt(span.start).line, endLine: a.lines.positionAt(span.end).line };
}

/** True for a character that may appear in a name. */
export function isWordChar(c: string | undefined): boolean {
  return c !== undefined && /[A-Za-z0-9_]/.test(c);
}

/** The name-like word around `offset` (for a prefix being typed), or an empty span at offset. */
export function wordAround(text: string, offset: number): Span {
  let start = offset;
  while (start > 0 && isWordChar(text[start - 1])) start--;
  let end = offset;
  while (end < text.length && isWordChar(text[end])) end++;
  return { start, end };
}

/** Inside a comment or a quoted string: editor features that read code stay quiet there. */
export function inCommentOrString(a: DocumentAnalysis, offset: number): boolean {
  for (const c of a.parsed.comments) if (offset > c.startOffset && offset <= (c.endOffset ?? c.startOffset) + 1) return true;
  const t = tokenAt(a, offset);
  if (t && t.tokenType.name === "StringLiteral" && offset > t.startOffset && offset < (t.endOffset ?? t.startOffset) + 1) return true;
  // An unterminated comment at the end of the text is still a comment.
  const lineStart = a.text.lastIndexOf("\n", offset - 1) + 1;
  const before = a.text.slice(lineStart, offset);
  return /^[^"]*#/.test(before) || /^[^"]*("[^"]*"[^"]*)*"[^"]*$/.test(before);
}
