// Go to definition, find references, document highlights and rename for the names a file
// defines: parameters (`let`), sites and lattice vectors. Works from the model's symbol table,
// so only resolved occurrences take part. Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Span } from "../base/text";
import { EXCHANGE_KINDS, type SymbolOccurrence } from "../model/model";
import { UNIT_WORDS, constantNamed } from "../model/units";
import { isKeyword } from "../syntax/lexer";
import { firstModel, occurrencesOf, symbolAt, type TextEdit } from "./common";

export interface Highlight {
  readonly span: Span;
  readonly kind: "read" | "write";
}

/** Where the name under the cursor is defined. Preset sites without a `sites` list point to the
 *  lattice statement that brings them in. */
export function findDefinition(a: DocumentAnalysis, offset: number): Span | null {
  const symbol = symbolAt(a, offset);
  if (!symbol) return null;
  const def = occurrencesOf(a, symbol).find((s) => s.isDefinition);
  if (def) return def.span;
  if (symbol.kind === "site") {
    const lattice = firstModel(a)?.statements.find((s) => s.kind === "latticePreset" || s.kind === "latticeCustom");
    if (lattice?.kind === "latticePreset") return lattice.preset.span;
    if (lattice) return lattice.span;
  }
  return null;
}

export function findReferences(a: DocumentAnalysis, offset: number, includeDeclaration: boolean): Span[] {
  const symbol = symbolAt(a, offset);
  if (!symbol) return [];
  return occurrencesOf(a, symbol)
    .filter((s) => includeDeclaration || !s.isDefinition)
    .map((s) => s.span);
}

export function documentHighlights(a: DocumentAnalysis, offset: number): Highlight[] {
  const symbol = symbolAt(a, offset);
  if (!symbol) return [];
  return occurrencesOf(a, symbol).map((s) => ({ span: s.span, kind: s.isDefinition ? "write" : "read" }));
}

export type PrepareRenameResult = { ok: true; span: Span; placeholder: string } | { ok: false; reason: string };

export function prepareRename(a: DocumentAnalysis, offset: number): PrepareRenameResult {
  const symbol = symbolAt(a, offset);
  if (!symbol) return { ok: false, reason: "Only parameters, sites and lattice vectors can be renamed." };
  if (!occurrencesOf(a, symbol).some((s) => s.isDefinition))
    return {
      ok: false,
      reason: `Site '${symbol.name}' takes its name from the lattice preset; name the sites first (lattice ... sites ${symbol.name}) and rename then.`,
    };
  return { ok: true, span: symbol.span, placeholder: symbol.name };
}

export type RenameResult = { ok: true; edits: TextEdit[] } | { ok: false; reason: string };

/** Why `newName` cannot name a symbol of this kind, or null when it can. */
export function renameProblem(a: DocumentAnalysis, symbol: Pick<SymbolOccurrence, "name" | "kind">, newName: string): string | null {
  if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(newName)) return `'${newName}' is not a name: use letters, digits and _, starting with a letter.`;
  if (isKeyword(newName)) return `'${newName}' is a keyword of the format.`;
  if (UNIT_WORDS.has(newName)) return `'${newName}' is a unit; a parameter or site named like a unit would be ambiguous.`;
  if (constantNamed(newName)) return `'${newName}' is a built-in constant.`;
  if (symbol.kind === "parameter" && (EXCHANGE_KINDS as readonly string[]).includes(newName)) return `'${newName}' is an exchange kind.`;
  if (newName === symbol.name) return null;
  const taken = (a.model?.symbols ?? []).some((s) => s.name === newName && s.isDefinition);
  const parameterTaken = firstModel(a)?.statements.some((s) => s.kind === "let" && s.name.name === newName) ?? false;
  if (taken || parameterTaken) return `'${newName}' is already defined in this file.`;
  return null;
}

export function rename(a: DocumentAnalysis, offset: number, newName: string): RenameResult {
  const prepared = prepareRename(a, offset);
  if (!prepared.ok) return prepared;
  const symbol = symbolAt(a, offset) as SymbolOccurrence;
  const problem = renameProblem(a, symbol, newName);
  if (problem) return { ok: false, reason: problem };
  return { ok: true, edits: occurrencesOf(a, symbol).map((s) => ({ span: s.span, newText: newName })) };
}
