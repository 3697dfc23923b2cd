// Quick fixes keyed on diagnostic codes and data: add the convention or a lattice, remove a no-op
// spin-1/2 anisotropy or a duplicate bond, replace an unknown name, site, lattice, kind, unit or
// convention by a suggestion, add a unit to a bare number, change a symmetry claim to the
// computed one. Each fix is a list of text edits over the analysed text. Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Diagnostic } from "../base/diagnostics";
import type { Span } from "../base/text";
import { closest } from "../base/words";
import { CONSTANTS, ENERGY_UNIT_NAMES, UNITS, unitInfo, unitSymbolForWord } from "../model/units";
import { statementExprs, walkExpr, type Expr, type Statement } from "../syntax/ast";
import { firstModel, type TextEdit } from "./common";

export interface CodeAction {
  readonly title: string;
  readonly kind: "quickfix";
  readonly diagnostic: Diagnostic;
  readonly edits: readonly TextEdit[];
  readonly isPreferred: boolean;
}

function overlaps(a: Span, b: Span): boolean {
  return a.start <= b.end && b.start <= a.end;
}

/** Quick fixes for the diagnostics that overlap `range`. */
export function codeActions(a: DocumentAnalysis, range: Span): CodeAction[] {
  const out: CodeAction[] = [];
  for (const d of a.diagnostics) {
    if (!overlaps(d.span, range)) continue;
    try {
      out.push(...fixesFor(a, d));
    } catch {
      // A fix that cannot be built is left out; the diagnostic itself stays.
    }
  }
  return out;
}

function action(d: Diagnostic, title: string, edits: TextEdit[], isPreferred = false): CodeAction {
  return { title, kind: "quickfix", diagnostic: d, edits, isPreferred };
}

function stringList(x: unknown): string[] {
  return Array.isArray(x) ? x.filter((s): s is string => typeof s === "string") : [];
}

function fixesFor(a: DocumentAnalysis, d: Diagnostic): CodeAction[] {
  const data = d.data ?? {};
  const replaceWith = (suggestions: string[], what: string): CodeAction[] =>
    suggestions.slice(0, 3).map((s, k) => action(d, `Change ${what} to '${s}'`, [{ span: d.span, newText: s }], k === 0));
  switch (d.code) {
    case "spw-convention-missing": {
      const insert = typeof data["insert"] === "string" ? data["insert"] : "convention antiferro-positive";
      const other = insert.includes("antiferro-positive") ? "convention ferro-positive" : "convention antiferro-positive";
      const first = insertStatement(a, insert, ["spin"]);
      const second = insertStatement(a, other, ["spin"]);
      return first && second
        ? [action(d, `Add '${insert}' (the assumed default)`, [first], true), action(d, `Add '${other}' (flips the sign of every coupling)`, [second])]
        : [];
    }
    case "spw-lattice-missing": {
      const insert = typeof data["insert"] === "string" ? data["insert"] : "lattice chain";
      const edit = insertStatement(a, insert, ["spin", "convention"]);
      return edit ? [action(d, `Add '${insert}'`, [edit], true)] : [];
    }
    case "spw-single-ion-constant": {
      const s = statementCovering(a, d.span);
      return s ? [action(d, "Remove the single-ion term (a constant for spin 1/2)", [removeStatement(a, s)], true)] : [];
    }
    case "spw-lattice-invalid": {
      if (data["removeName"] !== true) return [];
      // `lattice custom {` -> `lattice {`: the name and the blanks after it.
      const after = /^[ \t]*/.exec(a.text.slice(d.span.end))?.[0].length ?? 0;
      return [action(d, `Remove '${a.text.slice(d.span.start, d.span.end)}' (a custom lattice takes no name)`, [{ span: { start: d.span.start, end: d.span.end + after }, newText: "" }], true)];
    }
    case "spw-expr-forbidden": {
      // g Cu = diag(2, 2, 2.2) -> g Cu = (2, 2, 2.2): the diagonal tensor as the g statement writes it.
      const s = statementCovering(a, d.span);
      const call = a.text.slice(d.span.start, d.span.end);
      if (data["tuple"] !== true || s?.kind !== "g" || !call.startsWith("diag")) return [];
      const tuple = call.slice("diag".length).trim();
      return [action(d, `Write the diagonal g-tensor as ${tuple}`, [{ span: d.span, newText: tuple }], true)];
    }
    case "spw-term-zero": {
      const s = statementCovering(a, d.span);
      return s ? [action(d, "Remove the zero exchange term", [removeStatement(a, s)], true)] : [];
    }
    case "spw-bond-duplicate": {
      const edit = removeDuplicateBond(a, d.span);
      return edit ? [action(d, "Remove the duplicate bond", [edit], true)] : [];
    }
    case "spw-site-unknown":
      return replaceWith(stringList(data["suggestions"]), "site");
    case "spw-lattice-unknown":
      return replaceWith(stringList(data["suggestions"]), "lattice");
    case "spw-kind-unknown":
      return replaceWith(stringList(data["suggestions"]), "exchange kind");
    case "spw-name-unknown": {
      const name = typeof data["name"] === "string" ? data["name"] : a.text.slice(d.span.start, d.span.end);
      // In a coupling's place (an exchange's first argument, written as a bare name) only energies
      // fit: a parameter or constant of another dimension would trade this error for a unit mismatch.
      const s = statementCovering(a, d.span);
      const first = s?.kind === "exchange" ? s.args[0] : undefined;
      const coupling = first !== undefined && first.span.start === d.span.start && first.span.end === d.span.end;
      const fits = (v: { energy: number; field: number } | null | undefined): boolean => !coupling || !v || (v.energy === 1 && v.field === 0);
      const known = [
        ...[...(a.model?.parameters.values() ?? [])].filter((p) => fits(p.value)).map((p) => p.name),
        ...Object.keys(CONSTANTS).filter((c) => fits(CONSTANTS[c])),
      ];
      const given = stringList(data["suggestions"]);
      return replaceWith(given.length > 0 ? given : closest(name, known), "name");
    }
    case "spw-unit-unknown": {
      const unit = typeof data["unit"] === "string" ? data["unit"] : a.text.slice(d.span.start, d.span.end);
      // Where the statement fixes the dimension, only units of that dimension: a field unit in a
      // coupling would trade this error for a unit mismatch.
      const needed = neededDimension(statementCovering(a, d.span));
      const fitting = Object.keys(UNITS).filter((u) => !needed || UNITS[u]?.dimension === needed);
      const spelt = unitSymbolForWord(unit);
      return replaceWith(spelt && fitting.includes(spelt) ? [spelt] : closest(unit, fitting), "unit");
    }
    case "spw-expect-unknown":
      return replaceWith(stringList(data["suggestions"]), "symmetry");
    case "spw-convention-unknown": {
      const given = stringList(data["suggestions"]);
      return replaceWith(given.length > 0 ? given : closest(a.text.slice(d.span.start, d.span.end), ["antiferro-positive", "ferro-positive"]), "convention");
    }
    case "spw-unit-missing":
      return addUnitFixes(a, d);
    case "spw-expect-mismatch":
    case "spw-expect-weaker": {
      // The claim and its axis (up to the end of the expect statement) give way to the computed one.
      const replacement = data["replacement"];
      const length = data["replaceLength"];
      const end = typeof length === "number" ? d.span.start + length : statementCovering(a, d.span)?.span.end;
      if (typeof replacement !== "string" || end === undefined || end < d.span.end) return [];
      return [action(d, `Change the claim to 'expect ${replacement}'`, [{ span: { start: d.span.start, end }, newText: replacement }], true)];
    }
    default: {
      const replacement = data["replacement"];
      return typeof replacement === "string" ? [action(d, `Replace with '${replacement}'`, [{ span: d.span, newText: replacement }], true)] : [];
    }
  }
}

function lineStartOf(text: string, offset: number): number {
  return text.lastIndexOf("\n", offset - 1) + 1;
}

function indentationAt(text: string, offset: number): string {
  const start = lineStartOf(text, offset);
  return /^[ \t]*/.exec(text.slice(start, offset))?.[0] ?? "";
}

/** A new statement on its own line after the last statement of one of `after` kinds, or before
 *  the first statement, or after the opening brace of an empty model. */
function insertStatement(a: DocumentAnalysis, statementText: string, after: readonly string[]): TextEdit | null {
  const m = firstModel(a);
  const text = a.text;
  const eol = text.includes("\r\n") ? "\r\n" : "\n";
  const statements = m?.statements.filter((s) => s.kind !== "junk") ?? [];
  const anchor = [...statements].reverse().find((s) => after.includes(s.kind === "latticePreset" || s.kind === "latticeCustom" ? "lattice" : s.kind));
  if (anchor) {
    const indent = indentationAt(text, anchor.span.start);
    const lineEnd = endOfLine(text, anchor.span.end);
    return { span: { start: lineEnd, end: lineEnd }, newText: `${eol}${indent}${statementText}` };
  }
  const first = statements[0];
  if (first) {
    const indent = indentationAt(text, first.span.start);
    const start = lineStartOf(text, first.span.start);
    if (text.slice(start, first.span.start).trim() === "") return { span: { start, end: start }, newText: `${indent}${statementText}${eol}` };
    return { span: { start: first.span.start, end: first.span.start }, newText: `${statementText}${eol}${indent}` };
  }
  // An empty model: right after its '{'. Without one there is no block to add to (the missing
  // '{' has its own diagnostic), so no fix is offered.
  if (!m?.openSpan) return null;
  const at = m.openSpan.end;
  return { span: { start: at, end: at }, newText: `${eol}  ${statementText}` };
}

/** Offset of the end of the line holding `offset` (before its line break). */
function endOfLine(text: string, offset: number): number {
  const n = text.slice(offset).search(/\r\n|\r|\n/);
  return n < 0 ? text.length : offset + n;
}

/** The dimension a statement's quantities must have, where it fixes one (a `let` may hold either). */
function neededDimension(s: Statement | undefined): "energy" | "field" | null {
  if (!s) return null;
  if (s.kind === "field") return "field";
  if (s.kind === "exchange" || s.kind === "anisotropy" || s.kind === "probe") return "energy";
  return null;
}

function statementCovering(a: DocumentAnalysis, span: Span): Statement | undefined {
  return firstModel(a)?.statements.find((s) => s.kind !== "junk" && s.span.start <= span.start && s.span.end >= span.end);
}

/** Removes a statement; when it stands alone on its lines (a trailing comment goes with it),
 *  the whole lines go, so no blank line is left behind. */
function removeStatement(a: DocumentAnalysis, s: Statement): TextEdit {
  const text = a.text;
  const lineStart = lineStartOf(text, s.span.start);
  const lineEnd = endOfLine(text, s.span.end);
  const before = text.slice(lineStart, s.span.start);
  const after = text.slice(s.span.end, lineEnd);
  if (before.trim() === "" && (after.trim() === "" || after.trim().startsWith("#"))) {
    const breakLength = text.startsWith("\r\n", lineEnd) ? 2 : lineEnd < text.length ? 1 : 0;
    return { span: { start: lineStart, end: lineEnd + breakLength }, newText: "" };
  }
  let end = s.span.end;
  while (end < text.length && (text[end] === " " || text[end] === "\t")) end++;
  return { span: { start: s.span.start, end }, newText: "" };
}

/**
 * Removes the bond specification at `span` from its exchange statement, or the whole statement
 * when it is its only bond. Only when none of the specification's bonds made it into the model
 * (for `shell n` some bonds may be new and must stay).
 */
function removeDuplicateBond(a: DocumentAnalysis, span: Span): TextEdit | null {
  const s = statementCovering(a, span);
  if (!s || s.kind !== "exchange") return null;
  const stillUsed = a.model?.exchanges.some((e) => e.bonds.some((b) => b.span.start === span.start && b.span.end === span.end)) ?? false;
  if (stillUsed) return null;
  const k = s.bonds.findIndex((b) => b.span.start === span.start && b.span.end === span.end);
  if (k < 0) return null;
  if (s.bonds.length === 1) return removeStatement(a, s);
  const previous = s.bonds[k - 1];
  const next = s.bonds[k + 1];
  if (previous) return { span: { start: previous.span.end, end: span.end }, newText: "" };
  if (next) return { span: { start: span.start, end: next.span.start }, newText: "" };
  return null;
}

/** The expression at exactly `span` in the statement that holds it. */
function exprAt(s: Statement, span: Span): Expr | undefined {
  let found: Expr | undefined;
  for (const e of statementExprs(s))
    walkExpr(e, (x) => {
      if (!found && x.span.start === span.start && x.span.end === span.end) found = x;
    });
  return found;
}

function addUnitFixes(a: DocumentAnalysis, d: Diagnostic): CodeAction[] {
  const s = statementCovering(a, d.span);
  if (!s) return [];
  const units = s.kind === "field" ? ["T", "mT"] : s.kind === "probe" ? ["GHz", "meV", "K"] : ["meV", "K"];
  let target = exprAt(s, d.span);
  let where = "";
  // A bare parameter: the unit goes on the parameter's definition when that is a plain number.
  if (target?.kind === "name") {
    const name = target.name;
    const def = firstModel(a)?.statements.find((x) => x.kind === "let" && x.name.name === name);
    target = def?.kind === "let" ? def.value : undefined;
    where = ` in 'let ${name}'`;
  }
  if (!target || target.kind !== "number" || target.unit) return [];
  const end = target.span.end;
  return units
    .filter((u) => unitInfo(u) && (s.kind === "field" ? unitInfo(u)?.dimension === "field" : ENERGY_UNIT_NAMES.includes(u)))
    .map((u, k) => action(d, `Add unit ${u}${where}: ${target.kind === "number" ? target.text : ""} ${u}`, [{ span: { start: end, end }, newText: ` ${u}` }], k === 0));
}
